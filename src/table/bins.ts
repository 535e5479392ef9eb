/**
 * Binning numeric columns: equal-frequency bins (from values or from value
 * counts) and cut-point bins, labelled by their ranges.
 */
import { compareNatural, isNumericLabel } from './naturalOrder.js';
import { MISSING_LEVEL } from './twoWayTable.js';
import { usageError } from '../errors.js';

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

/**
 * The same equal-frequency bins as equalFrequencyBins, from a column's
 * distinct values and their counts instead of one value per row (what a
 * streaming count keeps): the edges are the same order statistics, so the
 * bins and labels are identical. Returns, for each distinct value given,
 * its 1-based bin, and the labels lowest first.
 */
export function equalFrequencyBinsFromCounts(values: readonly number[], counts: readonly number[], k: number): { labels: string[]; binOf: number[] } {
  const order = values.map((_v, i) => i).filter((i) => counts[i] > 0 && !Number.isNaN(values[i])).sort((a, b) => values[a] - values[b]);
  const m = order.reduce((s, i) => s + counts[i], 0);
  const valueAt = (index: number) => {
    let seen = 0;
    for (const i of order) {
      seen += counts[i];
      if (seen > index) return values[i];
    }
    return values[order[order.length - 1]];
  };
  const edges: number[] = [];
  for (let i = 0; i < k; i++) {
    const edge = valueAt(Math.min(m - 1, Math.ceil((i * m) / k)));
    if (edges.length === 0 || edge > edges[edges.length - 1]) edges.push(edge);
  }
  const minimum = new Array<number>(edges.length).fill(Infinity);
  const maximum = new Array<number>(edges.length).fill(-Infinity);
  const binOf = values.map((x, i) => {
    if (Number.isNaN(x) || !(counts[i] > 0)) return 0;
    let b = 0;
    while (b + 1 < edges.length && edges[b + 1] <= x) b++;
    if (x < minimum[b]) minimum[b] = x;
    if (x > maximum[b]) maximum[b] = x;
    return b + 1;
  });
  const labels = edges.map((_e, b) => (minimum[b] === maximum[b] ? formatEdge(minimum[b]) : `${formatEdge(minimum[b])}–${formatEdge(maximum[b])}`));
  return { labels, binOf };
}

/** A column's levels binned: the level each of its levels becomes, and the new levels in order. */
export interface LevelBinning {
  /** Parallel to the levels given: the bin label of a number, or the level itself for one set apart. */
  labelOf: string[];
  /** The bins, lowest first, then the levels set apart (natural order, "(missing)" last). */
  order: string[];
  /** The levels set apart that hold rows (missing-looking values, missing values kept as levels). */
  apart: string[];
}

/**
 * Equal-frequency bins for a column whose levels are numbers, apart from
 * some levels that stay as they are (`apart`: values that commonly mean
 * missing, missing values kept as levels): the numbers are cut into k bins
 * exactly as equalFrequencyBins cuts the rows (the same order statistics,
 * from the rows of each level), and each level set apart keeps its label
 * and follows the bins (in natural order, the level of empty fields last).
 * The one rule of `pair --bins` and `scan --bins`.
 *
 * Null when the column is not numeric in this sense (a level with rows is
 * neither a number nor set apart, or no level is a number), or when it has
 * at most k numbers with rows: then its levels stay as they are.
 */
export function binNumericLevels(levels: readonly string[], rows: ArrayLike<number>, k: number, apart: (level: string) => boolean): LevelBinning | null {
  const numbers = new Array<number>(levels.length).fill(Number.NaN);
  const kept: string[] = [];
  let distinct = 0;
  for (let i = 0; i < levels.length; i++) {
    if (!(rows[i] > 0)) continue;
    if (isBinnable(levels[i])) {
      numbers[i] = Number(levels[i]);
      distinct++;
    } else if (apart(levels[i])) {
      if (!kept.includes(levels[i])) kept.push(levels[i]);
    } else return null;
  }
  if (distinct <= k) return null;
  const binned = equalFrequencyBinsFromCounts(numbers, Array.from({ length: levels.length }, (_v, i) => rows[i]), k);
  const labelOf = levels.map((level, i) => (binned.binOf[i] > 0 ? binned.labels[binned.binOf[i] - 1] : level));
  kept.sort((a, b) => Number(a === MISSING_LEVEL) - Number(b === MISSING_LEVEL) || compareNatural(a, b));
  return { labelOf, order: [...binned.labels, ...kept], apart: kept };
}

/** A level that is a finite number (what bins take). */
function isBinnable(level: string): boolean {
  return isNumericLabel(level) && Number.isFinite(Number(level));
}

/** Orders a column's dictionary (labels by code − 1) naturally; returns the rank of each code. */
export function naturalRanks(labels: readonly string[]): number[] {
  const order = labels.map((_l, i) => i).sort((a, b) => compareNatural(labels[a], labels[b]));
  const rank = new Array<number>(labels.length);
  order.forEach((code, position) => (rank[code] = position));
  return rank;
}

/**
 * Bins at given cut points c1 < c2 < … < ck: k + 1 bins, each closed on the
 * left and open on the right, x < c1, c1 ≤ x < c2, …, x ≥ ck (the usual
 * reading of age and income brackets: "18,25" puts 25-year-olds with the
 * next bracket; common practice). Only bins that hold a value are kept,
 * lowest first; `empty` names the others.
 *
 * Labels are range-like, so that they sort in natural order
 * (naturalOrder.ts): when every value and cut is a whole number they read
 * `<18`, `18–24`, `25–34`, `50+` (a bin of one whole number is that number);
 * otherwise `<18`, `18 to <25`, `50+`.
 */
/** The label of the cut-point bin that holds x (the labels of cutPointBins). */
export function cutLabel(x: number, cuts: readonly number[], whole: boolean): string {
  let b = 0;
  while (b < cuts.length && cuts[b] <= x) b++;
  if (b === 0) return `<${formatEdge(cuts[0])}`;
  if (b === cuts.length) return `${formatEdge(cuts[b - 1])}+`;
  const lo = cuts[b - 1];
  const hi = cuts[b];
  if (whole) return hi - 1 === lo ? formatEdge(lo) : `${formatEdge(lo)}–${formatEdge(hi - 1)}`;
  return `${formatEdge(lo)} to <${formatEdge(hi)}`;
}

export function cutPointBins(values: Float64Array, cuts: readonly number[]): Binning & { empty: string[] } {
  for (let i = 1; i < cuts.length; i++) if (!(cuts[i] > cuts[i - 1])) throw new RangeError('cut points must increase');
  let whole = cuts.every(Number.isInteger);
  for (let i = 0; whole && i < values.length; i++) if (!Number.isNaN(values[i]) && !Number.isInteger(values[i])) whole = false;
  // A value standing for bin b: its lower edge (or just below the first cut).
  const labelOf = (b: number): string => cutLabel(b === 0 ? cuts[0] - 1 : cuts[b - 1], cuts, whole);
  const binOf = (x: number) => {
    // The number of cuts at or below x.
    let lo = 0;
    let hi = cuts.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (cuts[mid] <= x) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  const raw = new Uint16Array(values.length);
  const used = new Uint8Array(cuts.length + 1);
  values.forEach((v, i) => {
    if (Number.isNaN(v)) return;
    const b = binOf(v);
    raw[i] = b + 1;
    used[b] = 1;
  });
  const remap = new Uint16Array(cuts.length + 2);
  const labels: string[] = [];
  const empty: string[] = [];
  for (let b = 0; b <= cuts.length; b++) {
    if (used[b]) {
      labels.push(labelOf(b));
      remap[b + 1] = labels.length;
    } else empty.push(labelOf(b));
  }
  const codes = new Uint16Array(values.length);
  for (let i = 0; i < values.length; i++) codes[i] = remap[raw[i]];
  return { labels, codes, empty };
}

/** `--cuts 'column:18,25,35,50'`: a column and its increasing cut points. */
export interface CutSpec {
  column: string;
  cuts: number[];
}

const CUT_NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/;

export function parseCuts(spec: string, option = '--cuts'): CutSpec {
  const colon = spec.lastIndexOf(':');
  if (colon <= 0) throw usageError(`${option} "${spec}": expected column:edge,edge,… (for example 'age:18,25,35,50')`);
  const column = spec.slice(0, colon).trim();
  const parts = spec.slice(colon + 1).split(',').map((p) => p.trim()).filter((p) => p !== '');
  if (parts.length === 0) throw usageError(`${option} "${spec}": give at least one cut point after the colon`);
  const cuts = parts.map((p) => {
    if (!CUT_NUMBER.test(p) || !Number.isFinite(Number(p))) throw usageError(`${option} "${spec}": "${p}" is not a number`);
    return Number(p);
  });
  for (let i = 1; i < cuts.length; i++) {
    if (!(cuts[i] > cuts[i - 1])) throw usageError(`${option} "${spec}": cut points must increase (${parts[i - 1]} then ${parts[i]})`);
  }
  return { column, cuts };
}
