/**
 * A counted table: the table of two columns, how its rows were weighted,
 * one table per layer (--by), and the rows left out for a missing value;
 * what every way of counting delivers (io/countTable.ts from a file,
 * countPair.ts from coded columns). Also the --other merge of rare levels.
 */
import type { OrderedColumn } from './orderedColumn.js';
import type { DesignCells } from './surveyDesign.js';
import { relabelTable, TwoWayTable } from './twoWayTable.js';
import type { Weighting } from './weighting.js';

/**
 * Rows left out of a table for a missing value, by column and reason: the
 * reason is "empty" (an empty field, or a value named by --missing) or a
 * codebook missing code's reason. A row missing in two columns counts under
 * both, so the entries can add up to more than the rows left out.
 */
export interface ExcludedBy {
  column: string;
  reason: string;
  rows: number;
}

/** The table of one level of the layer (--by). */
export interface Stratum {
  level: string;
  table: TwoWayTable;
  weighting: Weighting;
  /** Rows of this level left out for a missing value of the table (counted by io/countTable.ts; absent where not counted). */
  excluded?: number;
  /** With a survey design: this level's design totals (each level its own sample). */
  design?: DesignCells | null;
  /** The same rows by column and reason (io/countTable.ts; absent where not counted). */
  excludedBy?: ExcludedBy[];
}

export interface CountedTable {
  table: TwoWayTable;
  weighting: Weighting;
  /** One table per layer level, natural order; null without a layer. */
  strata: Stratum[] | null;
  /** Rows left out for a missing value in a column of the table (or of the layer). */
  excluded: number;
  /** With a survey design (and no layer): the design totals counted beside the table. */
  design?: DesignCells | null;
}

/** Counts one pair's table (and its layers) from two columns in report order. */
export type CountPair = (rows: OrderedColumn, cols: OrderedColumn, layer: OrderedColumn | null) => CountedTable;

interface RareLevelMerge {
  rowLevels: string[];
  colLevels: string[];
  rowMap: (level: string) => string;
  colMap: (level: string) => string;
}

/**
 * Keeps the k most frequent levels of each side (by table margin; ties keep
 * the earlier level) and maps the rest to one level named `label`, placed
 * last. A side with at most k + 1 levels is left as it is.
 */
function rareLevelMerge(table: TwoWayTable, k: number, label: string): RareLevelMerge {
  const side = (levels: string[], totals: number[]) => {
    if (levels.length <= k + 1) return { levels: [...levels], map: (l: string) => l };
    const ranked = levels.map((_l, i) => i).sort((a, b) => totals[b] - totals[a] || a - b);
    const kept = new Set(ranked.slice(0, k).map((i) => levels[i]));
    const map = (l: string) => (kept.has(l) ? l : label);
    const order = [...new Set(levels.map(map))].filter((l) => l !== label);
    return { levels: [...order, label], map };
  };
  const rows = side(table.rowLevels, table.counts.map((row) => row.reduce((s, v) => s + v, 0)));
  const cols = side(table.colLevels, table.colLevels.map((_l, j) => table.counts.reduce((s, row) => s + row[j], 0)));
  return { rowLevels: rows.levels, colLevels: cols.levels, rowMap: rows.map, colMap: cols.map };
}

/**
 * --other k: keeps the k most frequent levels of each side of the pooled
 * table and merges the rest into one level, `label`, placed last; each
 * layer's table (in whatever level layout it comes) is laid out on the
 * merged levels.
 */
export function mergeRareLevels(table: TwoWayTable, strata: readonly Stratum[] | null, k: number, label: string): { table: TwoWayTable; strata: Stratum[] | null } {
  const merge = rareLevelMerge(table, k, label);
  const relabel = (t: TwoWayTable) => relabelTable(t, merge.rowLevels, merge.colLevels, merge.rowMap, merge.colMap);
  return { table: relabel(table), strata: strata?.map((s) => ({ ...s, table: relabel(s.table) })) ?? null };
}
