/**
 * A column in report order, ready to be counted: labels in natural order
 * (or bins, lowest first) and codes renumbered to match (0 missing).
 */
import { equalFrequencyBins, naturalRanks } from './bins.js';
import type { EncodedColumn } from './encodedColumn.js';

export interface OrderedColumn {
  name: string;
  /** Labels in report order. */
  labels: string[];
  /** Per row (or entry): 1-based index into labels, 0 for missing. */
  codes: Uint16Array | Uint32Array;
}

/** A screened column's codes in report order: natural order, or equal-frequency bins (lowest first) for a column past the cap. */
export function orderColumn(column: EncodedColumn, bins: number | null): OrderedColumn {
  if (column.codes === null) {
    const binning = equalFrequencyBins(column.values as Float64Array, bins as number);
    return { name: column.name, labels: binning.labels, codes: binning.codes };
  }
  const rank = naturalRanks(column.labels);
  const labels = new Array<string>(column.labels.length);
  column.labels.forEach((l, code) => (labels[rank[code]] = l));
  const remap = new Uint32Array(column.labels.length + 1);
  for (let code = 1; code <= column.labels.length; code++) remap[code] = rank[code - 1] + 1;
  const codes = column.codes instanceof Uint32Array ? new Uint32Array(column.codes.length) : new Uint16Array(column.codes.length);
  for (let k = 0; k < codes.length; k++) codes[k] = remap[column.codes[k]];
  return { name: column.name, labels, codes };
}
