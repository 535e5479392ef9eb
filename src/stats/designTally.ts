/**
 * Accumulators for design-based estimation, fed one row at a time, per
 * stratum and primary sampling unit.
 */
import { dataError } from '../errors.js';

/**
 * Accumulators for design-based estimation, fed one row at a time, whose
 * memory grows with the number of primary sampling units (PSUs) times the
 * number of table cells, never with the number of rows.
 *
 * Two parts, so that a scan of many column pairs can share the first:
 *
 *  - `SampleDesignIndex` (one per read): maps each row's (stratum, cluster)
 *    to a PSU number, counts the PSUs of every stratum in the whole file
 *    (rows outside the analysed domain included: n_h is the file's), and
 *    checks that the finite-population value is constant within a stratum.
 *    Without clusters every row is its own PSU and the index counts rows per
 *    stratum instead.
 *  - `PsuCellTotals` (one per table): the weighted total of every cell in
 *    every PSU, the only per-PSU quantities the linearised variance of the
 *    cell proportions needs (design-based-tests conventions §2:
 *    t_hc = Σ_{i in PSU hc} w_i (y_i − p) / Σw = (T_hc − p W_hc) / W, with
 *    T_hc the PSU's weighted cell totals and W_hc their sum). Without clusters
 *    it keeps, per stratum and cell, Σw, Σw² and the row count, from which
 *    the same variance follows exactly (see designCovariance.ts).
 *
 * `DesignTally` bundles one of each for a single table and takes plain rows.
 * Cell numbers are the caller's: any non-negative integer per table cell,
 * mapped to table positions when the covariance is computed, so levels may be
 * discovered, reordered or merged after reading; a row outside the domain
 * (missing in the pair, filtered out) is registered with the index but adds
 * nothing to the totals.
 */

export type DesignKey = string | number;

interface StratumEntry {
  label: string;
  /** cluster id → PSU number (cluster mode) */
  clusters: Map<DesignKey, number>;
  /** rows seen (row mode: the stratum's PSUs) */
  rows: number;
  fpc: number | null;
  fpcLine: number | null;
}

export interface StratumSummary {
  label: string;
  /** n_h: PSUs of the stratum in the whole file (rows, without clusters). */
  psus: number;
  /** The --fpc value of the stratum (population PSUs if > 1, sampling fraction if ≤ 1), or null. */
  fpc: number | null;
}

export class SampleDesignIndex {
  readonly clustered: boolean;
  private readonly strata = new Map<DesignKey, number>();
  private readonly entries: StratumEntry[] = [];
  /** stratum number of every PSU (cluster mode) */
  private psuStratum: number[] = [];
  private rowCount = 0;

  /** clustered = false: every row is its own PSU (no cluster column). */
  constructor(options: { clustered: boolean }) {
    this.clustered = options.clustered;
  }

  /**
   * Registers one row of the file and returns its unit number for
   * `PsuCellTotals.add`: the PSU number with clusters, the stratum number
   * without. `stratum` is any constant (e.g. 0) when there is no stratum
   * column; `fpc` is the row's finite-population value or undefined;
   * `line` names the row in an error message.
   */
  locate(stratum: DesignKey, cluster: DesignKey | undefined, fpc?: number, line?: number): number {
    this.rowCount++;
    let s = this.strata.get(stratum);
    if (s === undefined) {
      s = this.entries.length;
      this.strata.set(stratum, s);
      this.entries.push({ label: String(stratum), clusters: new Map(), rows: 0, fpc: null, fpcLine: null });
    }
    const entry = this.entries[s];
    entry.rows++;
    if (fpc !== undefined) this.noteFpc(entry, fpc, line);
    if (!this.clustered) return s;
    const key = cluster ?? '';
    let psu = entry.clusters.get(key);
    if (psu === undefined) {
      psu = this.psuStratum.length;
      entry.clusters.set(key, psu);
      this.psuStratum.push(s);
    }
    return psu;
  }

  private noteFpc(entry: StratumEntry, fpc: number, line?: number): void {
    if (!(fpc >= 0) || !Number.isFinite(fpc)) {
      throw dataError(`--fpc value ${fpc}${line !== undefined ? ` on line ${line}` : ''} in stratum "${entry.label}" is not a non-negative number`);
    }
    if (entry.fpc === null) {
      entry.fpc = fpc;
      entry.fpcLine = line ?? null;
    } else if (entry.fpc !== fpc) {
      const where = line !== undefined ? ` on line ${line}` : '';
      const first = entry.fpcLine !== null ? ` on line ${entry.fpcLine}` : '';
      throw dataError(`--fpc is not constant within stratum "${entry.label}": ${fpc}${where}, ${entry.fpc}${first}`);
    }
  }

  get stratumCount(): number {
    return this.entries.length;
  }

  /** Number of PSUs in the file (rows, without clusters). */
  get psuCount(): number {
    return this.clustered ? this.psuStratum.length : this.rowCount;
  }

  get rows(): number {
    return this.rowCount;
  }

  /** Units that `locate` returns: PSUs with clusters, strata without. */
  get unitCount(): number {
    return this.clustered ? this.psuStratum.length : this.entries.length;
  }

  stratumOfPsu(psu: number): number {
    return this.psuStratum[psu];
  }

  strataSummary(): StratumSummary[] {
    return this.entries.map((e) => ({ label: e.label, psus: this.clustered ? e.clusters.size : e.rows, fpc: e.fpc }));
  }
}

/** Grows a Float64Array to hold index i (doubling), keeping its contents. */
function ensure(array: Float64Array, i: number): Float64Array {
  if (i < array.length) return array;
  const grown = new Float64Array(Math.max(i + 1, array.length * 2, 4));
  grown.set(array);
  return grown;
}

const EMPTY = new Float64Array(0);

/**
 * Weighted cell totals per PSU (with clusters) or Σw, Σw², row counts per
 * stratum and cell (without), plus the unweighted count of every cell.
 * Memory: units × cells.
 */
export class PsuCellTotals {
  readonly index: SampleDesignIndex;
  /** per unit: Σw by cell */
  weightTotals: Float64Array[] = [];
  /** per unit (row mode only): Σw² by cell */
  squareTotals: Float64Array[] = [];
  /** unweighted rows by cell, all units */
  counts: Float64Array = new Float64Array(0);
  cellCapacity = 0;

  constructor(index: SampleDesignIndex) {
    this.index = index;
  }

  /**
   * Adds a complete row (both variables present and in the domain) of cell
   * `cell` and weight `weight` to the unit `unit` that `index.locate`
   * returned for it. Rows outside the domain are simply not added.
   */
  add(unit: number, cell: number, weight: number): void {
    while (this.weightTotals.length <= unit) {
      this.weightTotals.push(EMPTY);
      if (!this.index.clustered) this.squareTotals.push(EMPTY);
    }
    const totals = (this.weightTotals[unit] = ensure(this.weightTotals[unit], cell));
    totals[cell] += weight;
    if (!this.index.clustered) {
      const squares = (this.squareTotals[unit] = ensure(this.squareTotals[unit], cell));
      squares[cell] += weight * weight;
    }
    this.counts = ensure(this.counts, cell);
    this.counts[cell] += 1;
    if (cell >= this.cellCapacity) this.cellCapacity = cell + 1;
  }
}

/** One design row for `DesignTally.add`. */
export interface DesignRow {
  /** the table cell (a non-negative integer), or −1 for a row outside the domain */
  cell: number;
  weight: number;
  stratum?: DesignKey;
  cluster?: DesignKey;
  fpc?: number;
  line?: number;
}

/**
 * A `SampleDesignIndex` and one `PsuCellTotals`, for a single table: the
 * reader feeds it row by row, tests feed it arrays.
 * @example
 *   const tally = new DesignTally({ clustered: true });
 *   tally.add({ cell: 0, weight: 2.5, stratum: 'north', cluster: 17 });
 *   tally.add({ cell: -1, weight: 1.0, stratum: 'north', cluster: 18 }); // domain row: PSU 18 still counts
 */
export class DesignTally {
  readonly index: SampleDesignIndex;
  readonly totals: PsuCellTotals;

  constructor(options: { clustered: boolean }) {
    this.index = new SampleDesignIndex(options);
    this.totals = new PsuCellTotals(this.index);
  }

  add(row: DesignRow): void {
    const unit = this.index.locate(row.stratum ?? '', row.cluster, row.fpc, row.line);
    if (row.cell >= 0) this.totals.add(unit, row.cell, row.weight);
  }

  /**
   * Adds parallel arrays of rows (absent arrays: one stratum; no clusters in row mode). Error
   * messages count a header line: element 0 is line 2.
   */
  addRows(rows: { cell: ArrayLike<number>; weight: ArrayLike<number>; stratum?: ArrayLike<DesignKey>; cluster?: ArrayLike<DesignKey>; fpc?: ArrayLike<number> }): void {
    for (let i = 0; i < rows.cell.length; i++) {
      this.add({ cell: rows.cell[i], weight: rows.weight[i], stratum: rows.stratum?.[i], cluster: rows.cluster?.[i], fpc: rows.fpc?.[i], line: i + 2 });
    }
  }
}

/**
 * Replicate-weight totals for one table: for the full-sample weight and for
 * each of R replicate weight columns, the weighted total of every cell over
 * the complete rows, plus unweighted cell counts. Memory (R + 1) × cells.
 */
export class ReplicateCellTotals {
  readonly replicates: number;
  /** [replicate][cell], replicate R is the full-sample weight */
  totals: Float64Array[];
  counts: Float64Array = new Float64Array(0);
  cellCapacity = 0;
  rowsOutsideDomain = 0;

  constructor(replicates: number) {
    this.replicates = replicates;
    this.totals = Array.from({ length: replicates + 1 }, () => EMPTY);
  }

  /** A complete row: its cell, full-sample weight and its R replicate weights. */
  add(cell: number, weight: number, replicateWeights: ArrayLike<number>): void {
    if (cell < 0) {
      this.rowsOutsideDomain++;
      return;
    }
    if (replicateWeights.length !== this.replicates) {
      throw new Error(`ReplicateCellTotals.add: ${replicateWeights.length} replicate weights, expected ${this.replicates}`);
    }
    if (cell >= this.cellCapacity) {
      this.cellCapacity = cell + 1;
      for (let r = 0; r <= this.replicates; r++) this.totals[r] = ensure(this.totals[r], cell);
      this.counts = ensure(this.counts, cell);
    }
    for (let r = 0; r < this.replicates; r++) this.totals[r][cell] += replicateWeights[r];
    this.totals[this.replicates][cell] += weight;
    this.counts[cell] += 1;
  }
}
