import { compareNatural } from './naturalOrder.js';
import { TwoWayTable } from './twoWayTable.js';
import { Weighting } from './weighting.js';

export interface CodedColumn {
  name: string;
  /** Labels in report order. */
  labels: string[];
  /** Per row: 1-based index into labels, 0 for missing. */
  codes: Uint16Array | Uint32Array;
}

export interface CrossCountOptions {
  /** Per-row weights (sampling weights or frequencies). */
  weights?: { values: Float64Array; kind: 'weight' | 'freq' };
  /** A layer: one table per level of this column. */
  strata?: CodedColumn;
}

export interface CrossCounted {
  table: TwoWayTable;
  excluded: number;
  weighting: Weighting;
  strata: { level: string; table: TwoWayTable; weighting: Weighting }[] | null;
}

/**
 * Counts the table of two coded columns over their complete rows (and, with
 * a layer, one table per layer level) in one pass of increments on a padded
 * grid: code 0 (missing) lands in row 0 / column 0 / layer 0, so the loop has
 * no branch and the padding is the excluded count. Levels that occur only
 * beside a missing value are dropped.
 */
export function crossCount(rowColumn: CodedColumn, colColumn: CodedColumn, options: CrossCountOptions = {}): CrossCounted {
  const a = rowColumn.codes;
  const b = colColumn.codes;
  const width = colColumn.labels.length + 1;
  const height = rowColumn.labels.length + 1;
  const plane = width * height;
  const layers = options.strata ? options.strata.labels.length + 1 : 1;
  const layerCodes = options.strata?.codes;
  const rows = a.length;
  // Unweighted counts are whole numbers: integer increments are cheaper than float ones.
  const counts: Float64Array | Uint32Array = options.weights ? new Float64Array(layers * plane) : new Uint32Array(layers * plane);
  const weights = options.weights?.values;
  const sums = new Float64Array(weights ? layers * plane : 0);
  const squares = new Float64Array(weights ? layers * plane : 0);
  if (weights && layerCodes) {
    for (let k = 0; k < rows; k++) {
      const at = layerCodes[k] * plane + a[k] * width + b[k];
      const w = weights[k];
      counts[at]++;
      sums[at] += w;
      squares[at] += w * w;
    }
  } else if (weights) {
    for (let k = 0; k < rows; k++) {
      const at = a[k] * width + b[k];
      const w = weights[k];
      counts[at]++;
      sums[at] += w;
      squares[at] += w * w;
    }
  } else if (layerCodes) {
    for (let k = 0; k < rows; k++) counts[layerCodes[k] * plane + a[k] * width + b[k]]++;
  } else {
    // Four interleaved grids, added up afterwards, so that runs of rows that
    // hit the same cell do not wait on each other's increments.
    const lanes = new Uint32Array(4 * plane);
    const end = rows - 3;
    let k = 0;
    for (; k < end; k += 4) {
      lanes[a[k] * width + b[k]]++;
      lanes[plane + a[k + 1] * width + b[k + 1]]++;
      lanes[2 * plane + a[k + 2] * width + b[k + 2]]++;
      lanes[3 * plane + a[k + 3] * width + b[k + 3]]++;
    }
    for (; k < rows; k++) lanes[a[k] * width + b[k]]++;
    for (let i = 0; i < plane; i++) counts[i] = lanes[i] + lanes[plane + i] + lanes[2 * plane + i] + lanes[3 * plane + i];
  }
  const firstLayer = layerCodes ? 1 : 0;
  // Pooled over the (non-missing) layers.
  const pooledCounts = new Float64Array(plane);
  const pooledSums = weights ? new Float64Array(plane) : pooledCounts;
  const pooledSquares = weights ? new Float64Array(plane) : pooledCounts;
  const layerSums: ArrayLike<number> = weights ? sums : counts;
  const layerSquares: ArrayLike<number> = weights ? squares : counts;
  for (let s = firstLayer; s < layers; s++) {
    for (let i = 0; i < plane; i++) {
      pooledCounts[i] += counts[s * plane + i];
      if (weights) {
        pooledSums[i] += sums[s * plane + i];
        pooledSquares[i] += squares[s * plane + i];
      }
    }
  }
  let excluded = rows;
  for (let i = 1; i < height; i++) for (let j = 1; j < width; j++) excluded -= pooledCounts[i * width + j];
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
  const build = (values: ArrayLike<number>, n: ArrayLike<number>, w2: ArrayLike<number>, offset: number) => {
    let sumWeights = 0;
    let sumSquaredWeights = 0;
    let unweightedN = 0;
    const tableCounts = rowKeep.map((i) =>
      colKeep.map((j) => {
        const at = offset + i * width + j;
        sumWeights += values[at];
        sumSquaredWeights += w2[at];
        unweightedN += n[at];
        return values[at];
      }),
    );
    const table: TwoWayTable = {
      rowName: rowColumn.name,
      colName: colColumn.name,
      rowLevels: rowKeep.map((i) => rowColumn.labels[i - 1]),
      colLevels: colKeep.map((j) => colColumn.labels[j - 1]),
      counts: tableCounts,
    };
    const weighting: Weighting = { kind, sumWeights, sumSquaredWeights: kind === 'none' ? sumWeights : sumSquaredWeights, unweightedN };
    return { table, weighting };
  };
  const pooled = build(pooledSums, pooledCounts, pooledSquares, 0);
  let strata: CrossCounted['strata'] = null;
  if (options.strata) {
    const labels = options.strata.labels;
    strata = [];
    for (let s = 1; s < layers; s++) {
      const layer = build(layerSums, counts, layerSquares, s * plane);
      if (layer.weighting.unweightedN > 0) strata.push({ level: labels[s - 1], ...layer });
    }
    strata.sort((x, y) => compareNatural(x.level, y.level));
  }
  return { table: pooled.table, excluded, weighting: pooled.weighting, strata };
}
