import { dataError } from '../errors.js';
import { addCompensated } from './compensatedSum.js';
import { compareNatural } from './naturalOrder.js';

/** A two-way table of counts (integer or weighted) with its level labels, in report order. */
export interface TwoWayTable {
  rowName: string;
  colName: string;
  rowLevels: string[];
  colLevels: string[];
  counts: number[][];
}

export interface LevelOrderNote {
  /** Levels named in an order option that never occur in the table. */
  unknown: string[];
}

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

/** One side of a table being counted: value ids (from the reader) to level slots. */
class SideLevels {
  private local = new Int32Array(64).fill(-1);
  /** ids[k] is the value id of level slot k. */
  readonly ids: number[] = [];
  /** Distinct ids seen past the level cap. */
  private readonly beyondCap = new Set<number>();
  /** Values the reader itself refused (past its distinct limit). */
  readerOverflow = false;

  constructor(private readonly cap: number) {}

  /** The level slot of an id, −1 when the side is past its cap. */
  slotOf(id: number): number {
    if (id < 0) {
      this.readerOverflow = true;
      return -1;
    }
    if (id >= this.local.length) {
      const grown = new Int32Array(Math.max(this.local.length * 2, id + 1)).fill(-1);
      grown.set(this.local);
      this.local = grown;
    }
    const known = this.local[id];
    if (known >= 0) return known;
    if (this.ids.length >= this.cap) {
      this.beyondCap.add(id);
      return -1;
    }
    this.local[id] = this.ids.length;
    this.ids.push(id);
    return this.ids.length - 1;
  }

  get overCap(): boolean {
    return this.beyondCap.size > 0 || this.readerOverflow;
  }

  distinctDescription(): string {
    const total = this.ids.length + this.beyondCap.size;
    return this.readerOverflow ? `more than ${total.toLocaleString('en-US')}` : total.toLocaleString('en-US');
  }
}

/**
 * Counts the pairs (row value, column value) of complete rows into a table.
 * Values arrive as the reader's ids; levels enter only through complete rows.
 * A side past the level cap stops being counted but keeps a tally of its
 * distinct values, so that the refusal can say how many there are.
 */
export class TableCounter {
  private readonly rowSide: SideLevels;
  private readonly colSide: SideLevels;
  private readonly cells: number[][] = [];
  /** With weights: the rounding errors of each cell's sum (compensatedSum.ts). */
  private readonly errors: number[][] = [];

  constructor(
    readonly rowName: string,
    readonly colName: string,
    private readonly maxLevels: number,
    /** Weighted sums are carried as hi + lo, so that they do not depend on row order. */
    private readonly compensated = false,
  ) {
    this.rowSide = new SideLevels(maxLevels);
    this.colSide = new SideLevels(maxLevels);
  }

  /** Adds a row (or a group of rows) of total weight `weight` + `weightLow` to a cell. */
  add(rowId: number, colId: number, weight = 1, weightLow = 0): void {
    const r = this.rowSide.slotOf(rowId);
    const c = this.colSide.slotOf(colId);
    if (r < 0 || c < 0) return;
    while (this.cells.length <= r) this.cells.push([]);
    const row = this.cells[r];
    while (row.length <= c) row.push(0);
    if (!this.compensated) {
      row[c] += weight;
      return;
    }
    while (this.errors.length <= r) this.errors.push([]);
    const low = this.errors[r];
    while (low.length <= c) low.push(0);
    addCompensated(row, low, c, weight);
    low[c] += weightLow;
  }

  private checkCap(name: string, side: SideLevels): void {
    if (!side.overCap) return;
    throw dataError(
      `column "${name}" has ${side.distinctDescription()} distinct values, more than --max-levels ${this.maxLevels}; raise --max-levels, merge levels with --recode, or keep the most frequent with --other k`,
    );
  }

  /**
   * The finished table, labels given by the caller for each value id (after
   * any recode, so that levels recoded to the same label are merged), in the
   * requested or natural level order.
   */
  finish(
    rowLabelOf: (id: number) => string,
    colLabelOf: (id: number) => string,
    rowOrder?: readonly string[],
    colOrder?: readonly string[],
  ): { table: TwoWayTable; unknownRowLevels: string[]; unknownColLevels: string[] } {
    this.checkCap(this.rowName, this.rowSide);
    this.checkCap(this.colName, this.colSide);
    const rowNames = this.rowSide.ids.map(rowLabelOf);
    const colNames = this.colSide.ids.map(colLabelOf);
    const rows = orderLevels([...new Set(rowNames)], rowOrder);
    const cols = orderLevels([...new Set(colNames)], colOrder);
    const rowIndex = new Map(rows.order.map((l, k) => [l, k]));
    const colIndex = new Map(cols.order.map((l, k) => [l, k]));
    const counts = rows.order.map(() => new Array<number>(cols.order.length).fill(0));
    const low = rows.order.map(() => new Array<number>(cols.order.length).fill(0));
    this.cells.forEach((row, r) => {
      const i = rowIndex.get(rowNames[r]) as number;
      row.forEach((v, c) => {
        const j = colIndex.get(colNames[c]) as number;
        if (!this.compensated) counts[i][j] += v;
        else {
          // Ids recoded to one level merge in order of first appearance; compensated, that order does not show.
          addCompensated(counts[i], low[i], j, v);
          low[i][j] += this.errors[r]?.[c] ?? 0;
        }
      });
    });
    if (this.compensated) counts.forEach((row, i) => row.forEach((v, j) => (row[j] = v + low[i][j])));
    return {
      table: { rowName: this.rowName, colName: this.colName, rowLevels: rows.order, colLevels: cols.order, counts },
      unknownRowLevels: rows.unknown,
      unknownColLevels: cols.unknown,
    };
  }
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
  const rowKeep = table.rowLevels.filter((_l, i) => table.counts[i].some((v) => v > 0));
  const colKeep = table.colLevels.filter((_l, j) => table.counts.some((row) => row[j] > 0));
  if (rowKeep.length === table.rowLevels.length && colKeep.length === table.colLevels.length) return table;
  return relabelTable(table, rowKeep, colKeep);
}

export interface RareLevelMerge {
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
export function rareLevelMerge(table: TwoWayTable, k: number, label: string): RareLevelMerge {
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
