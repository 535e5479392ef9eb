/**
 * Sequential simulated p-values: random tables drawn a batch at a time until
 * the decision at alpha is settled.
 */
import type { CountMatrix } from './contingency.js';
import { margins } from './contingency.js';
import { EXACT_RELATIVE_TOLERANCE } from './fisherExact.js';
import { Adjustment, adjustPValues } from './multipleTesting.js';
import { MonteCarloResult, RandomTableSampler } from './monteCarlo.js';
import { SeededRandom } from './random.js';

/**
 * A simulated exact p-value that grows a batch of random tables at a time.
 * The tables come from the same sampler, seed and rule as
 * `monteCarloExactTest`, in the same order, so a run extended to N tables
 * gives exactly the p-value of a fixed run of N tables.
 */
export class GrowingSimulation {
  draws = 0;
  asExtreme = 0;
  private readonly sampler: RandomTableSampler | null;
  private readonly observed: number[];

  constructor(
    counts: CountMatrix,
    readonly seed: number,
  ) {
    const { rowTotals, colTotals } = margins(counts);
    const rowKeep = rowTotals.map((t, i) => (t > 0 ? i : -1)).filter((i) => i >= 0);
    const colKeep = colTotals.map((t, j) => (t > 0 ? j : -1)).filter((j) => j >= 0);
    const usable = counts.every((row) => row.every((v) => Number.isInteger(v) && v >= 0)) && rowKeep.length >= 2 && colKeep.length >= 2;
    this.sampler = usable ? new RandomTableSampler(rowKeep.map((i) => rowTotals[i]), colKeep.map((j) => colTotals[j]), new SeededRandom(seed)) : null;
    this.observed = rowKeep.flatMap((i) => colKeep.map((j) => counts[i][j]));
  }

  get usable(): boolean {
    return this.sampler !== null;
  }

  /** Draws tables until `total` have been drawn. */
  extendTo(total: number): void {
    const sampler = this.sampler;
    if (!sampler) return;
    // The rule of monteCarloExactTest: P(draw) ≤ P(observed)(1 + 1e-7).
    const threshold = -Math.log1p(EXACT_RELATIVE_TOLERANCE);
    for (; this.draws < total; this.draws++) {
      if (sampler.logProbabilityRatio(this.observed, sampler.draw()) >= threshold) this.asExtreme++;
    }
  }

  /** (b + 1)/(N + 1), never zero (Davison & Hinkley 1997, §4.2; Phipson & Smyth 2010). */
  estimate(): number {
    return (this.asExtreme + 1) / (this.draws + 1);
  }

  result(): MonteCarloResult {
    const pValue = this.estimate();
    return { pValue, simulations: this.draws, seed: this.seed, standardError: Math.sqrt((pValue * (1 - pValue)) / Math.max(1, this.draws)) };
  }
}

/** Relative entropy of Bernoulli(q) from Bernoulli(p), 0·log 0 taken as 0. */
function bernoulliDivergence(q: number, p: number): number {
  const term = (x: number, y: number) => (x === 0 ? 0 : x * Math.log(x / y));
  return term(q, p) + term(1 - q, 1 - p);
}

/**
 * Confidence bounds for a binomial proportion from the Chernoff–Hoeffding
 * inequality P(B/N ≤ q) ≤ exp(−N·D(q‖p)) for p > q (and its mirror), D the
 * relative entropy (Hoeffding 1963, J. Am. Stat. Assoc. 58, 13–30, Thm 1):
 * each bound misses the true p with probability at most e^(−L), where
 * L = `logInverseRisk`. Slightly wider than the Clopper–Pearson interval,
 * and valid at every N.
 */
export function binomialDivergenceBounds(successes: number, trials: number, logInverseRisk: number): { lower: number; upper: number } {
  if (trials <= 0) return { lower: 0, upper: 1 };
  const q = successes / trials;
  const limit = logInverseRisk / trials;
  const solve = (from: number, to: number): number => {
    // D(q‖p) grows as p moves away from q; bisect for D = limit between q and the end.
    let inside = from;
    let outside = to;
    if (bernoulliDivergence(q, to) <= limit) return to;
    for (let k = 0; k < 100; k++) {
      const mid = (inside + outside) / 2;
      if (bernoulliDivergence(q, mid) <= limit) inside = mid;
      else outside = mid;
      if (outside - inside <= 1e-12 * Math.max(outside, 1e-300)) break;
    }
    return outside;
  };
  return { lower: q === 0 ? 0 : solve(q, 0), upper: q === 1 ? 1 : solve(q, 1) };
}

export interface SequentialSettings {
  /** Tables drawn at the first look; each later look doubles them. */
  firstLook: number;
  /** The most tables drawn for one p-value. */
  maxDraws: number;
  /** Chance, per simulated p-value, that a decision differs from the one its exact p-value would give. */
  risk: number;
}

export const DEFAULT_SEQUENTIAL: SequentialSettings = { firstLook: 128, maxDraws: 100_000, risk: 1e-3 };

export type SequentialStop = 'clearly-passes' | 'clearly-fails' | 'limit';

export interface SequentialOutcome {
  /** Index into the p-values given: where a simulated one stopped, and why. */
  stop: SequentialStop;
  draws: number;
}

/**
 * Decides a family of tests, some of whose p-values are simulated, with
 * as few random tables as the decision needs (sequential Monte Carlo tests:
 * Besag & Clifford 1991, Biometrika 78, 301–304, stop drawing once the
 * answer is clear; the family-wide rule follows Gandy & Hahn 2014, Scand. J.
 * Stat. 41, 1083–1101, "MMCTest").
 *
 * Each simulated p-value is drawn in looks of 128, 256, 512, … tables up to
 * `maxDraws`. At every look it gets Chernoff–Hoeffding bounds whose risk is
 * split evenly over the looks and both sides (a union bound), intersected
 * with the bounds of earlier looks, so that with probability at least
 * 1 − `risk` the true p-value stays inside its bounds throughout. The
 * adjustment in force is monotone (raising any p-value never lowers any
 * adjusted one: Bonferroni, Holm, Benjamini–Hochberg), so a test whose
 * adjusted p-value is at most α even with every undecided p-value at its
 * upper bound passes whatever those turn out to be, and one whose adjusted
 * p-value exceeds α even with all at their lower bounds fails: those stop.
 * Special cases: a p-value clearly above α fails under any adjustment; one
 * clearly below α/m passes under any. Undecided p-values draw until
 * `maxDraws`. Deterministic for a given seed.
 */
export function sequentialDecisions(
  fixed: readonly (number | null)[],
  simulations: readonly (GrowingSimulation | null)[],
  adjustment: Adjustment,
  alpha: number,
  settings: SequentialSettings = DEFAULT_SEQUENTIAL,
): (SequentialOutcome | null)[] {
  const count = fixed.length;
  const looks: number[] = [];
  for (let n = settings.firstLook; n < settings.maxDraws; n *= 2) looks.push(n);
  looks.push(settings.maxDraws);
  const logInverseRisk = Math.log((2 * looks.length) / settings.risk);
  const lower = new Float64Array(count);
  const upper = new Float64Array(count).fill(1);
  const outcomes: (SequentialOutcome | null)[] = new Array(count).fill(null);
  const open = new Set<number>();
  for (let i = 0; i < count; i++) {
    const sim = simulations[i];
    if (sim && sim.usable) open.add(i);
    else {
      lower[i] = fixed[i] ?? 1;
      upper[i] = fixed[i] ?? 1;
    }
  }
  for (const n of looks) {
    if (open.size === 0) break;
    for (const i of open) {
      const sim = simulations[i] as GrowingSimulation;
      sim.extendTo(n);
      const b = binomialDivergenceBounds(sim.asExtreme, sim.draws, logInverseRisk);
      lower[i] = Math.max(lower[i], b.lower);
      upper[i] = Math.min(upper[i], b.upper);
      if (lower[i] > upper[i]) lower[i] = upper[i]; // bounds crossed: a one-in-1/risk event; keep them a point
    }
    const optimistic = adjustPValues([...lower], adjustment);
    const pessimistic = adjustPValues([...upper], adjustment);
    for (const i of [...open]) {
      const sim = simulations[i] as GrowingSimulation;
      if (pessimistic[i] <= alpha) outcomes[i] = { stop: 'clearly-passes', draws: sim.draws };
      else if (optimistic[i] > alpha) outcomes[i] = { stop: 'clearly-fails', draws: sim.draws };
      else continue;
      open.delete(i);
    }
  }
  for (const i of open) outcomes[i] = { stop: 'limit', draws: (simulations[i] as GrowingSimulation).draws };
  return outcomes;
}
