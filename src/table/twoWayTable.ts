/**
 * The two-way table of counts (integer or weighted) with its level labels in
 * report order, and the operations on its levels: order, relabel and merge,
 * drop empty ones. The label of the missing level lives here too.
 */
import { compareNatural } from './naturalOrder.js';

/** A two-way table of counts (integer or weighted) with its level labels, in report order. */
export interface TwoWayTable {
  rowName: string;
  colName: string;
  rowLevels: string[];
  colLevels: string[];
  counts: number[][];
}

/** The label a missing value gets with --keep-missing. */
export const MISSING_LEVEL = '(missing)';

/** Levels in a requested order; levels the request does not name follow in natural order. */
export function orderLevels(levels: readonly string[], requested?: readonly string[]): { order: string[]; unknown: string[] } {
  const present = new Set(levels);
  if (!requested || requested.length === 0) return { order: [...levels].sort(compareNatural), unknown: [] };
  const named = requested.filter((l) => present.has(l));
  const unknown = requested.filter((l) => !present.has(l));
  const namedSet = new Set(named);
  const rest = levels.filter((l) => !namedSet.has(l)).sort(compareNatural);
  return { order: [...named, ...rest], unknown };
}

/**
 * The table with each level renamed by the maps (levels renamed alike are
 * added together) and laid out on the given level lists; a target level
 * that no source level maps to gets zero counts.
 */
export function relabelTable(
  table: TwoWayTable,
  rowLevels: readonly string[],
  colLevels: readonly string[],
  rowMap: (level: string) => string = (l) => l,
  colMap: (level: string) => string = (l) => l,
): TwoWayTable {
  const rowIndex = new Map(rowLevels.map((l, k) => [l, k]));
  const colIndex = new Map(colLevels.map((l, k) => [l, k]));
  const counts = rowLevels.map(() => new Array<number>(colLevels.length).fill(0));
  table.counts.forEach((row, i) => {
    const target = rowIndex.get(rowMap(table.rowLevels[i]));
    if (target === undefined) return;
    row.forEach((v, j) => {
      const col = colIndex.get(colMap(table.colLevels[j]));
      if (col !== undefined) counts[target][col] += v;
    });
  });
  return { ...table, rowLevels: [...rowLevels], colLevels: [...colLevels], counts };
}

/** Drops levels whose margin is zero (possible with zero weights). */
export function dropEmptyLevels(table: TwoWayTable): TwoWayTable {
  // "Empty" is exactly 0: a sum that overflowed (Infinity, NaN) stays, so that
  // the analysis can refuse it aloud instead of losing the level quietly.
  const rowKeep = table.rowLevels.filter((_l, i) => table.counts[i].some((v) => v !== 0));
  const colKeep = table.colLevels.filter((_l, j) => table.counts.some((row) => row[j] !== 0));
  if (rowKeep.length === table.rowLevels.length && colKeep.length === table.colLevels.length) return table;
  return relabelTable(table, rowKeep, colKeep);
}
