/**
 * A survey design as the table side sees it: what was asked for (strata,
 * clusters, fpc, or replicate weights, and how to treat them), and the
 * per-PSU (or per-replicate) cell totals counted beside a table, with the
 * cell numbering that lets levels be ordered, recoded or merged after
 * reading. The statistics (covariance, tests, intervals) are src/stats'.
 */
import type { LonelyPsuTreatment, ReplicateMethod, CellLayout } from '../stats/designCovariance.js';
import { PsuCellTotals, ReplicateCellTotals, SampleDesignIndex } from '../stats/designTally.js';
import type { TwoWayTable } from './twoWayTable.js';

/** How the replicate weight columns are named: a pattern over the header (`*` any text, `?` one character) or a list. */
export type ReplicateColumns = { kind: 'pattern'; pattern: string } | { kind: 'list'; columns: string[] };

/** The survey design of a request, parsed once from the options. */
export type SurveyDesign =
  | {
      kind: 'taylor';
      /** --strata, --cluster, --fpc: column names, or null when not given. */
      strata: string | null;
      cluster: string | null;
      fpc: string | null;
      lonelyPsu: LonelyPsuTreatment;
    }
  | {
      kind: 'replicate';
      replicateColumns: ReplicateColumns;
      method: ReplicateMethod;
      /** Fay's ρ (fay only). */
      rho: number | null;
      /** jkn's per-replicate scale factors, in the order of the replicate columns. */
      scales: number[] | null;
      /** The file the scale factors were read from (an input no output may overwrite), or null for a list. */
      scalesFile?: string | null;
      centre: 'replicate-mean' | 'full-sample';
    };

/** The options that name a column of the design, for messages. */
export function designColumns(design: SurveyDesign): { option: string; column: string }[] {
  if (design.kind === 'replicate') return [];
  return [
    ['--strata', design.strata],
    ['--cluster', design.cluster],
    ['--fpc', design.fpc],
  ]
    .filter((pair): pair is [string, string] => pair[1] !== null)
    .map(([option, column]) => ({ option, column }));
}

/** Whether a header name matches a --replicate-weights pattern (`*` any run of characters, `?` one). */
export function matchesPattern(name: string, pattern: string): boolean {
  const source = pattern.replace(/[.+^${}()|[\]\\]/g, '\\$&').replace(/\*/g, '.*').replace(/\?/g, '.');
  return new RegExp(`^${source}$`, 's').test(name);
}

/**
 * The design-based totals of one table, counted beside its cells: per PSU
 * (Taylor) or per replicate, for every cell the caller numbered, with the
 * labels of each cell so that the final table's layout can be found after
 * levels are ordered, recoded or merged (`layoutFor`).
 */
export interface DesignCells {
  design: SurveyDesign;
  /** The full-sample weight column, or null (every row weighs 1). */
  weightColumn: string | null;
  /** The replicate weight columns found in the header, in order. */
  replicateColumns: string[];
  totals: PsuCellTotals | ReplicateCellTotals;
  /** Each cell number's row and column labels; null for a number that is not a table cell (a missing value). */
  cellLabels: (cell: number) => [string, string] | null;
  /** Cell numbers run from 0 to this (exclusive). */
  cellCount: number;
}

/**
 * Where each of a DesignCells' cell numbers sits in a final table (row-major
 * r × c), or −1 when its row or column level is not in the table (a domain
 * row). `other`, after --other merged rare levels: a level the table no
 * longer names goes to the merged level when there is one.
 */
export function layoutFor(cells: DesignCells, table: Pick<TwoWayTable, 'rowLevels' | 'colLevels'>, other?: { label: string } | null): CellLayout {
  const rowIndex = new Map(table.rowLevels.map((l, k) => [l, k]));
  const colIndex = new Map(table.colLevels.map((l, k) => [l, k]));
  const find = (index: Map<string, number>, label: string): number => index.get(label) ?? (other ? (index.get(other.label) ?? -1) : -1);
  const c = table.colLevels.length;
  const position = new Int32Array(cells.cellCount).fill(-1);
  for (let cell = 0; cell < cells.cellCount; cell++) {
    const labels = cells.cellLabels(cell);
    if (labels === null) continue;
    const i = find(rowIndex, labels[0]);
    const j = find(colIndex, labels[1]);
    if (i >= 0 && j >= 0) position[cell] = i * c + j;
  }
  return { size: table.rowLevels.length * c, position };
}

/**
 * Counts the design totals of one table from value ids, as rows arrive:
 * each complete row's (row id, column id) gets a cell number on first
 * sight, and its weight (and replicate weights) go to its PSU's (or the
 * replicates') totals. Rows outside the domain are registered with the
 * index only (`locate`), so that their PSUs still count.
 */
export class DesignCounter {
  readonly index: SampleDesignIndex | null;
  readonly totals: PsuCellTotals | ReplicateCellTotals;
  /** By row id: an Int32Array by column id of cell number + 1 (0: not yet seen). */
  private readonly cellOf: Int32Array[] = [];
  private readonly rowIds: number[] = [];
  private readonly colIds: number[] = [];

  constructor(
    readonly design: SurveyDesign,
    replicates: number,
  ) {
    if (design.kind === 'taylor') {
      this.index = new SampleDesignIndex({ clustered: design.cluster !== null });
      this.totals = new PsuCellTotals(this.index);
    } else {
      this.index = null;
      this.totals = new ReplicateCellTotals(replicates);
    }
  }

  /** Registers a row of the file with the design (Taylor; every row that belongs to the sample) and returns its unit. */
  locate(stratum: string, cluster: number, fpc: number | undefined, line: number): number {
    return this.index === null ? -1 : this.index.locate(stratum, cluster, fpc, line);
  }

  private cellNumber(rowId: number, colId: number): number {
    let row = this.cellOf[rowId];
    if (row === undefined || colId >= row.length) {
      while (this.cellOf.length <= rowId) this.cellOf.push(new Int32Array(0));
      const old = this.cellOf[rowId];
      row = new Int32Array(Math.max(colId + 1, old.length * 2, 8));
      row.set(old);
      this.cellOf[rowId] = row;
    }
    const known = row[colId];
    if (known > 0) return known - 1;
    this.rowIds.push(rowId);
    this.colIds.push(colId);
    row[colId] = this.rowIds.length;
    return this.rowIds.length - 1;
  }

  /** A complete row of weight w in unit `unit` (Taylor), or with its replicate weights. */
  add(rowId: number, colId: number, unit: number, weight: number, replicateWeights: Float64Array | null): void {
    if (rowId < 0 || colId < 0) return; // past a level cap: the table refuses it when finished
    const cell = this.cellNumber(rowId, colId);
    if (this.totals instanceof PsuCellTotals) this.totals.add(unit, cell, weight);
    else this.totals.add(cell, weight, replicateWeights as Float64Array);
  }

  /** The counted totals, each cell's labels given by the caller (after any recode). */
  finish(weightColumn: string | null, replicateColumns: string[], rowLabel: (id: number) => string, colLabel: (id: number) => string): DesignCells {
    const rowIds = this.rowIds;
    const colIds = this.colIds;
    return {
      design: this.design,
      weightColumn,
      replicateColumns,
      totals: this.totals,
      cellLabels: (cell) => (cell < rowIds.length ? [rowLabel(rowIds[cell]), colLabel(colIds[cell])] : null),
      cellCount: rowIds.length,
    };
  }
}

/**
 * A scan's design, read once: the design index (Taylor) and, for each kept
 * row (the rows of the encoded columns), its unit or its replicate weights.
 * Memory: 4 bytes a row (Taylor) or 8 bytes a row and replicate.
 */
export interface RowDesign {
  design: SurveyDesign;
  index: SampleDesignIndex | null;
  /** Per kept row: its unit (SampleDesignIndex.locate). */
  units: Int32Array | null;
  /** Per kept row, R replicate weights in a row (row-major). */
  replicateWeights: Float64Array | null;
  replicateColumns: string[];
  weightColumn: string | null;
}

/**
 * The Taylor design totals of one pair from per-PSU sums on the padded grid
 * of table/countPair.ts (row and column 0 hold rows with a missing value:
 * domain rows, left out here), counted there in the same pass as the table.
 * Cells are numbered row-major over the columns' levels, (i − 1)c + (j − 1).
 */
export function taylorCellsFromPlanes(
  rowLabels: readonly string[],
  colLabels: readonly string[],
  design: RowDesign,
  unitSums: Float64Array,
  unitSquares: Float64Array | null,
  paddedCounts: ArrayLike<number>,
): DesignCells {
  const index = design.index as SampleDesignIndex;
  const width = colLabels.length;
  const height = rowLabels.length;
  const cells = height * width;
  const plane = (height + 1) * (width + 1);
  const inner = (source: ArrayLike<number>, offset: number): Float64Array => {
    const out = new Float64Array(cells);
    for (let i = 0; i < height; i++) for (let j = 0; j < width; j++) out[i * width + j] = source[offset + (i + 1) * (width + 1) + (j + 1)];
    return out;
  };
  const totals = new PsuCellTotals(index);
  for (let u = 0; u < index.unitCount; u++) {
    totals.weightTotals.push(inner(unitSums, u * plane));
    if (unitSquares !== null) totals.squareTotals.push(inner(unitSquares, u * plane));
  }
  totals.counts = inner(paddedCounts, 0);
  totals.cellCapacity = cells;
  return gridDesignCells(design, totals, rowLabels, colLabels);
}

/** The design cells of a row-major rows × columns grid: cell (i − 1)c + (j − 1) is labelled by row i and column j. */
export function gridDesignCells(design: RowDesign, totals: PsuCellTotals | ReplicateCellTotals, rowLabels: readonly string[], colLabels: readonly string[]): DesignCells {
  const width = colLabels.length;
  const cells = rowLabels.length * width;
  return {
    design: design.design,
    weightColumn: design.weightColumn,
    replicateColumns: design.replicateColumns,
    totals,
    cellLabels: (cell) => (cell < cells ? [rowLabels[Math.floor(cell / width)], colLabels[cell % width]] : null),
    cellCount: cells,
  };
}

/**
 * The replicate-weight totals of one pair of coded columns (codes 1.. per
 * level, 0 missing): for every cell, the sum of each replicate weight and of
 * the full-sample weight over the complete rows, one pass over the rows.
 * Cells are numbered row-major, (i − 1)c + (j − 1); rows with a missing
 * value add nothing. Memory (R + 1) × cells; time rows × R.
 */
export function replicateCellsOfPair(rowLabels: readonly string[], colLabels: readonly string[], rowCodes: ArrayLike<number>, colCodes: ArrayLike<number>, design: RowDesign, weights: Float64Array | null): DesignCells {
  const width = colLabels.length;
  const cells = rowLabels.length * width;
  const rows = rowCodes.length;
  const counts = new Float64Array(cells);
  const R = design.replicateColumns.length;
  const replicateWeights = design.replicateWeights as Float64Array;
  const totals = new ReplicateCellTotals(R);
  const sums = Array.from({ length: R + 1 }, () => new Float64Array(cells));
  for (let k = 0; k < rows; k++) {
    const a = rowCodes[k];
    const b = colCodes[k];
    if (a === 0 || b === 0) continue;
    const cell = (a - 1) * width + (b - 1);
    const base = k * R;
    for (let r = 0; r < R; r++) sums[r][cell] += replicateWeights[base + r];
    sums[R][cell] += weights === null ? 1 : weights[k];
    counts[cell]++;
  }
  totals.totals = sums;
  totals.counts = counts;
  totals.cellCapacity = cells;
  return gridDesignCells(design, totals, rowLabels, colLabels);
}
