/**
 * A column in report order, ready to be counted: labels in natural order
 * (or bins, lowest first) and codes renumbered to match (0 missing).
 */
import { LevelBinning, naturalRanks } from './bins.js';
import { Codes, EncodedColumn, remapCodes } from './encodedColumn.js';

export interface OrderedColumn {
  name: string;
  /** Labels in report order. */
  labels: string[];
  /** Per row (or entry): 1-based index into labels, 0 for missing. */
  codes: Codes;
}

/** A screened column's codes in report order (renumbered in place: the column given is used up): a given order (codebook, ranges) for the labels it names, the rest in natural order. */
export function orderColumn(column: EncodedColumn, order?: readonly string[]): OrderedColumn {
  const codes = column.codes as Codes;
  // A given order (codebook, ranges) ranks the labels it names; the rest follow naturally.
  const rank = order && order.length > 0 ? rankByOrder(column.labels, order) : naturalRanks(column.labels);
  const labels = new Array<string>(column.labels.length);
  column.labels.forEach((l, code) => (labels[rank[code]] = l));
  const remap = new Uint32Array(column.labels.length + 1);
  for (let code = 1; code <= column.labels.length; code++) remap[code] = rank[code - 1] + 1;
  // Renumbered in place: the encoded column's codes become the ordered ones.
  return { name: column.name, labels, codes: remapCodes(codes, remap, column.labels.length) };
}

/** A column cut into bins (bins.ts: binNumericLevels), its codes renumbered in place to the bins' order. */
export function binnedColumn(column: EncodedColumn, binning: LevelBinning): OrderedColumn {
  const position = new Map(binning.order.map((label, k) => [label, k + 1]));
  const remap = new Uint32Array(column.labels.length + 1);
  column.labels.forEach((_l, k) => (remap[k + 1] = position.get(binning.labelOf[k]) ?? 0));
  return { name: column.name, labels: [...binning.order], codes: remapCodes(column.codes as Codes, remap, binning.order.length) };
}

function rankByOrder(labels: readonly string[], order: readonly string[]): number[] {
  const position = new Map(order.map((l, k) => [l, k]));
  const rest = naturalRanks(labels);
  const sorted = labels.map((_l, i) => i).sort((a, b) => (position.get(labels[a]) ?? order.length + rest[a]) - (position.get(labels[b]) ?? order.length + rest[b]));
  const rank = new Array<number>(labels.length);
  sorted.forEach((code, k) => (rank[code] = k));
  return rank;
}
