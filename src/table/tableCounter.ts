/**
 * Counting a table from a stream of value ids (the built-in reader's rows,
 * or the engine's groups): level slots per side under the level cap, cells
 * (compensated when weighted), and the sums of the weighting.
 */
import { dataError } from '../errors.js';
import { checkTableSize } from './limits.js';
import { addCompensated, CompensatedSum } from '../numerics/compensatedSum.js';
import { orderLevels, TwoWayTable } from './twoWayTable.js';
import type { Weighting } from './weighting.js';

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
 * Counts the pairs (row value, column value) of complete rows into a table,
 * with the sums the weighting needs (Σw, Σw², rows). Values arrive as the
 * reader's ids; levels enter only through complete rows. A side past the
 * level cap stops being counted but keeps a record of its distinct values,
 * so that the refusal can say how many there are.
 */
export class TableCounter {
  private readonly rowSide: SideLevels;
  private readonly colSide: SideLevels;
  private readonly cells: number[][] = [];
  /** With weights: the rounding errors of each cell's sum (numerics/compensatedSum.ts). */
  private readonly errors: number[][] = [];
  private readonly sumWeights = new CompensatedSum();
  private readonly sumSquaredWeights = new CompensatedSum();
  /** Data rows counted. */
  private rows = 0;

  constructor(
    readonly rowName: string,
    readonly colName: string,
    private readonly maxLevels: number,
    /** Weighted sums are carried as hi + lo, so that they do not depend on row order. */
    private readonly compensated = false,
    /**
     * Raw values a side may hold while counting, when its values are relabelled
     * (recode, cuts, codebook) so that the level cap applies to the labels.
     */
    readingCaps: { rows: number; cols: number } = { rows: maxLevels, cols: maxLevels },
    /** False when the caller merges levels afterwards (--other) and checks the cap itself. */
    private readonly capLabels = true,
  ) {
    this.rowSide = new SideLevels(readingCaps.rows);
    this.colSide = new SideLevels(readingCaps.cols);
  }

  /**
   * Adds `rows` rows of one combination of values: their total weight
   * w + wLow goes to the cell, and w, w² (q + qLow) to the table's sums.
   */
  add(rowId: number, colId: number, rows: number, w: number, wLow: number, q: number, qLow: number): void {
    this.addToCell(rowId, colId, w, wLow);
    this.sumWeights.addPair(w, wLow);
    this.sumSquaredWeights.addPair(q, qLow);
    this.rows += rows;
  }

  /** How the counted rows were weighted. */
  weighting(kind: Weighting['kind']): Weighting {
    return { kind, sumWeights: this.sumWeights.value, sumSquaredWeights: this.sumSquaredWeights.value, unweightedN: this.rows };
  }

  private addToCell(rowId: number, colId: number, weight: number, weightLow: number): void {
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

  private checkCap(name: string, side: SideLevels, labels?: number): void {
    if (labels !== undefined && labels > this.maxLevels) {
      throw dataError(`column "${name}" has ${labels.toLocaleString('en-US')} levels after its labels, recodes or cuts, more than --max-levels ${this.maxLevels}; raise --max-levels, or merge levels with --recode`);
    }
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
    this.checkCap(this.rowName, this.rowSide, this.capLabels ? rows.order.length : undefined);
    this.checkCap(this.colName, this.colSide, this.capLabels ? cols.order.length : undefined);
    checkTableSize(this.rowName, rows.order.length, this.colName, cols.order.length);
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
