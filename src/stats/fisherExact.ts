/**
 * Exact tests of independence: Fisher's 2×2 test and the
 * Fisher–Freeman–Halton r×c test (a network algorithm within a work bound).
 */
import { CountMatrix, isTwoByTwo, margins, transpose } from './contingency.js';
import { devianceTerm, logBinomialCoefficient, logFactorial, stirlingError } from './gamma.js';

/**
 * Two-sided rule shared by every exact test here: a table counts towards
 * the p-value when its probability is no larger than the observed table's,
 * within a relative tolerance of 1e-7 (so that tables tied with the observed
 * one in exact arithmetic are not lost to rounding; common practice).
 */
export const EXACT_RELATIVE_TOLERANCE = 1e-7;

export type ExactMethod = 'hypergeometric-2x2' | 'network-rxc';

/** An exact p-value, and the work it took (terms summed, or network steps and tables visited). */
export interface ExactComputed {
  status: 'computed';
  pValue: number;
  method: ExactMethod;
  work: number;
}

/**
 * The exact test was not attempted: a cheap estimate of its work, made before
 * any enumeration, exceeds the bound (or the counts are beyond exact integers).
 */
export interface ExactDeclined {
  status: 'declined';
  method: ExactMethod;
  /** Estimated work (same unit as `work`), or null when the method cannot run on this table at all. */
  workEstimate: number | null;
  workBound: number;
  /** One plain sentence: why the exact p-value was not computed. */
  reason: string;
}

export type ExactOutcome = ExactComputed | ExactDeclined;

export interface ExactBound {
  /**
   * Largest work allowed: for the 2×2 test the number of hypergeometric terms
   * summed, for the r×c test the network steps plus partial tables visited.
   */
  maxWork: number;
}

/** Work bound of the 2×2 test: 5·10⁷ terms (a fraction of a second). */
export const DEFAULT_2X2_BOUND: ExactBound = { maxWork: 50_000_000 };
/** Work bound of the r×c network. */
export const DEFAULT_RXC_BOUND: ExactBound = { maxWork: 2_000_000 };

/** Counts above 2^53 are no longer exact integers in a double. */
const LARGEST_EXACT_INTEGER = Number.MAX_SAFE_INTEGER;

function isCountTable(counts: CountMatrix): boolean {
  return counts.every((row) => row.every((v) => Number.isInteger(v) && v >= 0));
}

function beyondExactIntegers(method: ExactMethod, bound: ExactBound, total: number): ExactDeclined {
  return {
    status: 'declined',
    method,
    workEstimate: null,
    workBound: bound.maxWork,
    reason: `the total count ${total.toExponential(3)} is beyond 2^53, where counts are no longer exact integers`,
  };
}

function overBound(method: ExactMethod, bound: ExactBound, estimate: number, unit: string): ExactDeclined {
  return {
    status: 'declined',
    method,
    workEstimate: estimate,
    workBound: bound.maxWork,
    reason: `its work estimate (${formatCount(estimate)} ${unit}) is above the bound of ${formatCount(bound.maxWork)}`,
  };
}

function formatCount(x: number): string {
  return x < 1e7 ? Math.round(x).toLocaleString('en-US') : x.toExponential(2);
}

/**
 * log P(X = x) for the binomial distribution with n trials, computed as in
 * Loader (2000): δ(n) − δ(x) − δ(n−x) − bd0(x, np) − bd0(n−x, nq) − ½ log(2πx(n−x)/n),
 * with δ Stirling's error and bd0 the deviance term, so that no large terms
 * cancel. p and q need not sum to exactly 1 (see logHypergeometric).
 */
function logBinomialRaw(x: number, n: number, p: number, q: number): number {
  if (x === 0) {
    if (n === 0) return 0;
    return p < 0.1 ? -devianceTerm(n, n * q) - n * p : n * Math.log(q);
  }
  if (x === n) return q < 0.1 ? -devianceTerm(n, n * p) - n * q : n * Math.log(p);
  const lc = stirlingError(n) - stirlingError(x) - stirlingError(n - x) - devianceTerm(x, n * p) - devianceTerm(n - x, n * q);
  const lf = Math.log(2 * Math.PI) + Math.log(x) + Math.log1p(-x / n);
  return lc - 0.5 * lf;
}

/**
 * log of the hypergeometric probability C(r, x) C(b, m − x) / C(r + b, m): x
 * successes among m draws from r successes and b failures. Written as a ratio
 * of three binomial probabilities with the common p = m/(r + b) (the route of
 * Loader 2000), whose p^·q^· factors cancel exactly for any p and q, so the
 * result keeps an absolute error near 1e-13 even where log C(r + b, m) is 10⁹.
 */
export function logHypergeometric(x: number, r: number, b: number, m: number): number {
  if (x < Math.max(0, m - b) || x > Math.min(r, m)) return -Infinity;
  const N = r + b;
  const p = m / N;
  const q = (N - m) / N;
  return logBinomialRaw(x, r, p, q) + logBinomialRaw(m - x, b, p, q) - logBinomialRaw(m, N, p, q);
}

/** Steps of the ratio recurrence between fresh evaluations of the probability (so rounding cannot drift). */
const REANCHOR_EVERY = 4096;

/**
 * Fisher's exact test for a 2×2 table, two-sided (Fisher 1935, The Design of
 * Experiments, §2; Agresti 2013, Categorical Data Analysis, 3rd ed., §3.5.1).
 * With the margins fixed, n11 follows the hypergeometric distribution
 *   P(n11 = k) = C(n1., k) C(n2., n.1 − k) / C(n, n.1),
 * and the p-value sums P(k) over all k with P(k) ≤ P(observed)·(1 + 1e-7).
 *
 * The distribution is unimodal, so those k form two tails. Their inner ends
 * are found by bisection on log P (evaluated directly, Loader 2000), and each
 * tail is summed outwards by the ratio recurrence
 *   P(k+1)/P(k) = (n1. − k)(n.1 − k) / ((k+1)(n2. − n.1 + k + 1)),
 * re-anchored every 4096 steps, until a term no longer changes the sum. No
 * memory grows with n; the work is about 20 standard deviations of the
 * distribution, estimated before starting and declined above `bound`.
 * null unless the table is 2×2 with non-negative integer counts.
 *
 * @example
 * // Fisher's tea-tasting experiment (Fisher 1935, §2): 3 of 4 cups right
 * fisherExact2x2([[3, 1], [1, 3]]) // { status: 'computed', pValue: 0.4857…, … }
 */
export function fisherExact2x2(counts: CountMatrix, bound: ExactBound = DEFAULT_2X2_BOUND): ExactOutcome | null {
  if (!isTwoByTwo(counts) || !isCountTable(counts)) return null;
  const method: ExactMethod = 'hypergeometric-2x2';
  const [[a, b], [c, d]] = counts;
  const row1 = a + b;
  const row2 = c + d;
  const col1 = a + c;
  const n = row1 + row2;
  if (n > LARGEST_EXACT_INTEGER) return beyondExactIntegers(method, bound, n);
  const low = Math.max(0, col1 - row2);
  const high = Math.min(row1, col1);
  if (low === high) return { status: 'computed', pValue: 1, method, work: 1 };
  // Work estimate: both tails reach about 9.2 standard deviations beyond
  // their start (where a Gaussian term falls below 2^-60 of the sum), plus
  // the bisections.
  const variance = n > 1 ? (row1 * row2 * col1 * (n - col1)) / (n * n * (n - 1)) : 0;
  const estimate = Math.min(high - low + 1, 2 * (9.5 * Math.sqrt(variance) + 4)) + 4 * Math.log2(high - low + 2);
  if (estimate > bound.maxWork) return overBound(method, bound, estimate, 'terms');

  const logP = (k: number) => logHypergeometric(k, row1, row2, col1);
  const mode = Math.min(high, Math.max(low, Math.floor(((row1 + 1) * (col1 + 1)) / (n + 2))));
  const logThreshold = logP(a) + Math.log1p(EXACT_RELATIVE_TOLERANCE);
  let work = 3;
  if (logP(mode) <= logThreshold) return { status: 'computed', pValue: 1, method, work };

  // The inner ends of the tails: P rises up to the mode and falls after it,
  // so the last k at or below the threshold, walking from an end towards the
  // mode, is found by bisection (`end` satisfies, `mode` does not).
  const innerEnd = (end: number): number => {
    let satisfies = end;
    let fails = mode;
    while (Math.abs(fails - satisfies) > 1) {
      const mid = Math.floor((satisfies + fails) / 2);
      work++;
      if (logP(mid) <= logThreshold) satisfies = mid;
      else fails = mid;
    }
    return satisfies;
  };
  const leftEnd = logP(low) <= logThreshold ? innerEnd(low) : low - 1;
  const rightStart = logP(high) <= logThreshold ? innerEnd(high) : high + 1;

  // Each tail relative to its own first term, in log space at the anchor so
  // that p-values far below the smallest double's reach keep their digits.
  const tail = (start: number, step: 1 | -1): { logFirst: number; relativeSum: number; terms: number } => {
    const logFirst = logP(start);
    let term = 1;
    let sum = 0;
    let compensation = 0;
    let k = start;
    let terms = 0;
    while (k >= low && k <= high) {
      const t = sum + term;
      compensation += sum >= term ? sum - t + term : term - t + sum;
      sum = t;
      terms++;
      if (term < sum * 2 ** -60) break;
      if (step === 1) term *= ((row1 - k) * (col1 - k)) / ((k + 1) * (row2 - col1 + k + 1));
      else term *= (k * (row2 - col1 + k)) / ((row1 - k + 1) * (col1 - k + 1));
      k += step;
      if (terms % REANCHOR_EVERY === 0 && k >= low && k <= high) term = Math.exp(logP(k) - logFirst);
    }
    return { logFirst, relativeSum: sum + compensation, terms };
  };
  const parts: { logFirst: number; relativeSum: number }[] = [];
  if (leftEnd >= low) {
    const t = tail(leftEnd, -1);
    work += t.terms;
    parts.push(t);
  }
  if (rightStart <= high) {
    const t = tail(rightStart, 1);
    work += t.terms;
    parts.push(t);
  }
  let pValue = 0;
  for (const part of parts) pValue += Math.exp(part.logFirst + Math.log(part.relativeSum));
  return { status: 'computed', pValue: Math.min(1, pValue), method, work };
}


/** Columns × rows beyond which the network is not attempted (the enumeration recurses once per row and column). */
const MAX_NETWORK_DEPTH = 2000;
/** How far the box bound on the network may exceed the work bound before the network pass is not even started. */
const NETWORK_ESTIMATE_SLACK = 64;
/** How far the unpruned estimate may exceed the work bound before the enumeration is not even started. */
const PRUNING_SLACK = 8;

interface NetworkNode {
  remaining: number[];
  /** Partial tables (paths from the root) reaching this node. */
  pathsTo: number;
  /** Completions (paths to the end) from this node. */
  pathsFrom: number;
  /** Largest and smallest log probability of a completion. */
  max: number;
  min: number;
}

interface Past {
  logPast: number;
  mass: number;
}

/**
 * Enumerates the fillings x of one column (Σx = c, 0 ≤ x_i ≤ R_i) from the
 * remaining row totals R, calling visit(next, logP) with the remaining totals
 * after the column and the column's conditional log probability
 *   log Π_i C(R_i, x_i) / C(ΣR, c).
 */
function forEachFilling(remaining: readonly number[], c: number, visit: (next: number[], logP: number) => void): void {
  const r = remaining.length;
  let sumRemaining = 0;
  for (const v of remaining) sumRemaining += v;
  const logDenominator = logBinomialCoefficient(sumRemaining, c);
  const x = new Array<number>(r).fill(0);
  const suffix = new Array<number>(r + 1).fill(0);
  for (let i = r - 1; i >= 0; i--) suffix[i] = suffix[i + 1] + remaining[i];
  const recurse = (i: number, left: number, logNumerator: number): void => {
    if (i === r - 1) {
      if (left > remaining[i]) return;
      x[i] = left;
      const next = remaining.map((v, k) => v - x[k]);
      visit(next, logNumerator + logBinomialCoefficient(remaining[i], left) - logDenominator);
      return;
    }
    const lo = Math.max(0, left - suffix[i + 1]);
    const hi = Math.min(remaining[i], left);
    for (let v = lo; v <= hi; v++) {
      x[i] = v;
      recurse(i + 1, left - v, logNumerator + logBinomialCoefficient(remaining[i], v));
    }
  };
  recurse(0, c, 0);
}

const keyOf = (sortedRemaining: readonly number[]) => sortedRemaining.join(',');
const sortedCopy = (v: readonly number[]) => [...v].sort((p, q) => p - q);

/**
 * Product of interval widths except the largest: an upper bound on the number
 * of integer vectors in the box whose coordinates sum to a fixed total.
 */
function boxCount(widths: number[]): number {
  const sorted = [...widths].sort((p, q) => p - q);
  sorted.pop();
  return sorted.reduce((product, w) => product * w, 1);
}

/**
 * A bound, from the margins alone, on the column fillings the network pass
 * visits: Σ over columns of (possible nodes) × (possible fillings), each a
 * box count. No enumeration: this decides before any work is done.
 */
export function networkSizeEstimate(rowTotals: readonly number[], colTotals: readonly number[]): number {
  const total = rowTotals.reduce((s, v) => s + v, 0);
  let used = 0;
  let estimate = 0;
  for (const c of colTotals) {
    const remaining = total - used;
    const nodes = boxCount(rowTotals.map((t) => Math.min(t, remaining) - Math.max(0, t - used) + 1));
    const fillings = boxCount(rowTotals.map((t) => Math.min(t, c, remaining - c) + 1));
    estimate += nodes * fillings;
    used += c;
  }
  return estimate;
}

/**
 * Fisher–Freeman–Halton exact test for an r×c table (Freeman & Halton 1951,
 * Biometrika 38, 141–149), two-sided by the same probability rule as the 2×2
 * test. The table probability under fixed margins,
 *   P = Π n_i.! Π n_.j! / (n! Π n_ij!),
 * factorises over columns into multivariate hypergeometric terms
 *   P(column j | remaining rows R) = Π_i C(R_i, n_ij) / C(Σ R, n_.j),
 * each evaluated with log C computed without cancellation (so a cell of 10⁹
 * beside single digits keeps its digits). The tables are paths through a
 * network whose nodes are the multisets of remaining row totals (Mehta &
 * Patel 1983, J. Am. Stat. Assoc. 78, 427–434).
 *
 * The work is decided before it is done: first a bound on the network from
 * the margins alone, then, after one pass over the network (which gives each
 * node's largest and smallest completion and its numbers of partial tables
 * before and after it), the number of partial tables to visit. The tables are
 * split at the column where the partial tables before and after are fewest
 * (meeting in the middle): partial tables up to that column are enumerated
 * with their probabilities merged when equal (to 1e-9 in log) and pruned by
 * the node's completion bounds (all completions count: add the whole mass;
 * none can: drop); the completions from each middle node are enumerated once,
 * sorted, and each partial table takes the summed probability of the
 * completions that keep the whole table at or below the observed one.
 * Declined (with the estimate) at once when the box bound on the network is
 * 64 times the bound, or the partial tables before pruning 8 times; otherwise
 * run with `bound` as a hard budget on network steps plus partial tables
 * (declined when it is spent). null when the counts are not non-negative integers.
 *
 * @example
 * // women applicants admitted/rejected by department A–F (Bickel, Hammel &
 * // O'Connell 1975, Science 187, 398–404): n = 1835 is far beyond exact reach
 * fisherFreemanHalton([[89, 17, 202, 131, 94, 24], [19, 8, 391, 244, 299, 317]])
 * // { status: 'declined', workEstimate: 2.89e7, workBound: 2e6, reason: 'its work estimate … is above the bound …' }
 * // departments A and B alone (n = 133):
 * fisherFreemanHalton([[89, 17], [19, 8]]) // the 2×2 test: { status: 'computed', pValue: 0.1644…, … }
 */
export function fisherFreemanHalton(counts: CountMatrix, bound: ExactBound = DEFAULT_RXC_BOUND): ExactOutcome | null {
  if (counts.length === 0 || counts[0].length === 0 || !isCountTable(counts)) return null;
  if (isTwoByTwo(counts)) return fisherExact2x2(counts);
  const method: ExactMethod = 'network-rxc';
  // Put the shorter dimension down the rows: fewer cells per column step.
  let table = counts.map((row) => [...row]);
  if (table.length > table[0].length) table = transpose(table);
  const { rowTotals, colTotals, total } = margins(table);
  if (total > LARGEST_EXACT_INTEGER) return beyondExactIntegers(method, bound, total);
  const rowIndex = rowTotals.map((t, i) => (t > 0 ? i : -1)).filter((i) => i >= 0);
  const colIndex = colTotals
    .map((t, j) => (t > 0 ? j : -1))
    .filter((j) => j >= 0)
    .sort((x, y) => colTotals[y] - colTotals[x]);
  if (rowIndex.length < 2 || colIndex.length < 2) return { status: 'computed', pValue: 1, method, work: 0 };
  const rows = rowIndex.map((i) => rowTotals[i]);
  const cols = colIndex.map((j) => colTotals[j]);
  if (rowIndex.length === 2 && colIndex.length === 2) {
    return fisherExact2x2(rowIndex.map((i) => colIndex.map((j) => table[i][j])));
  }
  const stages = cols.length;
  if (stages * rows.length > MAX_NETWORK_DEPTH) {
    return { status: 'declined', method, workEstimate: null, workBound: bound.maxWork, reason: `the table is too wide for the network (${rows.length}×${stages} levels)` };
  }
  // The box bound overstates the network (often 10–100 times), so it only
  // refuses networks far beyond the bound; the network pass itself then
  // stops as soon as it reaches the bound.
  const networkEstimate = 2 * networkSizeEstimate(rows, cols);
  if (networkEstimate > NETWORK_ESTIMATE_SLACK * bound.maxWork) return overBound(method, bound, networkEstimate, 'network steps');

  // log P(observed), along the same column decomposition.
  let logObserved = 0;
  {
    const remaining = [...rows];
    for (let k = 0; k < stages; k++) {
      let sum = 0;
      for (const v of remaining) sum += v;
      logObserved -= logBinomialCoefficient(sum, cols[k]);
      rowIndex.forEach((i, s) => {
        const x = table[i][colIndex[k]];
        logObserved += logBinomialCoefficient(remaining[s], x);
        remaining[s] -= x;
      });
    }
  }
  const logThreshold = logObserved + Math.log1p(EXACT_RELATIVE_TOLERANCE);

  // Network pass: nodes stage by stage with their partial-table counts, then
  // backwards the completion bounds and completion counts.
  let work = 0;
  const network: Map<string, NetworkNode>[] = [];
  const rootRemaining = sortedCopy(rows);
  network.push(new Map([[keyOf(rootRemaining), { remaining: rootRemaining, pathsTo: 1, pathsFrom: 0, max: 0, min: 0 }]]));
  for (let k = 0; k < stages - 1; k++) {
    const next = new Map<string, NetworkNode>();
    for (const node of network[k].values()) {
      // Both passes visit the same fillings: stop once twice this one's count passes the bound.
      if (2 * work > bound.maxWork) return overBound(method, bound, 2 * work, 'network steps, counted so far');
      forEachFilling(node.remaining, cols[k], (after) => {
        work++;
        const sorted = sortedCopy(after);
        const key = keyOf(sorted);
        const child = next.get(key);
        if (child) child.pathsTo += node.pathsTo;
        else next.set(key, { remaining: sorted, pathsTo: node.pathsTo, pathsFrom: 0, max: 0, min: 0 });
      });
    }
    network.push(next);
  }
  for (const node of network[stages - 1].values()) node.pathsFrom = 1; // the last column is forced
  for (let k = stages - 2; k >= 0; k--) {
    for (const node of network[k].values()) {
      let max = -Infinity;
      let min = Infinity;
      let paths = 0;
      forEachFilling(node.remaining, cols[k], (after, logP) => {
        work++;
        const child = network[k + 1].get(keyOf(sortedCopy(after)))!;
        if (logP + child.max > max) max = logP + child.max;
        if (logP + child.min < min) min = logP + child.min;
        paths += child.pathsFrom;
      });
      node.max = max;
      node.min = min;
      node.pathsFrom = paths;
    }
  }

  // Where to meet: the column m with the fewest partial tables to visit
  // before it (forward) and completions after it (backward).
  let best = Infinity;
  let middle = stages - 1;
  let forward = 0;
  for (let m = 0; m < stages; m++) {
    if (m > 0) for (const node of network[m].values()) forward += node.pathsTo;
    let backward = 0;
    for (const node of network[m].values()) backward += node.pathsFrom * Math.max(1, stages - 1 - m);
    if (forward + backward < best) {
      best = forward + backward;
      middle = m;
    }
  }
  // Pruning by the completion bounds usually cuts this estimate by orders of
  // magnitude (a 2×7 table of n = 267: 2.5·10⁶ estimated, 1.6·10⁴ done), so
  // only a table far beyond the bound is declined here; below that the
  // enumeration runs with the bound as a hard budget.
  const estimate = work + best;
  if (estimate > PRUNING_SLACK * bound.maxWork) return overBound(method, bound, estimate, 'network steps and partial tables');
  const budgetSpent = (): ExactDeclined => ({
    status: 'declined',
    method,
    workEstimate: estimate,
    workBound: bound.maxWork,
    reason: `its work passed the bound of ${formatCount(bound.maxWork)} before the end (${formatCount(estimate)} network steps and partial tables before pruning)`,
  });

  // Forward: partial tables up to the middle column.
  let pValue = 0;
  let pasts = new Map<string, Map<number, Past>>([[keyOf(rootRemaining), new Map([[0, { logPast: 0, mass: 1 }]])]]);
  const decided = (node: NetworkNode, past: Past): 'all' | 'none' | 'open' => {
    if (past.logPast + node.max <= logThreshold) return 'all';
    if (past.logPast + node.min > logThreshold) return 'none';
    return 'open';
  };
  for (let k = 0; k < middle; k++) {
    const next = new Map<string, Map<number, Past>>();
    for (const [key, nodePasts] of pasts) {
      if (work > bound.maxWork) return budgetSpent();
      const node = network[k].get(key)!;
      for (const past of nodePasts.values()) {
        const verdict = decided(node, past);
        if (verdict === 'all') pValue += past.mass; // the completions' probabilities sum to 1
        if (verdict !== 'open') continue;
        forEachFilling(node.remaining, cols[k], (after, logP) => {
          work++;
          const childKey = keyOf(sortedCopy(after));
          let target = next.get(childKey);
          if (!target) {
            target = new Map();
            next.set(childKey, target);
          }
          const logPast = past.logPast + logP;
          const pastKey = Math.round(logPast * 1e9);
          const mass = past.mass * Math.exp(logP);
          const existing = target.get(pastKey);
          if (existing) existing.mass += mass;
          else target.set(pastKey, { logPast, mass });
        });
      }
    }
    pasts = next;
  }

  // Backward: the completions of each middle node, sorted by log probability.
  for (const [key, nodePasts] of pasts) {
    if (work > bound.maxWork) return budgetSpent();
    const node = network[middle].get(key)!;
    const open: Past[] = [];
    for (const past of nodePasts.values()) {
      const verdict = decided(node, past);
      if (verdict === 'all') pValue += past.mass;
      else if (verdict === 'open') open.push(past);
    }
    if (open.length === 0) continue;
    const completions = new Map<number, { logC: number; mass: number }>();
    const descend = (k: number, remaining: number[], logSoFar: number): void => {
      if (work > bound.maxWork) return; // the caller declines
      if (k === stages - 1) {
        const completionKey = Math.round(logSoFar * 1e9);
        const existing = completions.get(completionKey);
        if (existing) existing.mass += Math.exp(logSoFar);
        else completions.set(completionKey, { logC: logSoFar, mass: Math.exp(logSoFar) });
        return;
      }
      forEachFilling(remaining, cols[k], (after, logP) => {
        work++;
        descend(k + 1, after, logSoFar + logP);
      });
    };
    descend(middle, node.remaining, 0);
    if (work > bound.maxWork) return budgetSpent();
    const sorted = [...completions.values()].sort((x, y) => x.logC - y.logC);
    const cumulative = new Float64Array(sorted.length + 1);
    for (let t = 0; t < sorted.length; t++) cumulative[t + 1] = cumulative[t] + sorted[t].mass;
    for (const past of open) {
      // completions with logPast + logC ≤ threshold: a prefix of the sorted list
      const limit = logThreshold - past.logPast;
      let lo = 0;
      let hi = sorted.length;
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (sorted[mid].logC <= limit) lo = mid + 1;
        else hi = mid;
      }
      pValue += past.mass * cumulative[lo];
    }
  }
  return { status: 'computed', pValue: Math.min(1, pValue), method, work };
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
