/**
 * A column in report order, ready to be counted: labels in natural order
 * (or bins, lowest first) and codes renumbered to match (0 missing).
 */
import { equalFrequencyBins, naturalRanks } from './bins.js';
import { Codes, EncodedColumn, remapCodes } from './encodedColumn.js';

export interface OrderedColumn {
  name: string;
  /** Labels in report order. */
  labels: string[];
  /** Per row (or entry): 1-based index into labels, 0 for missing. */
  codes: Codes;
}

/** A screened column's codes in report order (renumbered in place: the column given is used up): natural order, or equal-frequency bins (lowest first) for a column past the cap. */
export function orderColumn(column: EncodedColumn, bins: number | null, order?: readonly string[]): OrderedColumn {
  if (column.codes === null) {
    const binning = equalFrequencyBins(column.values as Float64Array, bins as number);
    return { name: column.name, labels: binning.labels, codes: binning.codes };
  }
  // A given order (codebook, ranges) ranks the labels it names; the rest follow naturally.
  const rank = order && order.length > 0 ? rankByOrder(column.labels, order) : naturalRanks(column.labels);
  const labels = new Array<string>(column.labels.length);
  column.labels.forEach((l, code) => (labels[rank[code]] = l));
  const remap = new Uint32Array(column.labels.length + 1);
  for (let code = 1; code <= column.labels.length; code++) remap[code] = rank[code - 1] + 1;
  // Renumbered in place: the encoded column's codes become the ordered ones.
  return { name: column.name, labels, codes: remapCodes(column.codes, remap, column.labels.length) };
}

function rankByOrder(labels: readonly string[], order: readonly string[]): number[] {
  const position = new Map(order.map((l, k) => [l, k]));
  const rest = naturalRanks(labels);
  const sorted = labels.map((_l, i) => i).sort((a, b) => (position.get(labels[a]) ?? order.length + rest[a]) - (position.get(labels[b]) ?? order.length + rest[b]));
  const rank = new Array<number>(labels.length);
  sorted.forEach((code, k) => (rank[code] = k));
  return rank;
}
