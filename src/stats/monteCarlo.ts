import { CountMatrix, margins } from './contingency.js';
import { EXACT_RELATIVE_TOLERANCE } from './fisherExact.js';
import { SeededRandom } from './random.js';

export interface MonteCarloResult {
  pValue: number;
  simulations: number;
  seed: number;
  standardError: number;
}

export const DEFAULT_SEED = 20261201;
export const DEFAULT_SIMULATIONS = 100_000;

/**
 * Random two-way tables with given margins, by Patefield's algorithm
 * (Patefield 1981, Applied Statistics 30, 91–97, algorithm AS 159): cells are
 * filled row by row, each drawn from its conditional (hypergeometric)
 * distribution given the margins left over, by inversion that starts at the
 * conditional mode and walks outwards until the uniform deviate is covered.
 */
export class RandomTableSampler {
  private readonly logFactorials: Float64Array;
  private readonly columnLeft: Int32Array;
  readonly table: Int32Array;

  constructor(
    private readonly rowTotals: readonly number[],
    private readonly colTotals: readonly number[],
    private readonly random: SeededRandom,
  ) {
    const n = rowTotals.reduce((s, v) => s + v, 0);
    this.logFactorials = new Float64Array(n + 1);
    for (let k = 1; k <= n; k++) this.logFactorials[k] = this.logFactorials[k - 1] + Math.log(k);
    this.columnLeft = new Int32Array(colTotals.length);
    this.table = new Int32Array(rowTotals.length * colTotals.length);
  }

  /** Draws one table into `this.table` (row-major). */
  draw(): Int32Array {
    const r = this.rowTotals.length;
    const c = this.colTotals.length;
    const f = this.logFactorials;
    for (let j = 0; j < c; j++) this.columnLeft[j] = this.colTotals[j];
    let rowsBelow = this.rowTotals.reduce((s, v) => s + v, 0); // total of rows l..r−1
    for (let l = 0; l < r - 1; l++) {
      let rowLeft = this.rowTotals[l];
      let pool = rowsBelow; // unassigned total of rows l.. in columns m..
      for (let m = 0; m < c - 1; m++) {
        const colLeft = this.columnLeft[m];
        // x ~ Hypergeometric(pool, colLeft successes, rowLeft draws)
        const x = rowLeft === 0 || colLeft === 0 ? 0 : this.hypergeometric(pool, colLeft, rowLeft, f);
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

  private hypergeometric(population: number, successes: number, draws: number, f: Float64Array): number {
    const failures = population - successes;
    const low = Math.max(0, draws - failures);
    const high = Math.min(successes, draws);
    if (low === high) return low;
    const logDenominator = f[population] - f[draws] - f[population - draws];
    const pmf = (x: number) =>
      Math.exp(f[successes] - f[x] - f[successes - x] + f[failures] - f[draws - x] - f[failures - draws + x] - logDenominator);
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

  /** Σ log n_ij! of a table, the part of its log-probability that varies. */
  logFactorialSum(table: ArrayLike<number>): number {
    let s = 0;
    for (let k = 0; k < table.length; k++) s += this.logFactorials[table[k]];
    return s;
  }
}

/**
 * Monte Carlo version of the Fisher–Freeman–Halton test: the share of random
 * tables with the observed margins (Patefield 1981) that are no more likely
 * than the observed table (same rule and tolerance as the exact test). The
 * estimate (b + 1)/(N + 1) never reports zero (Davison & Hinkley 1997,
 * Bootstrap Methods and their Application, §4.2; Phipson & Smyth 2010);
 * standard error √(p(1 − p)/N).
 */
export function monteCarloExactTest(counts: CountMatrix, simulations = DEFAULT_SIMULATIONS, seed = DEFAULT_SEED): MonteCarloResult | null {
  for (const row of counts) for (const v of row) if (!Number.isInteger(v) || v < 0) return null;
  const { rowTotals, colTotals } = margins(counts);
  const rows = rowTotals.filter((t) => t > 0);
  const cols = colTotals.filter((t) => t > 0);
  if (rows.length < 2 || cols.length < 2) return null;
  const sampler = new RandomTableSampler(rows, cols, new SeededRandom(seed));
  const observed = sampler.logFactorialSum(counts.flat());
  const threshold = observed - Math.log1p(EXACT_RELATIVE_TOLERANCE);
  let asExtreme = 0;
  for (let s = 0; s < simulations; s++) {
    if (sampler.logFactorialSum(sampler.draw()) >= threshold) asExtreme++;
  }
  const pValue = (asExtreme + 1) / (simulations + 1);
  return { pValue, simulations, seed, standardError: Math.sqrt((pValue * (1 - pValue)) / simulations) };
}
