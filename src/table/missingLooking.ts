/**
 * Values that look like "no value" (NA, N/A, ".", "-", …): the list, where
 * it comes from, and whether a column is numeric once they are set aside.
 * What a value means is decided here (src/table); finding them in a file and
 * the note that names them are io/missingTokens.ts.
 */
import { isNumericLabel } from './naturalOrder.js';

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
