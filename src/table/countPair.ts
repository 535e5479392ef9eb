/**
 * Counting the table of two columns in report order (and its layers) from
 * their codes: the scan's way, for codes per row (the built-in reader) or
 * per entry with grouped counts and exact weight sums (the engine).
 */
import { addCompensated, CompensatedSum } from '../numerics/compensatedSum.js';
import type { CountedTable } from './countedTable.js';
import { compareNatural } from './naturalOrder.js';
import type { OrderedColumn } from './orderedColumn.js';
import { TwoWayTable } from './twoWayTable.js';
import { countGrid } from './pairGrid.js';
import { Weighting } from './weighting.js';
import { replicateCellsOfPair, taylorCellsFromPlanes, type DesignCells, type RowDesign } from './surveyDesign.js';

export interface CountPairOptions {
  /** Per-row weights (sampling weights or frequencies). */
  weights?: { values: Float64Array; kind: 'weight' | 'freq'; grouped?: GroupedWeights };
  /** A layer: one table per level of this column. */
  strata?: OrderedColumn;
  /**
   * Entries that stand for several rows each (an engine's grouped counts):
   * the number of rows of each entry. Without it every entry is one row.
   */
  rowsPerEntry?: Float64Array;
  /** A survey design read with the rows (one unit or set of replicate weights per row): its totals are counted too. */
  design?: RowDesign;
  /** The unweighted counts of the padded grid (table/pairGrid.ts), counted already; only without weights, layers, grouped entries or a design. */
  grid?: Uint32Array;
}

/** Exact group sums from an engine, as hi + lo pairs: Σw in values/low, Σw² in squares/squaresLow. */
export interface GroupedWeights {
  low: Float64Array;
  squares: Float64Array;
  squaresLow: Float64Array;
}

/**
 * Counts the table of two coded columns over their complete rows (and, with
 * a layer, one table per layer level) in one pass of increments on a padded
 * grid: code 0 (missing) lands in row 0 / column 0 / layer 0, so the loop has
 * no branch and the padding is the excluded count. Levels that occur only
 * beside a missing value are dropped.
 */
export function countPair(rowColumn: OrderedColumn, colColumn: OrderedColumn, options: CountPairOptions = {}): CountedTable {
  const a = rowColumn.codes;
  const b = colColumn.codes;
  const width = colColumn.labels.length + 1;
  const height = rowColumn.labels.length + 1;
  const plane = width * height;
  const layers = options.strata ? options.strata.labels.length + 1 : 1;
  const layerCodes = options.strata?.codes;
  const rows = a.length;
  const rowsPer = options.rowsPerEntry;
  const grouped = options.weights?.grouped;
  // Unweighted counts are whole numbers: integer increments are cheaper than float ones.
  const counts: Float64Array | Uint32Array = options.weights || rowsPer ? new Float64Array(layers * plane) : new Uint32Array(layers * plane);
  const weights = options.weights?.values;
  // Weighted sums are carried as hi + lo (compensatedSum.ts), so that they do not depend on row order.
  const sums = new Float64Array(weights ? layers * plane : 0);
  const sumsLow = new Float64Array(weights ? layers * plane : 0);
  const squares = new Float64Array(weights ? layers * plane : 0);
  const squaresLow = new Float64Array(weights ? layers * plane : 0);
  // A Taylor design without a layer: its per-PSU totals are counted in the same pass, on the same padded grid.
  const taylor = options.design?.index && !layerCodes && !rowsPer ? options.design : null;
  let designCells: DesignCells | null = null;
  if (taylor) {
    const index = taylor.index!;
    const units = taylor.units as Int32Array;
    const unitSums = new Float64Array(index.unitCount * plane);
    const unitSquares = index.clustered ? null : new Float64Array(index.unitCount * plane);
    for (let k = 0; k < rows; k++) {
      const at = a[k] * width + b[k];
      const w = weights ? weights[k] : 1;
      counts[at]++;
      if (weights) {
        addCompensated(sums, sumsLow, at, w);
        addCompensated(squares, squaresLow, at, w * w);
      }
      const u = units[k] * plane + at;
      unitSums[u] += w;
      if (unitSquares !== null) unitSquares[u] += w * w;
    }
    designCells = taylorCellsFromPlanes(rowColumn.labels, colColumn.labels, taylor, unitSums, unitSquares, counts);
  } else if (rowsPer) {
    for (let k = 0; k < rows; k++) {
      const at = (layerCodes ? layerCodes[k] * plane : 0) + a[k] * width + b[k];
      counts[at] += rowsPer[k];
      if (weights && grouped) {
        addCompensated(sums, sumsLow, at, weights[k]);
        sumsLow[at] += grouped.low[k];
        addCompensated(squares, squaresLow, at, grouped.squares[k]);
        squaresLow[at] += grouped.squaresLow[k];
      }
    }
  } else if (weights && layerCodes) {
    for (let k = 0; k < rows; k++) {
      const at = layerCodes[k] * plane + a[k] * width + b[k];
      const w = weights[k];
      counts[at]++;
      addCompensated(sums, sumsLow, at, w);
      addCompensated(squares, squaresLow, at, w * w);
    }
  } else if (weights) {
    for (let k = 0; k < rows; k++) {
      const at = a[k] * width + b[k];
      const w = weights[k];
      counts[at]++;
      addCompensated(sums, sumsLow, at, w);
      addCompensated(squares, squaresLow, at, w * w);
    }
  } else if (layerCodes) {
    for (let k = 0; k < rows; k++) counts[layerCodes[k] * plane + a[k] * width + b[k]]++;
  } else {
    // Counted here, or already (by another thread: io/pairWorkers.ts).
    (counts as Uint32Array).set(options.grid ?? countGrid(a, b, width, plane));
  }
  const firstLayer = layerCodes ? 1 : 0;
  // Pooled over the (non-missing) layers.
  const pooledCounts = new Float64Array(plane);
  const pooledSums = weights ? new Float64Array(plane) : pooledCounts;
  const pooledSumsLow = new Float64Array(weights ? plane : 0);
  const pooledSquares = weights ? new Float64Array(plane) : pooledCounts;
  const pooledSquaresLow = new Float64Array(weights ? plane : 0);
  for (let s = firstLayer; s < layers; s++) {
    for (let i = 0; i < plane; i++) {
      pooledCounts[i] += counts[s * plane + i];
      if (weights) {
        addCompensated(pooledSums, pooledSumsLow, i, sums[s * plane + i]);
        pooledSumsLow[i] += sumsLow[s * plane + i];
        addCompensated(pooledSquares, pooledSquaresLow, i, squares[s * plane + i]);
        pooledSquaresLow[i] += squaresLow[s * plane + i];
      }
    }
  }
  const totalRows = rowsPer ? rowsPer.reduce((t, v) => t + v, 0) : rows;
  let excluded = totalRows;
  for (let i = 1; i < height; i++) for (let j = 1; j < width; j++) excluded -= pooledCounts[i * width + j];
  if (options.weights?.kind === 'freq') {
    // With frequencies a line left out stands for as many rows as its frequency says (as pair counts it): every line's sum less the kept cells'.
    let all = 0;
    for (let i = 0; i < sums.length; i++) all += sums[i] + sumsLow[i];
    let kept = 0;
    for (let i = 1; i < height; i++) for (let j = 1; j < width; j++) kept += pooledSums[i * width + j] + pooledSumsLow[i * width + j];
    excluded = all - kept;
  }
  const rowKeep: number[] = [];
  const colKeep: number[] = [];
  for (let i = 1; i < height; i++) {
    let s = 0;
    for (let j = 1; j < width; j++) s += pooledCounts[i * width + j];
    if (s > 0) rowKeep.push(i);
  }
  for (let j = 1; j < width; j++) {
    let s = 0;
    for (let i = 1; i < height; i++) s += pooledCounts[i * width + j];
    if (s > 0) colKeep.push(j);
  }
  const kind: Weighting['kind'] = options.weights ? options.weights.kind : 'none';
  const build = (values: ArrayLike<number>, low: ArrayLike<number> | null, n: ArrayLike<number>, w2: ArrayLike<number>, w2Low: ArrayLike<number> | null, offset: number) => {
    const sumWeights = new CompensatedSum();
    const sumSquaredWeights = new CompensatedSum();
    let unweightedN = 0;
    const tableCounts = rowKeep.map((i) =>
      colKeep.map((j) => {
        const at = offset + i * width + j;
        sumWeights.addPair(values[at], low ? low[at] : 0);
        sumSquaredWeights.addPair(w2[at], w2Low ? w2Low[at] : 0);
        unweightedN += n[at];
        return low ? values[at] + low[at] : values[at];
      }),
    );
    const table: TwoWayTable = {
      rowName: rowColumn.name,
      colName: colColumn.name,
      rowLevels: rowKeep.map((i) => rowColumn.labels[i - 1]),
      colLevels: colKeep.map((j) => colColumn.labels[j - 1]),
      counts: tableCounts,
    };
    const weighting: Weighting = { kind, sumWeights: sumWeights.value, sumSquaredWeights: kind === 'none' ? sumWeights.value : sumSquaredWeights.value, unweightedN };
    return { table, weighting };
  };
  const pooled = build(pooledSums, weights ? pooledSumsLow : null, pooledCounts, pooledSquares, weights ? pooledSquaresLow : null, 0);
  let strata: CountedTable['strata'] = null;
  if (options.strata) {
    const labels = options.strata.labels;
    strata = [];
    for (let s = 1; s < layers; s++) {
      const layer = weights ? build(sums, sumsLow, counts, squares, squaresLow, s * plane) : build(counts, null, counts, counts, null, s * plane);
      if (layer.weighting.unweightedN > 0) strata.push({ level: labels[s - 1], ...layer });
    }
    strata.sort((x, y) => compareNatural(x.level, y.level));
  }
  if (options.design && designCells === null) {
    // Replicate weights (a Taylor design is counted in the pass above; a scan refuses layers with a design).
    if (options.design.index || layerCodes || rowsPer) throw new Error('countPair: a Taylor design is counted without layers or grouped entries');
    designCells = replicateCellsOfPair(rowColumn.labels, colColumn.labels, a, b, options.design, weights ?? null);
  }
  const design = designCells ? { design: designCells } : {};
  return { table: pooled.table, weighting: pooled.weighting, strata, excluded, ...design };
}
