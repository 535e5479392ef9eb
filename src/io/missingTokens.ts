/**
 * Values that look like "no value" (NA, -, 999, …): found per column and
 * reported as notes, never treated as missing unless the user says so.
 */
import { isNumericLabel } from '../table/naturalOrder.js';
import { shellWord } from '../escape/shell.js';

/**
 * Values that exports commonly write for "no value". They are NOT treated as
 * missing unless the user says so (`--missing`, or missing codes in a
 * codebook): a column that holds one gets a one-line note naming the column,
 * the token and the option, and numeric recognition looks past them.
 *
 * Where the list comes from:
 * - the default `na_values` of the pandas CSV reader ("NA and NaN values"
 *   in its IO documentation; recorded from pandas 1.5.3 in
 *   fixtures/reference/missing-tokens.json by scripts/record_missing_tokens.py):
 *   `#N/A`, `#N/A N/A`, `#NA`, `-1.#IND`, `-1.#QNAN`, `-NaN`, `-nan`,
 *   `1.#IND`, `1.#QNAN`, `<NA>`, `N/A`, `NA`, `NULL`, `NaN`, `n/a`, `nan`,
 *   `null` (pandas 2 adds `None`, left out here: "None" is a real answer to
 *   "how many…?" and "which of these…?");
 * - spreadsheet error and empty-cell values: `#NULL!`, `#VALUE!`, `#DIV/0!`;
 * - common practice in survey and statistical exports: `.` (a lone period,
 *   the missing mark several statistics packages write), `-` and `--` (the
 *   dash of published tables), `?` (the UCI machine learning repository's
 *   files), `na`, `N.A.`, `missing`, `Missing`, `MISSING`, `(missing)`.
 * Matching is exact, after trimming; the list is case-sensitive as written
 * (so "Na", sodium, is a value).
 */
export const MISSING_LOOKING_TOKENS: readonly string[] = [
  '#N/A', '#N/A N/A', '#NA', '-1.#IND', '-1.#QNAN', '-NaN', '-nan', '1.#IND', '1.#QNAN', '<NA>', 'N/A', 'NA', 'NULL', 'NaN', 'n/a', 'nan', 'null',
  '#NULL!', '#VALUE!', '#DIV/0!',
  '.', '-', '--', '?', 'na', 'N.A.', 'missing', 'Missing', 'MISSING', '(missing)',
];

const TOKENS = new Set(MISSING_LOOKING_TOKENS);

/** Whether a (trimmed) value is one that commonly means missing. */
export function isMissingLooking(value: string): boolean {
  return TOKENS.has(value);
}

export interface MissingTokenFinding {
  column: string;
  token: string;
  /** Rows holding the token (weighted rows are still counted as rows). */
  rows: number;
}

export interface ColumnValues {
  name: string;
  /** Distinct (trimmed, non-empty) values. */
  labels: readonly string[];
  /** Rows per value, parallel to labels; absent when only presence is known. */
  counts?: ArrayLike<number>;
}

/**
 * Which column holds which missing-looking token, and in how many rows.
 * Tokens the user already treats as missing (`declared`) are not reported:
 * they never reach the labels anyway, and the note would be noise.
 */
export function detectMissingTokens(columns: readonly ColumnValues[], declared: ReadonlySet<string> = new Set()): MissingTokenFinding[] {
  const findings: MissingTokenFinding[] = [];
  for (const column of columns) {
    column.labels.forEach((label, k) => {
      if (TOKENS.has(label) && !declared.has(label)) findings.push({ column: column.name, token: label, rows: column.counts ? column.counts[k] : 0 });
    });
  }
  return findings;
}

/** One line per column: the column, its tokens with their rows, and the option that treats them as missing. */
export function missingTokenNotes(findings: readonly MissingTokenFinding[]): string[] {
  const byColumn = new Map<string, MissingTokenFinding[]>();
  for (const f of findings) byColumn.set(f.column, [...(byColumn.get(f.column) ?? []), f]);
  const notes: string[] = [];
  for (const [column, list] of byColumn) {
    const named = list.map((f) => (f.rows > 0 ? `"${f.token}" (${f.rows.toLocaleString('en-US')} row${f.rows === 1 ? '' : 's'})` : `"${f.token}"`)).join(', ');
    const option = `--missing ${shellWord(list.map((f) => f.token).join(','))}`;
    const one = list.length === 1;
    notes.push(`column "${column}" holds ${named}, ${one ? 'a value that commonly means' : 'values that commonly mean'} missing; counted as ${one ? 'a level' : 'levels'} unless you pass ${option}`);
  }
  return notes;
}

export interface NumericReading {
  /** Every value, apart from missing-looking tokens, is a number (and at least one is). */
  numeric: boolean;
  /** ... and every number is a whole number. */
  integer: boolean;
  /** The missing-looking tokens that were looked past. */
  tokens: string[];
}

/**
 * Whether a column is numeric once missing-looking tokens are set aside: a
 * column of ages with "NA" in it is still a column of ages.
 */
export function numericIgnoringTokens(labels: readonly string[]): NumericReading {
  const tokens: string[] = [];
  let numbers = 0;
  let integer = true;
  for (const label of labels) {
    if (TOKENS.has(label)) {
      // "-" and "." are tokens here, never numbers.
      tokens.push(label);
      continue;
    }
    if (!isNumericLabel(label)) return { numeric: false, integer: false, tokens };
    numbers++;
    if (integer && !/^[+-]?\d+$/.test(label)) integer = false;
  }
  return { numeric: numbers > 0, integer: numbers > 0 && integer, tokens };
}
