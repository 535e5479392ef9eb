import { dataError } from '../errors.js';
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

  constructor(
    readonly rowName: string,
    readonly colName: string,
    private readonly maxLevels: number,
  ) {
    this.rowSide = new SideLevels(maxLevels);
    this.colSide = new SideLevels(maxLevels);
  }

  add(rowId: number, colId: number, weight = 1): void {
    const r = this.rowSide.slotOf(rowId);
    const c = this.colSide.slotOf(colId);
    if (r < 0 || c < 0) return;
    while (this.cells.length <= r) this.cells.push([]);
    const row = this.cells[r];
    while (row.length <= c) row.push(0);
    row[c] += weight;
  }

  private checkCap(name: string, side: SideLevels): void {
    if (!side.overCap) return;
    throw dataError(
      `column "${name}" has ${side.distinctDescription()} distinct values, more than --max-levels ${this.maxLevels}; raise --max-levels or merge levels`,
    );
  }

  /** The finished table with labels from the reader, in the requested or natural level order. */
  finish(
    rowLabels: readonly string[],
    colLabels: readonly string[],
    rowOrder?: readonly string[],
    colOrder?: readonly string[],
  ): { table: TwoWayTable; unknownRowLevels: string[]; unknownColLevels: string[] } {
    this.checkCap(this.rowName, this.rowSide);
    this.checkCap(this.colName, this.colSide);
    const rowLevelNames = this.rowSide.ids.map((id) => rowLabels[id - 1]);
    const colLevelNames = this.colSide.ids.map((id) => colLabels[id - 1]);
    const rowSlot = new Map(rowLevelNames.map((l, k) => [l, k]));
    const colSlot = new Map(colLevelNames.map((l, k) => [l, k]));
    const rows = orderLevels(rowLevelNames, rowOrder);
    const cols = orderLevels(colLevelNames, colOrder);
    const counts = rows.order.map((rl) => {
      const source = this.cells[rowSlot.get(rl) as number] ?? [];
      return cols.order.map((cl) => source[colSlot.get(cl) as number] ?? 0);
    });
    return {
      table: { rowName: this.rowName, colName: this.colName, rowLevels: rows.order, colLevels: cols.order, counts },
      unknownRowLevels: rows.unknown,
      unknownColLevels: cols.unknown,
    };
  }
}
