/**
 * A column as a scan reads it: dictionary-encoded (labels in order of first
 * appearance, small integer codes, 0 for missing) with the facts screening
 * needs; and its recode (--recode, --keep-missing) applied to the codes.
 */
import { MISSING_LEVEL } from './twoWayTable.js';

/** One candidate column of a scan, dictionary-encoded in the single read. */
export interface EncodedColumn {
  name: string;
  /** Level labels; code k (1-based) is labels[k − 1]; code 0 is missing. */
  labels: string[];
  /**
   * A code per data row (the built-in reader) or per distinct value read
   * (the engine, whose entries each stand for many rows); null once the
   * column passed the level cap.
   */
  codes: Uint16Array | Uint32Array | null;
  missing: number;
  /** Distinct values seen (exact up to the reader's tracking limit). */
  distinct: number;
  /** True when the column had more distinct values than the reader tracks. */
  distinctCapped: boolean;
  numeric: boolean;
  integer: boolean;
  /** Numeric values per row (NaN for missing), kept only when binning was asked for. */
  values: Float64Array | null;
}

/**
 * Applies a column's recode (levels recoded alike are merged) and, with
 * --keep-missing, makes missing a level of its own. Returns the column with
 * its new labels and codes; untouched columns come back as they are.
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
  const codes = labels.length >= 65535 ? new Uint32Array(column.codes.length) : new Uint16Array(column.codes.length);
  for (let k = 0; k < codes.length; k++) codes[k] = remap[column.codes[k]];
  return { ...column, labels, codes, distinct: labels.length, missing: keepMissing ? 0 : column.missing };
}
