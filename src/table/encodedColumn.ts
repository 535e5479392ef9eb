/**
 * A column as a scan reads it: dictionary-encoded (labels in order of first
 * appearance, small integer codes, 0 for missing) with the facts screening
 * needs; and its recode (--recode, --keep-missing) applied to the codes.
 */
import { MISSING_LEVEL } from './twoWayTable.js';
import { EMPTY_REASON, indexCodebook, levelOrder, levelOutcome, LevelRules, missingReasonOrder } from './levelRules.js';
import { isNumericLabel } from './naturalOrder.js';
import { isMissingLooking, numericIgnoringTokens } from './missingLooking.js';

import { Codes, codesFor, largestCode } from './codes.js';

export { codesFor, largestCode };
export type { Codes };

/**
 * Renumbers codes through `remap` (code k becomes remap[k]), in place when
 * the new codes fit the array (the caller gives the column's codes up), else
 * into a wider array.
 */
export function remapCodes(codes: Codes, remap: ArrayLike<number>, largest: number): Codes {
  const out = largest <= largestCode(codes) ? codes : codesFor(largest, codes.length);
  for (let k = 0; k < codes.length; k++) out[k] = remap[codes[k]];
  return out;
}

/** One candidate column of a scan, dictionary-encoded in the single read. */
export interface EncodedColumn {
  name: string;
  /** Level labels; code k (1-based) is labels[k − 1]; code 0 is missing. */
  labels: string[];
  /**
   * A code per kept row, whoever read it (the built-in reader or the
   * engine); null once the column passed the level cap. When binning was
   * asked for (--bins, a codebook's bins), a numeric column keeps its codes
   * past the cap, so that its numbers can be binned from them.
   */
  codes: Codes | null;
  missing: number;
  /** Distinct values seen (exact up to the reader's tracking limit). */
  distinct: number;
  /** True when the column had more distinct values than the reader tracks. */
  distinctCapped: boolean;
  /** Every value is a number, apart from values that commonly mean missing (table/missingLooking.ts), and at least one is. */
  numeric: boolean;
  /** ... and every number is a whole number. */
  integer: boolean;
  /** The missing-looking values among the column's values (table/missingLooking.ts), known even where its codes are not kept. */
  missingLooking: string[];
}

/** Rows per code of a column (index 0: missing rows), counted from its codes. */
export function rowsPerCode(codes: Codes, levels: number): Float64Array {
  const rows = new Float64Array(levels + 1);
  for (let k = 0; k < codes.length; k++) rows[codes[k]]++;
  return rows;
}

/** What screening needs to know of a column's new levels: whether they are numbers (past missing-looking values), and which look missing. */
function levelFacts(labels: readonly string[]): Pick<EncodedColumn, 'numeric' | 'integer' | 'missingLooking'> {
  const { numeric, integer } = numericIgnoringTokens(labels);
  return { numeric, integer, missingLooking: labels.filter(isMissingLooking) };
}

/**
 * Applies a column's recode (levels recoded alike are merged) and, with
 * --keep-missing, makes missing a level of its own. Returns the column with
 * its new labels and codes, renumbered in place where they fit (the column
 * given is used up); untouched columns come back as they are.
 */
export function recodeColumn(column: EncodedColumn, mapping: ReadonlyMap<string, string> | undefined, keepMissing: boolean): EncodedColumn {
  if (column.codes === null || (!mapping && !(keepMissing && column.missing > 0))) return column;
  const labels: string[] = [];
  const index = new Map<string, number>();
  const remap = new Uint32Array(column.labels.length + 1);
  const codeOf = (label: string) => {
    let code = index.get(label);
    if (code === undefined) {
      labels.push(label);
      code = labels.length;
      index.set(label, code);
    }
    return code;
  };
  column.labels.forEach((raw, k) => (remap[k + 1] = codeOf(mapping?.get(raw) ?? raw)));
  if (keepMissing && column.missing > 0) remap[0] = codeOf(MISSING_LEVEL);
  const codes = remapCodes(column.codes, remap, labels.length);
  return { ...column, ...levelFacts(labels), labels, codes, distinct: labels.length, missing: keepMissing ? 0 : column.missing };
}

/**
 * Rows a column leaves out of every pair it takes part in, by reason
 * (levelRules.ts): "empty" for empty fields (and --missing values), a
 * codebook missing code's reason for its code; none with --keep-missing,
 * which keeps them as levels. Counted from the column's codes before its
 * rules renumber them; with frequencies (--freq) a row counts as its
 * frequency, as pair counts it. Reasons in the order of missingReasonOrder.
 */
export function missingByReason(column: EncodedColumn, rules: LevelRules | null, keepMissing: boolean, frequencies?: Float64Array): { reason: string; rows: number }[] {
  if (keepMissing) return [];
  const order = missingReasonOrder(rules);
  const emptyAt = order.indexOf(EMPTY_REASON);
  if (column.codes === null) return column.missing > 0 ? [{ reason: EMPTY_REASON, rows: column.missing }] : [];
  // The reason of each code (its index in `order`), or −1 when it is counted.
  const reasonOf = new Int32Array(column.labels.length + 1).fill(-1);
  reasonOf[0] = emptyAt;
  let coded = false;
  if (rules?.codebook && rules.codebook.missing.length > 0) {
    const index = indexCodebook(rules.codebook);
    column.labels.forEach((raw, k) => {
      const outcome = levelOutcome({ ...rules, keepMissing: false }, raw, index);
      if (outcome.kind === 'missing') {
        reasonOf[k + 1] = order.indexOf(outcome.reason);
        coded = true;
      }
    });
  }
  const rows = new Float64Array(order.length);
  if (!coded && !frequencies) rows[emptyAt] = column.missing;
  else {
    const codes = column.codes;
    for (let r = 0; r < codes.length; r++) {
      const at = reasonOf[codes[r]];
      if (at >= 0) rows[at] += frequencies ? frequencies[r] : 1;
    }
  }
  return order.map((reason, k) => ({ reason, rows: rows[k] })).filter((e) => e.rows > 0);
}

/**
 * Applies a column's level rules (levelRules.ts: codebook labels and
 * missing codes, cuts, recodes, --keep-missing) to its codes: values with
 * the same level share a code, values that are missing get code 0. Returns
 * the column with its new labels and codes, and the level order the rules
 * give (codebook order, ranges in order, the rest naturally).
 */
export function shapeColumn(column: EncodedColumn, rules: LevelRules): { column: EncodedColumn; order: string[] } {
  if (column.codes === null) return { column, order: [] };
  const whole = rules.cuts ? rules.cuts.every(Number.isInteger) && column.labels.every((l) => !isNumericLabel(l) || Number.isInteger(Number(l))) : false;
  const shaped = { ...rules, wholeCuts: whole };
  const index = indexCodebook(rules.codebook);
  const labels: string[] = [];
  const codeOf = new Map<string, number>();
  const remap = new Uint32Array(column.labels.length + 1);
  const code = (raw: string | null) => {
    const outcome = levelOutcome(shaped, raw, index);
    if (outcome.kind === 'missing') return 0;
    let c = codeOf.get(outcome.label);
    if (c === undefined) {
      labels.push(outcome.label);
      c = labels.length;
      codeOf.set(outcome.label, c);
    }
    return c;
  };
  column.labels.forEach((raw, k) => (remap[k + 1] = code(raw)));
  remap[0] = column.missing > 0 ? code(null) : 0;
  // Renumbered in place where the codes fit (the column given is used up).
  const before = column.codes;
  const codes = labels.length <= largestCode(before) ? before : codesFor(labels.length, before.length);
  // Missing rows: the reader's count, plus the codes the rules made missing, less the empty ones kept as a level.
  let change = 0;
  for (let k = 0; k < codes.length; k++) {
    const was = before[k];
    const now = remap[was];
    codes[k] = now;
    if (now === 0 && was !== 0) change++;
    else if (now !== 0 && was === 0) change--;
  }
  return { column: { ...column, ...levelFacts(labels), labels, codes, distinct: labels.length, missing: Math.max(0, column.missing + change) }, order: levelOrder(rules, labels) };
}
