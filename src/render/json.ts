/**
 * JSON output: the record as it stands, with non-finite numbers (which JSON
 * cannot hold) written as null. The field-by-field contract is docs/json.md.
 */
export function toJson(value: unknown): string {
  return JSON.stringify(value, (_key, v) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2) + '\n';
}
