import { compareNatural } from './naturalOrder.js';

export interface Binning {
  /** Bin labels, lowest first. */
  labels: string[];
  /** Code per value: 1-based bin, 0 for missing (NaN). */
  codes: Uint16Array;
}

function formatEdge(x: number): string {
  if (Number.isInteger(x)) return String(x);
  const s = x.toPrecision(4);
  return String(Number(s));
}

/**
 * Equal-frequency bins: edges at the k-quantiles of the non-missing values
 * (the order statistics at ⌈i·m/k⌉), duplicates removed so tied values stay
 * together. Bin i holds edge_i ≤ x < edge_{i+1}; the last bin is closed.
 * Labels show the range of the values that fall in each bin, lowest first.
 */
export function equalFrequencyBins(values: Float64Array, k: number): Binning {
  const present = Array.from(values).filter((v) => !Number.isNaN(v)).sort((a, b) => a - b);
  const m = present.length;
  const edges: number[] = [];
  for (let i = 0; i < k; i++) {
    const edge = present[Math.min(m - 1, Math.ceil((i * m) / k))];
    if (edges.length === 0 || edge > edges[edges.length - 1]) edges.push(edge);
  }
  const binOf = (x: number) => {
    let lo = 0;
    let hi = edges.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (edges[mid] <= x) lo = mid;
      else hi = mid - 1;
    }
    return lo;
  };
  const minimum = new Array<number>(edges.length).fill(Infinity);
  const maximum = new Array<number>(edges.length).fill(-Infinity);
  const codes = new Uint16Array(values.length);
  values.forEach((v, i) => {
    if (Number.isNaN(v)) return;
    const b = binOf(v);
    codes[i] = b + 1;
    if (v < minimum[b]) minimum[b] = v;
    if (v > maximum[b]) maximum[b] = v;
  });
  const labels = edges.map((_e, b) => (minimum[b] === maximum[b] ? formatEdge(minimum[b]) : `${formatEdge(minimum[b])}–${formatEdge(maximum[b])}`));
  return { labels, codes };
}

/** Orders a column's dictionary (labels by code − 1) naturally; returns the rank of each code. */
export function naturalRanks(labels: readonly string[]): number[] {
  const order = labels.map((_l, i) => i).sort((a, b) => compareNatural(labels[a], labels[b]));
  const rank = new Array<number>(labels.length);
  order.forEach((code, position) => (rank[code] = position));
  return rank;
}
