/**
 * The simulated exact p-value: random tables with the observed margins,
 * within a work bound.
 */
import { CountMatrix, margins } from './contingency.js';
import { EXACT_RELATIVE_TOLERANCE, ExactBound, logHypergeometric } from './fisherExact.js';
import { logFactorial, stirlingError } from './gamma.js';
import { SeededRandom } from './random.js';

export interface MonteCarloResult {
  pValue: number;
  simulations: number;
  seed: number;
  standardError: number;
}

export const DEFAULT_SEED = 20261201;
export const DEFAULT_SIMULATIONS = 100_000;
/** Work bound of the simulation: 2·10⁸ steps of the hypergeometric walks (a few seconds). */
export const DEFAULT_SIMULATION_BOUND: ExactBound = { maxWork: 200_000_000 };
/** Tables up to this total keep a table of log k! (8 MB); larger ones compute what they need. */
const LOG_FACTORIAL_TABLE_LIMIT = 1_000_000;

/**
 * log(a!/b!) for non-negative integers, without the cancellation of two
 * log-factorials near 10⁹: a sum of logs for nearby arguments, otherwise
 * Stirling's series with its error term δ (Loader 2000):
 *   (a + ½) log1p((a − b)/b) + (a − b)(log b − 1) + δ(a) − δ(b).
 */
export function logFactorialRatio(a: number, b: number): number {
  if (a === b) return 0;
  if (a < b) return -logFactorialRatio(b, a);
  if (a - b <= 32) {
    let s = 0;
    for (let k = b + 1; k <= a; k++) s += Math.log(k);
    return s;
  }
  if (b < 16) return logFactorial(a) - logFactorial(b);
  return (a + 0.5) * Math.log1p((a - b) / b) + (a - b) * (Math.log(b) - 1) + stirlingError(a) - stirlingError(b);
}

/**
 * The expected number of steps of one simulated table: each cell's draw walks
 * out from its conditional mode about one standard deviation,
 * √(E_ij (1 − n_i./n)(1 − n_.j/n)), plus one step.
 */
export function simulationWorkPerTable(rowTotals: readonly number[], colTotals: readonly number[]): number {
  const n = rowTotals.reduce((s, v) => s + v, 0);
  let steps = 0;
  for (const ri of rowTotals) {
    for (const cj of colTotals) {
      const expected = (ri * cj) / n;
      steps += 1 + Math.sqrt(Math.max(0, expected * ((n - ri) / n) * ((n - cj) / n)));
    }
  }
  return steps;
}

/**
 * Random two-way tables with given margins, by Patefield's algorithm
 * (Patefield 1981, Applied Statistics 30, 91–97, algorithm AS 159): cells are
 * filled row by row, each drawn from its conditional (hypergeometric)
 * distribution given the margins left over, by inversion that starts at the
 * conditional mode and walks outwards until the uniform deviate is covered.
 */
export class RandomTableSampler {
  /** log k! for k ≤ n while n is small; null for large n (computed on demand). */
  private readonly logFactorials: Float64Array | null;
  private readonly columnLeft: Float64Array;
  readonly table: Float64Array;

  constructor(
    private readonly rowTotals: readonly number[],
    private readonly colTotals: readonly number[],
    private readonly random: SeededRandom,
  ) {
    const n = rowTotals.reduce((s, v) => s + v, 0);
    if (n <= LOG_FACTORIAL_TABLE_LIMIT) {
      this.logFactorials = new Float64Array(n + 1);
      for (let k = 1; k <= n; k++) this.logFactorials[k] = this.logFactorials[k - 1] + Math.log(k);
    } else {
      this.logFactorials = null;
    }
    this.columnLeft = new Float64Array(colTotals.length);
    this.table = new Float64Array(rowTotals.length * colTotals.length);
  }

  /** Draws one table into `this.table` (row-major). */
  draw(): Float64Array {
    const r = this.rowTotals.length;
    const c = this.colTotals.length;
    for (let j = 0; j < c; j++) this.columnLeft[j] = this.colTotals[j];
    let rowsBelow = this.rowTotals.reduce((s, v) => s + v, 0); // total of rows l..r−1
    for (let l = 0; l < r - 1; l++) {
      let rowLeft = this.rowTotals[l];
      let pool = rowsBelow; // unassigned total of rows l.. in columns m..
      for (let m = 0; m < c - 1; m++) {
        const colLeft = this.columnLeft[m];
        // x ~ Hypergeometric(pool, colLeft successes, rowLeft draws)
        const x = rowLeft === 0 || colLeft === 0 ? 0 : this.hypergeometric(pool, colLeft, rowLeft);
        this.table[l * c + m] = x;
        rowLeft -= x;
        this.columnLeft[m] -= x;
        pool -= colLeft;
      }
      this.table[l * c + c - 1] = rowLeft;
      this.columnLeft[c - 1] -= rowLeft;
      rowsBelow -= this.rowTotals[l];
    }
    for (let j = 0; j < c; j++) this.table[(r - 1) * c + j] = this.columnLeft[j];
    return this.table;
  }

  private hypergeometric(population: number, successes: number, draws: number): number {
    const failures = population - successes;
    const low = Math.max(0, draws - failures);
    const high = Math.min(successes, draws);
    if (low === high) return low;
    const f = this.logFactorials;
    const pmf = (x: number) =>
      f === null
        ? Math.exp(logHypergeometric(x, successes, failures, draws))
        : Math.exp(f[successes] - f[x] - f[successes - x] + f[failures] - f[draws - x] - f[failures - draws + x] - (f[population] - f[draws] - f[population - draws]));
    const mode = Math.min(high, Math.max(low, Math.floor(((draws + 1) * (successes + 1)) / (population + 2))));
    let u = this.random.nextDouble();
    const pMode = pmf(mode);
    if (u < pMode) return mode;
    u -= pMode;
    // Walk outwards, alternating up and down, with the ratio recurrence.
    let up = mode;
    let down = mode;
    let pUp = pMode;
    let pDown = pMode;
    for (;;) {
      const canUp = up < high;
      const canDown = down > low;
      if (!canUp && !canDown) return mode; // rounding left u uncovered
      if (canUp) {
        pUp *= ((successes - up) * (draws - up)) / ((up + 1) * (failures - draws + up + 1));
        up++;
        if (u < pUp) return up;
        u -= pUp;
      }
      if (canDown) {
        pDown *= (down * (failures - draws + down)) / ((successes - down + 1) * (draws - down + 1));
        down--;
        if (u < pDown) return down;
        u -= pDown;
      }
    }
  }

  /**
   * log(P(table)/P(reference)) = Σ log(ref_ij!/table_ij!), the part of the
   * log-probability that varies between tables with the same margins.
   */
  logProbabilityRatio(table: ArrayLike<number>, reference: ArrayLike<number>): number {
    let s = 0;
    const f = this.logFactorials;
    for (let k = 0; k < table.length; k++) s += f === null ? logFactorialRatio(reference[k], table[k]) : f[reference[k]] - f[table[k]];
    return s;
  }
}

export type MonteCarloOutcome =
  | ({ status: 'computed' } & MonteCarloResult)
  | { status: 'declined'; workEstimate: number; workBound: number; reason: string };

/**
 * Monte Carlo version of the Fisher–Freeman–Halton test: the share of random
 * tables with the observed margins (Patefield 1981) that are no more likely
 * than the observed table (same rule and tolerance as the exact test). The
 * estimate (b + 1)/(N + 1) never reports zero (Davison & Hinkley 1997,
 * Bootstrap Methods and their Application, §4.2; Phipson & Smyth 2010,
 * Stat. Appl. Genet. Mol. Biol. 9, art. 39); standard error √(p(1 − p)/N).
 * The work (simulations × expected steps per table) is estimated first and
 * the simulation declined above `bound`. null unless the counts are
 * non-negative integers with two non-empty rows and columns.
 *
 * @example
 * // Fisher's tea-tasting table: about 0.486, as the exact test
 * monteCarloExactTest([[3, 1], [1, 3]], 10000, 1) // { status: 'computed', pValue: ≈0.486, … }
 */
export function monteCarloExactTest(
  counts: CountMatrix,
  simulations = DEFAULT_SIMULATIONS,
  seed = DEFAULT_SEED,
  bound: ExactBound = DEFAULT_SIMULATION_BOUND,
): MonteCarloOutcome | null {
  for (const row of counts) for (const v of row) if (!Number.isInteger(v) || v < 0) return null;
  const { rowTotals, colTotals, total } = margins(counts);
  const rowKeep = rowTotals.map((t, i) => (t > 0 ? i : -1)).filter((i) => i >= 0);
  const colKeep = colTotals.map((t, j) => (t > 0 ? j : -1)).filter((j) => j >= 0);
  if (rowKeep.length < 2 || colKeep.length < 2) return null;
  const rows = rowKeep.map((i) => rowTotals[i]);
  const cols = colKeep.map((j) => colTotals[j]);
  const workEstimate = simulations * simulationWorkPerTable(rows, cols);
  if (total > Number.MAX_SAFE_INTEGER) {
    return { status: 'declined', workEstimate, workBound: bound.maxWork, reason: `the total count ${total.toExponential(3)} is beyond 2^53, where counts are no longer exact integers` };
  }
  if (workEstimate > bound.maxWork) {
    return { status: 'declined', workEstimate, workBound: bound.maxWork, reason: `its work estimate (${workEstimate.toExponential(2)} steps) is above the bound of ${bound.maxWork.toExponential(2)}` };
  }
  const sampler = new RandomTableSampler(rows, cols, new SeededRandom(seed));
  const observed = rowKeep.flatMap((i) => colKeep.map((j) => counts[i][j]));
  const threshold = -Math.log1p(EXACT_RELATIVE_TOLERANCE);
  let asExtreme = 0;
  for (let s = 0; s < simulations; s++) {
    // P(draw) ≤ P(observed)(1 + 1e-7)  ⇔  log(P(observed)/P(draw)) ≥ −log1p(1e-7)
    if (sampler.logProbabilityRatio(observed, sampler.draw()) >= threshold) asExtreme++;
  }
  const pValue = (asExtreme + 1) / (simulations + 1);
  return { status: 'computed', pValue, simulations, seed, standardError: Math.sqrt((pValue * (1 - pValue)) / simulations) };
}
