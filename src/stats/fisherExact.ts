import { compensatedSum, CountMatrix, isTwoByTwo, margins, transpose } from './contingency.js';
import { logFactorial } from './gamma.js';

/**
 * Two-sided rule shared by every exact test here: a table counts towards
 * the p-value when its probability is no larger than the observed table's,
 * within a relative tolerance of 1e-7 (so that tables tied with the observed
 * one in exact arithmetic are not lost to rounding; common practice).
 */
export const EXACT_RELATIVE_TOLERANCE = 1e-7;

export interface FisherResult {
  pValue: number;
  /** Which algorithm produced the value. */
  method: 'hypergeometric-2x2' | 'network-rxc';
}

/**
 * Fisher's exact test for a 2×2 table, two-sided (Fisher 1935, The Design of
 * Experiments, §2; Agresti 2013 §3.5.1). With margins fixed, n11 follows the
 * hypergeometric distribution
 *   P(n11 = k) = C(n1., k) C(n2., n.1 − k) / C(n, n.1),
 * and the p-value sums P(k) over all k with P(k) ≤ P(observed)·(1 + 1e-7).
 * The probabilities are built by the ratio recurrence from the mode and
 * normalised, so tail values keep their relative accuracy far below 1e-16.
 */
export function fisherExact2x2(counts: CountMatrix): FisherResult | null {
  if (!isTwoByTwo(counts)) return null;
  for (const row of counts) for (const v of row) if (!Number.isInteger(v) || v < 0) return null;
  const [[a, b], [c, d]] = counts;
  const row1 = a + b;
  const col1 = a + c;
  const n = a + b + c + d;
  const low = Math.max(0, col1 - (c + d));
  const high = Math.min(row1, col1);
  const size = high - low + 1;
  // Unnormalised probabilities relative to the mode, by
  // P(k+1)/P(k) = (row1 − k)(col1 − k) / ((k+1)(n − row1 − col1 + k + 1)).
  const mode = Math.floor(((row1 + 1) * (col1 + 1)) / (n + 2));
  const weights = new Float64Array(size);
  weights[mode - low] = 1;
  for (let k = mode; k < high; k++) {
    weights[k + 1 - low] = (weights[k - low] * ((row1 - k) * (col1 - k))) / ((k + 1) * (n - row1 - col1 + k + 1));
  }
  for (let k = mode; k > low; k--) {
    weights[k - 1 - low] = (weights[k - low] * (k * (n - row1 - col1 + k))) / ((row1 - k + 1) * (col1 - k + 1));
  }
  // Total mass and the two-sided tail, with compensated sums (Neumaier 1974)
  // so that a support of a million values keeps its last digits.
  const threshold = weights[a - low] * (1 + EXACT_RELATIVE_TOLERANCE);
  const total = compensatedSum(weights);
  const tail = compensatedSum(weights.filter((w) => w <= threshold));
  return { pValue: Math.min(1, tail / total), method: 'hypergeometric-2x2' };
}

export interface ExactBound {
  /** Largest number of node expansions before the r×c algorithm gives up. */
  maxWork: number;
}

/**
 * Fisher–Freeman–Halton exact test for an r×c table (Freeman & Halton 1951,
 * Biometrika 38, 141–149), two-sided by the same probability rule as the 2×2
 * test. The table probability under fixed margins is
 *   P = Π n_i.! Π n_.j! / (n! Π n_ij!),
 * which factorises over columns into multivariate hypergeometric terms
 *   P(column j | remaining rows R) = Π_i C(R_i, n_ij) / C(Σ R, n_.j).
 * The tables are enumerated column by column as paths through a network whose
 * nodes are the multisets of remaining row totals (Mehta & Patel 1983,
 * J. Am. Stat. Assoc. 78, 427–434). Paths reaching a node with equal past
 * probability are merged; at each node the largest and smallest probability
 * of any completion (computed exactly by a memoised pass over the network)
 * decide whether all completions count (add the whole past mass, since the
 * completions of a node sum to 1), none do (drop), or the node must be
 * expanded. Returns null when the work exceeds the bound.
 */
/** Columns × rows beyond which the network is not attempted (the recursion depth grows with it). */
const MAX_NETWORK_DEPTH = 2000;

export function fisherFreemanHalton(counts: CountMatrix, bound: ExactBound = { maxWork: 2_000_000 }): FisherResult | null {
  for (const row of counts) for (const v of row) if (!Number.isInteger(v) || v < 0) return null;
  if (isTwoByTwo(counts)) return fisherExact2x2(counts);
  // Put the shorter dimension down the rows: fewer cells per column step.
  let table = counts.map((row) => [...row]);
  if (table.length > table[0].length) table = transpose(table);
  const { rowTotals, colTotals, total } = margins(table);
  const rows = rowTotals.filter((t) => t > 0);
  const cols = colTotals.filter((t) => t > 0).sort((x, y) => y - x);
  if (rows.length < 2 || cols.length < 2) return { pValue: 1, method: 'network-rxc' };

  // log P(observed)
  let logObserved = -logFactorial(total);
  for (const t of rowTotals) logObserved += logFactorial(t);
  for (const t of colTotals) logObserved += logFactorial(t);
  for (const row of table) for (const v of row) logObserved -= logFactorial(v);
  const logThreshold = logObserved + Math.log1p(EXACT_RELATIVE_TOLERANCE);

  const stages = cols.length;
  // The memoised pass recurses once per column (and once per row within
  // it); a table this wide is beyond any work bound, and too deep a
  // recursion for the stack, so it is refused at once.
  if (stages * rows.length > MAX_NETWORK_DEPTH) return null;
  let work = 0;
  const overBudget = () => ++work > bound.maxWork;

  // Enumerate the fillings x of one column (Σx = c, 0 ≤ x_i ≤ R_i), calling
  // visit(x, logProbability) with the column's conditional log probability.
  const columnFillings = (remaining: number[], c: number, visit: (next: number[], logP: number) => boolean): boolean => {
    const r = remaining.length;
    const sumRemaining = remaining.reduce((s, v) => s + v, 0);
    const logDenominator = logFactorial(sumRemaining) - logFactorial(c) - logFactorial(sumRemaining - c);
    const x = new Array<number>(r).fill(0);
    // suffix capacity for pruning
    const suffix = new Array<number>(r + 1).fill(0);
    for (let i = r - 1; i >= 0; i--) suffix[i] = suffix[i + 1] + remaining[i];
    const recurse = (i: number, left: number, logNumerator: number): boolean => {
      if (i === r - 1) {
        if (left > remaining[i]) return true;
        x[i] = left;
        const ln = logNumerator + logChoose(remaining[i], left);
        const next = remaining.map((v, k) => v - x[k]);
        return visit(next, ln - logDenominator);
      }
      const lo = Math.max(0, left - suffix[i + 1]);
      const hi = Math.min(remaining[i], left);
      for (let v = lo; v <= hi; v++) {
        x[i] = v;
        if (!recurse(i + 1, left - v, logNumerator + logChoose(remaining[i], v))) return false;
      }
      return true;
    };
    return recurse(0, c, 0);
  };

  const keyOf = (stage: number, remaining: number[]) => stage + ':' + [...remaining].sort((p, q) => p - q).join(',');

  // Exact longest and shortest completion (in log probability) per node.
  const bounds = new Map<string, { max: number; min: number }>();
  const completionBounds = (stage: number, remaining: number[]): { max: number; min: number } | null => {
    if (stage === stages - 1) return { max: 0, min: 0 }; // last column is forced
    const key = keyOf(stage, remaining);
    const known = bounds.get(key);
    if (known) return known;
    let max = -Infinity;
    let min = Infinity;
    const ok = columnFillings(remaining, cols[stage], (next, logP) => {
      if (overBudget()) return false;
      const rest = completionBounds(stage + 1, next);
      if (rest === null) return false;
      if (logP + rest.max > max) max = logP + rest.max;
      if (logP + rest.min < min) min = logP + rest.min;
      return true;
    });
    if (!ok) return null;
    const result = { max, min };
    bounds.set(key, result);
    return result;
  };

  // Forward pass, stage by stage; each node holds its distinct past
  // probabilities (merged when equal to 1e-9 in log) with their summed mass.
  interface Past {
    logPast: number;
    mass: number;
  }
  let frontier = new Map<string, { remaining: number[]; pasts: Map<number, Past> }>();
  frontier.set(keyOf(0, rows), { remaining: [...rows].sort((p, q) => p - q), pasts: new Map([[0, { logPast: 0, mass: 1 }]]) });
  let pValue = 0;
  for (let stage = 0; stage < stages; stage++) {
    const nextFrontier = new Map<string, { remaining: number[]; pasts: Map<number, Past> }>();
    for (const node of frontier.values()) {
      const nodeBounds = completionBounds(stage, node.remaining);
      if (nodeBounds === null) return null;
      for (const past of node.pasts.values()) {
        if (past.logPast + nodeBounds.max <= logThreshold) {
          pValue += past.mass; // every completion counts
          continue;
        }
        if (past.logPast + nodeBounds.min > logThreshold) continue; // none can
        if (stage === stages - 1) continue; // forced completion already decided above
        const ok = columnFillings(node.remaining, cols[stage], (next, logP) => {
          if (overBudget()) return false;
          const sortedNext = [...next].sort((p, q) => p - q);
          const key = keyOf(stage + 1, sortedNext);
          let target = nextFrontier.get(key);
          if (!target) {
            target = { remaining: sortedNext, pasts: new Map() };
            nextFrontier.set(key, target);
          }
          const logPast = past.logPast + logP;
          const pastKey = Math.round(logPast * 1e9);
          const existing = target.pasts.get(pastKey);
          const mass = past.mass * Math.exp(logP);
          if (existing) existing.mass += mass;
          else target.pasts.set(pastKey, { logPast, mass });
          return true;
        });
        if (!ok) return null;
      }
    }
    frontier = nextFrontier;
  }
  return { pValue: Math.min(1, pValue), method: 'network-rxc' };
}

function logChoose(n: number, k: number): number {
  return logFactorial(n) - logFactorial(k) - logFactorial(n - k);
}

/**
 * Brute-force reference for small tables: enumerate every table with the
 * observed margins and sum the probabilities of those no more likely than
 * the observed one. Exponential; for tests only.
 */
export function fisherByEnumeration(counts: CountMatrix): number {
  const { rowTotals, colTotals, total } = margins(counts);
  const r = rowTotals.length;
  const c = colTotals.length;
  const logConstant = rowTotals.reduce((s, t) => s + logFactorial(t), 0) + colTotals.reduce((s, t) => s + logFactorial(t), 0) - logFactorial(total);
  const logProbability = (table: number[][]) => table.reduce((s, row) => row.reduce((t, v) => t - logFactorial(v), s), logConstant);
  const observed = Math.exp(logProbability(counts.map((row) => [...row])));
  const threshold = observed * (1 + EXACT_RELATIVE_TOLERANCE);
  const table = Array.from({ length: r }, () => new Array<number>(c).fill(0));
  const rowLeft = [...rowTotals];
  const colLeft = [...colTotals];
  let sum = 0;
  const place = (i: number, j: number, v: number, next: number) => {
    table[i][j] = v;
    rowLeft[i] -= v;
    colLeft[j] -= v;
    fill(next);
    rowLeft[i] += v;
    colLeft[j] += v;
  };
  const fill = (cell: number): void => {
    if (cell === r * c) {
      const p = Math.exp(logProbability(table));
      if (p <= threshold) sum += p;
      return;
    }
    const i = Math.floor(cell / c);
    const j = cell % c;
    if (j === c - 1 || i === r - 1) {
      // The last cell of a row, or of a column, is forced by its margin.
      const v = j === c - 1 ? rowLeft[i] : colLeft[j];
      if (v > colLeft[j] || v > rowLeft[i]) return;
      if (i === r - 1 && j === c - 1 && rowLeft[i] !== colLeft[j]) return;
      place(i, j, v, cell + 1);
      return;
    }
    const hi = Math.min(rowLeft[i], colLeft[j]);
    for (let v = 0; v <= hi; v++) place(i, j, v, cell + 1);
  };
  fill(0);
  return Math.min(1, sum);
}
