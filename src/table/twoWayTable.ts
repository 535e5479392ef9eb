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

/** Distinct values tracked per side beyond the level cap, to say how many a column has. */
const DISTINCT_TRACKING_LIMIT = 1_000_000;

/**
 * Counts the pairs (row value, column value) of complete rows into a table.
 * Levels enter only through complete rows. A side that passes the level cap
 * stops being counted but keeps a tally of its distinct values, so that the
 * refusal can say how many there are.
 */
export class TableCounter {
  private readonly rowCodes = new Map<string, number>();
  private readonly colCodes = new Map<string, number>();
  private readonly cells: number[][] = [];
  private rowOverflow: Set<string> | null = null;
  private colOverflow: Set<string> | null = null;

  constructor(
    readonly rowName: string,
    readonly colName: string,
    private readonly maxLevels: number,
  ) {}

  add(rowValue: string, colValue: string, weight = 1): void {
    let r = this.rowCodes.get(rowValue);
    if (r === undefined) {
      if (this.rowCodes.size >= this.maxLevels) {
        this.rowOverflow ??= new Set();
        if (this.rowOverflow.size < DISTINCT_TRACKING_LIMIT) this.rowOverflow.add(rowValue);
        return;
      }
      r = this.rowCodes.size;
      this.rowCodes.set(rowValue, r);
      this.cells.push(new Array<number>(this.colCodes.size).fill(0));
    }
    let c = this.colCodes.get(colValue);
    if (c === undefined) {
      if (this.colCodes.size >= this.maxLevels) {
        this.colOverflow ??= new Set();
        if (this.colOverflow.size < DISTINCT_TRACKING_LIMIT) this.colOverflow.add(colValue);
        return;
      }
      c = this.colCodes.size;
      this.colCodes.set(colValue, c);
      for (const row of this.cells) row.push(0);
    }
    this.cells[r][c] += weight;
  }

  private checkCap(name: string, codes: Map<string, number>, overflow: Set<string> | null): void {
    if (overflow === null) return;
    const total = codes.size + overflow.size;
    const count = overflow.size >= DISTINCT_TRACKING_LIMIT ? `more than ${DISTINCT_TRACKING_LIMIT.toLocaleString('en-US')}` : total.toLocaleString('en-US');
    throw dataError(
      `column "${name}" has ${count} distinct values, more than --max-levels ${this.maxLevels}; raise --max-levels or merge levels`,
    );
  }

  /** The finished table, in the requested or natural level order. */
  finish(rowOrder?: readonly string[], colOrder?: readonly string[]): { table: TwoWayTable; unknownRowLevels: string[]; unknownColLevels: string[] } {
    this.checkCap(this.rowName, this.rowCodes, this.rowOverflow);
    this.checkCap(this.colName, this.colCodes, this.colOverflow);
    const rows = orderLevels([...this.rowCodes.keys()], rowOrder);
    const cols = orderLevels([...this.colCodes.keys()], colOrder);
    const counts = rows.order.map((rl) => {
      const source = this.cells[this.rowCodes.get(rl) as number];
      return cols.order.map((cl) => source[this.colCodes.get(cl) as number] ?? 0);
    });
    return {
      table: { rowName: this.rowName, colName: this.colName, rowLevels: rows.order, colLevels: cols.order, counts },
      unknownRowLevels: rows.unknown,
      unknownColLevels: cols.unknown,
    };
  }
}
