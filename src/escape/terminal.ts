/**
 * Text from the data on a terminal (text reports, error messages, notes):
 * control characters are shown as visible escapes, so that a label cannot
 * move the cursor, clear the screen, set the window title, plant a
 * hyperlink or recolour what follows (ECMA-48 sequences start with ESC or
 * the C1 control CSI); bidirectional overrides (the "Trojan Source"
 * characters) and line and paragraph separators are shown the same way.
 * Messages are also clipped: a 20 MB column name must not make a 20 MB line.
 */

/** C0 controls, DEL, C1 controls, bidirectional embeddings, overrides and isolates, line and paragraph separators. */
// eslint-disable-next-line no-control-regex
const UNSAFE = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u202a-\u202e\u2066-\u2069]/g;

/** One character as a visible escape: \u{1b} for ESC. */
export function visibleEscape(c: string): string {
  return `\\u{${c.charCodeAt(0).toString(16)}}`;
}

/** A text with every control character shown as a visible escape (see the top of this file). */
export function terminalSafe(text: string): string {
  return text.replace(UNSAFE, visibleEscape);
}

/** Every string in a record made terminal-safe (a copy; numbers, booleans and nulls as they are), for the text renderers. */
export function terminalSafeRecord<T>(record: T): T {
  const copy = (value: unknown): unknown => {
    if (typeof value === 'string') return terminalSafe(value);
    if (Array.isArray(value)) return value.map(copy);
    if (value !== null && typeof value === 'object' && !ArrayBuffer.isView(value)) {
      const out: Record<string, unknown> = {};
      for (const [key, v] of Object.entries(value)) out[key] = copy(v);
      return out;
    }
    return value;
  };
  return copy(record) as T;
}

/** The longest message the tool prints, in characters; a longer one keeps its start and its end. */
export const MESSAGE_LIMIT = 1000;

/** A message bounded to MESSAGE_LIMIT characters: its start and end, and how much was left out between them. */
export function clipMessage(text: string, limit = MESSAGE_LIMIT): string {
  if (text.length <= limit) return text;
  const keep = Math.floor((limit - 40) / 2);
  let head = text.slice(0, keep);
  let tail = text.slice(text.length - keep);
  // Never split a surrogate pair.
  if (/[\ud800-\udbff]$/.test(head)) head = head.slice(0, -1);
  if (/^[\udc00-\udfff]/.test(tail)) tail = tail.slice(1);
  const left = text.length - head.length - tail.length;
  return `${head}…(${left.toLocaleString('en-US')} characters left out)…${tail}`;
}

/** A message as the terminal gets it: control characters visible, on one line, clipped. */
export function messageLine(text: string): string {
  return terminalSafe(clipMessage(text));
}
