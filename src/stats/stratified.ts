/**
 * Tests and estimates across layers: Cochran–Mantel–Haenszel, the
 * Mantel–Haenszel common odds ratio, Breslow–Day with its trend and
 * residuals.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { CountMatrix, margins } from './contingency.js';
import { compensatedSum } from '../numerics/compensatedSum.js';
import { complementsInSum, ddAdd, ddDivide, ddFromNumber, ddMultiply, ddProduct, ddScale, ddSubtract, ddValue, ddZero, DoubleDouble } from '../numerics/doubleDouble.js';
import { normalQuantile } from './normalDistribution.js';

/**
 * Tests and estimates for a stack of K two-way tables with the same levels
 * (one table per level of a third variable held fixed). Strata with fewer
 * than two observations carry no information and are passed over.
 */

/** Solves A x = b by Gaussian elimination with partial pivoting; null when A is singular. */
export function solveLinear(matrix: number[][], rhs: number[]): number[] | null {
  const n = rhs.length;
  const a = matrix.map((row, i) => [...row, rhs[i]]);
  const scale = Math.max(...matrix.flat().map(Math.abs), 0);
  for (let col = 0; col < n; col++) {
    let pivot = col;
    for (let r = col + 1; r < n; r++) if (Math.abs(a[r][col]) > Math.abs(a[pivot][col])) pivot = r;
    if (Math.abs(a[pivot][col]) <= 1e-12 * scale) return null;
    [a[col], a[pivot]] = [a[pivot], a[col]];
    for (let r = col + 1; r < n; r++) {
      const f = a[r][col] / a[col][col];
      for (let k = col; k <= n; k++) a[r][k] -= f * a[col][k];
    }
  }
  const x = new Array<number>(n).fill(0);
  for (let r = n - 1; r >= 0; r--) {
    let s = a[r][n];
    for (let k = r + 1; k < n; k++) s -= a[r][k] * x[k];
    x[r] = s / a[r][r];
  }
  return x;
}

/**
 * Generalized Cochran–Mantel–Haenszel statistic of general association
 * (Landis, Heyman & Koch 1978, Int. Stat. Rev. 46, 237–254), conditional
 * independence of rows and columns given the strata. With n_k the vector of
 * the first (r−1)(c−1) cells of stratum k, m_k its expectation under
 * independence and
 *   V_k = n_k²/(n_k − 1) · (D_{p_r} − p_r p_rᵀ) ⊗ (D_{p_c} − p_c p_cᵀ),
 * (p_r, p_c the first r−1 and c−1 marginal proportions),
 *   Q = (Σ(n_k − m_k))ᵀ (Σ V_k)⁻¹ (Σ(n_k − m_k)),  df = (r−1)(c−1).
 * For 2×2×K it is the Mantel–Haenszel (1959) statistic without continuity
 * correction. null when Σ V_k is singular.
 *
 * @example
 * // graduate admissions by department, men/women × admitted/rejected (Bickel, Hammel & O'Connell 1975, Science 187, 398–404)
 * const admissions = [[[512, 313], [89, 19]], [[353, 207], [17, 8]], [[120, 205], [202, 391]], [[138, 279], [131, 244]], [[53, 138], [94, 299]], [[22, 351], [24, 317]]];
 * cochranMantelHaenszel(admissions) // { statistic: 1.525, df: 1, pValue: 0.217 }: no sex difference within departments
 */
export function cochranMantelHaenszel(strata: readonly CountMatrix[]): TestResult | null {
  const r = strata[0].length;
  const c = strata[0][0].length;
  const size = (r - 1) * (c - 1);
  if (size === 0) return null;
  // Σ_k (n_k − m_k), each departure (n·n_ij − n_i.·n_.j)/n formed exactly in
  // double-double and summed so, since near conditional independence at large
  // n the departures are tiny against the counts (and may cancel across strata).
  const deviation = new Array<DoubleDouble>(size).fill(ddZero);
  const variance = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (const table of strata) {
    const { rowTotals, colTotals, total: n } = margins(table);
    if (n < 2) continue;
    const pr = rowTotals.map((v) => v / n);
    const pc = colTotals.map((v) => v / n);
    // p(1 − p) with 1 − p from the other margins, so a dominant level keeps its digits
    const otherRows = complementsInSum(rowTotals).map((v) => v / n);
    const otherCols = complementsInSum(colTotals).map((v) => v / n);
    const factor = (n * n) / (n - 1);
    for (let i = 0; i < r - 1; i++) {
      for (let j = 0; j < c - 1; j++) {
        const u = i * (c - 1) + j;
        const numerator = ddSubtract(ddProduct(n, table[i][j]), ddProduct(rowTotals[i], colTotals[j]));
        deviation[u] = ddAdd(deviation[u], ddDivide(numerator, n));
        for (let i2 = 0; i2 < r - 1; i2++) {
          const rowPart = i === i2 ? pr[i] * otherRows[i] : -pr[i] * pr[i2];
          for (let j2 = 0; j2 < c - 1; j2++) {
            const colPart = j === j2 ? pc[j] * otherCols[j] : -pc[j] * pc[j2];
            variance[u][i2 * (c - 1) + j2] += factor * rowPart * colPart;
          }
        }
      }
    }
  }
  const departures = deviation.map(ddValue);
  const solved = solveLinear(variance, departures);
  if (solved === null) return null;
  const statistic = Math.max(0, compensatedSum(departures.map((d, k) => d * solved[k])));
  return { statistic, df: size, pValue: upperTailChiSquare(statistic, size) };
}

export interface CommonOddsRatio {
  estimate: number;
  lower: number;
  upper: number;
  confidence: number;
}

/**
 * Mantel–Haenszel common odds ratio for 2×2×K tables,
 *   θ_MH = Σ a_k d_k / n_k ÷ Σ b_k c_k / n_k  (Mantel & Haenszel 1959),
 * with the Robins–Breslow–Greenland variance of log θ_MH
 * (Robins, Breslow & Greenland 1986, Biometrics 42, 311–323):
 *   Σ P_k R_k / (2R²) + Σ (P_k S_k + Q_k R_k) / (2RS) + Σ Q_k S_k / (2S²),
 * P_k = (a_k + d_k)/n_k, Q_k = (b_k + c_k)/n_k, R_k = a_k d_k/n_k, S_k = b_k c_k/n_k.
 *
 * @example
 * // graduate admissions by department, men/women × admitted/rejected (Bickel, Hammel & O'Connell 1975, Science 187, 398–404)
 * mantelHaenszelOddsRatio(admissions) // { estimate: 0.905, lower: 0.772, upper: 1.060, … }
 */
export function mantelHaenszelOddsRatio(strata: readonly CountMatrix[], confidence = 0.95): CommonOddsRatio | null {
  let R = 0;
  let S = 0;
  let PR = 0;
  let PSQR = 0;
  let QS = 0;
  for (const t of strata) {
    const [[a, b], [c, d]] = t;
    const n = a + b + c + d;
    if (n < 2) continue;
    const Rk = (a * d) / n;
    const Sk = (b * c) / n;
    const Pk = (a + d) / n;
    const Qk = (b + c) / n;
    R += Rk;
    S += Sk;
    PR += Pk * Rk;
    PSQR += Pk * Sk + Qk * Rk;
    QS += Qk * Sk;
  }
  if (!(R > 0 && S > 0)) return null;
  const estimate = R / S;
  const variance = PR / (2 * R * R) + PSQR / (2 * R * S) + QS / (2 * S * S);
  const z = normalQuantile(0.5 + confidence / 2);
  const half = z * Math.sqrt(variance);
  return { estimate, lower: Math.exp(Math.log(estimate) - half), upper: Math.exp(Math.log(estimate) + half), confidence };
}

/** One stratum's first cell against its expectation under a given common odds ratio. */
export interface StratumUnderCommonOdds {
  /** Observed a_k. */
  observed: number;
  /** A_k, the first cell that gives the stratum's margins the common odds ratio. */
  expected: number;
  /** Var_k = (1/A + 1/B + 1/C + 1/D)⁻¹, the approximate variance of a_k. */
  variance: number;
  /** a_k − A_k, formed in double-double (A_k refined by one Newton step), so it keeps its digits when A_k is near 10¹². */
  departure: number;
}

/**
 * The Mantel–Haenszel common odds ratio Σ a_k d_k / n_k ÷ Σ b_k c_k / n_k in
 * double-double (each product exact, each quotient and sum to about 2^-104):
 * near homogeneity at large n the Breslow–Day departures a_k − A_k move by
 * Var_k times the relative error of the ratio, which a double would make 1e-4
 * of a unit at n = 10¹².
 */
function mantelHaenszelRatioExact(strata: readonly CountMatrix[]): DoubleDouble | null {
  let R = ddZero;
  let S = ddZero;
  for (const t of strata) {
    const [[a, b], [c, d]] = t;
    const n = a + b + c + d;
    if (n < 2) continue;
    R = ddAdd(R, ddDivide(ddProduct(a, d), n));
    S = ddAdd(S, ddDivide(ddProduct(b, c), n));
  }
  if (!(R.hi > 0 && S.hi > 0)) return null;
  const q1 = R.hi / S.hi;
  const remainder = ddSubtract(R, ddScale(S, q1));
  return ddAdd(ddFromNumber(q1), ddFromNumber(ddValue(remainder) / S.hi));
}

/**
 * The shift δ that gives the 2×2 table [[a, b], [c, d]] the odds ratio θ
 * with its margins kept: (a + δ)(d + δ) = θ (b − δ)(c − δ), i.e.
 *   (1 − θ) δ² + (a + d + θ(b + c)) δ + (ad − θ bc) = 0,
 * the root with every cell non-negative (the left side minus the right rises
 * across that range, so there is exactly one). Solving for δ rather than for
 * A = a + δ keeps each cell a ± δ to its own precision (a cell of 10⁹ beside
 * single digits), and ad − θbc is formed in double-double, so δ keeps its
 * digits near homogeneity at large n. Stable root pair as in Press et al.,
 * Numerical Recipes, 3rd ed., §5.6; bisection if rounding leaves both outside.
 */
function shiftToOddsRatio(a: number, b: number, c: number, d: number, theta: DoubleDouble): number {
  const t = ddValue(theta);
  const low = -Math.min(a, d);
  const high = Math.min(b, c);
  const constant = ddValue(ddSubtract(ddProduct(a, d), ddMultiply(theta, ddProduct(b, c))));
  const linear = a + d + t * (b + c);
  const quadratic = 1 - t;
  const inRange = (x: number) => x >= low && x <= high;
  let candidates: number[];
  if (quadratic === 0) candidates = [-constant / linear];
  else {
    const q = -0.5 * (linear + Math.sqrt(Math.max(0, linear * linear - 4 * quadratic * constant)));
    candidates = [constant / q, q / quadratic];
  }
  const root = candidates.find(inRange);
  if (root !== undefined) return root;
  // g(δ) = (a + δ)(d + δ) − θ(b − δ)(c − δ) rises from ≤ 0 at low to ≥ 0 at high
  let lo = low;
  let hi = high;
  for (let i = 0; i < 200 && hi - lo > 0; i++) {
    const mid = lo + (hi - lo) / 2;
    if (mid === lo || mid === hi) break;
    if ((a + mid) * (d + mid) - t * (b - mid) * (c - mid) < 0) lo = mid;
    else hi = mid;
  }
  return lo + (hi - lo) / 2;
}

/**
 * The pieces of the Breslow–Day statistics (Breslow & Day 1980, Statistical
 * Methods in Cancer Research I, §4.4): for each stratum, the expected a_k = A
 * under the common odds ratio θ, the root of A(n − r1 − c1 + A) = θ (r1 − A)(c1 − A)
 * within the margins, and Var_k = (1/A + 1/B + 1/C + 1/D)⁻¹ with B = r1 − A,
 * C = c1 − A, D = n − r1 − c1 + A. null for a stratum with an empty row or
 * column (it says nothing about the odds ratio).
 */
export function breslowDayComponents(strata: readonly CountMatrix[], commonOddsRatio: number): (StratumUnderCommonOdds | null)[] {
  // The ratio as passed is a double; when it is the Mantel–Haenszel estimate
  // of these strata, its double-double value stands in for it.
  const exact = mantelHaenszelRatioExact(strata);
  const theta = exact !== null && ddValue(exact) === commonOddsRatio ? exact : ddFromNumber(commonOddsRatio);
  return strata.map((t) => {
    const [[a, b], [c, d]] = t;
    const n = a + b + c + d;
    const r1 = a + b;
    const c1 = a + c;
    if (r1 === 0 || c1 === 0 || r1 === n || c1 === n) return null;
    const shift = shiftToOddsRatio(a, b, c, d, theta);
    const variance = 1 / (1 / (a + shift) + 1 / (b - shift) + 1 / (c - shift) + 1 / (d + shift));
    if (!(variance > 0)) return null;
    return { observed: a, expected: a + shift, variance, departure: -shift };
  });
}

/**
 * Breslow–Day test of homogeneous odds ratios across 2×2×K tables
 * (Breslow & Day 1980, Statistical Methods in Cancer Research I, §4.4):
 *   X²_BD = Σ (a_k − A_k)² / Var_k  (see breslowDayComponents),
 * df = K − 1 over the strata with no empty margin (without Tarone's 1985 adjustment;
 * see breslowDayTarone).
 *
 * @example
 * // graduate admissions by department, men/women × admitted/rejected (Bickel, Hammel & O'Connell 1975, Science 187, 398–404)
 * breslowDay(admissions, 0.9047) // { statistic: 18.83, df: 5, pValue: 0.0021 }: department A differs
 */
export function breslowDay(strata: readonly CountMatrix[], commonOddsRatio: number): TestResult | null {
  const used = breslowDayComponents(strata, commonOddsRatio).filter((x): x is StratumUnderCommonOdds => x !== null);
  if (used.length < 2) return null;
  const statistic = compensatedSum(used.map((x) => x.departure ** 2 / x.variance));
  return { statistic, df: used.length - 1, pValue: upperTailChiSquare(statistic, used.length - 1) };
}

/**
 * Breslow–Day test with Tarone's correction (Tarone 1985, Biometrika 72,
 * 91–95), which makes the statistic asymptotically χ² when θ is the
 * Mantel–Haenszel estimate:
 *   X²_BDT = X²_BD − (Σ a_k − Σ A_k)² / Σ Var_k,  df = K − 1
 * over the strata with no empty margin. `uncorrected` is X²_BD.
 *
 * @example
 * // smoking and lung cancer in eight Chinese cities (Liu 1992): X²_BDT = 5.1997, p = 0.6356
 */
export function breslowDayTarone(strata: readonly CountMatrix[], commonOddsRatio: number): (TestResult & { uncorrected: number }) | null {
  const used = breslowDayComponents(strata, commonOddsRatio).filter((x): x is StratumUnderCommonOdds => x !== null);
  if (used.length < 2) return null;
  const uncorrected = compensatedSum(used.map((x) => x.departure ** 2 / x.variance));
  const totalDeparture = compensatedSum(used.map((x) => x.departure));
  const totalVariance = compensatedSum(used.map((x) => x.variance));
  const statistic = Math.max(0, uncorrected - (totalDeparture * totalDeparture) / totalVariance);
  const df = used.length - 1;
  return { statistic, df, pValue: upperTailChiSquare(statistic, df), uncorrected };
}

/**
 * Each stratum's standardized departure from the common odds ratio,
 * (a_k − A_k)/√Var_k: the signed square roots of the terms of the
 * Breslow–Day statistic (Breslow & Day 1980, §4.4). Positive when the
 * stratum's odds ratio is above the common one (A_k grows with θ), negative
 * below; about standard normal for one stratum looked at in advance. null
 * for a stratum with an empty margin.
 */
export function breslowDayResiduals(strata: readonly CountMatrix[], commonOddsRatio: number): (number | null)[] {
  return breslowDayComponents(strata, commonOddsRatio).map((x) => (x === null ? null : x.departure / Math.sqrt(x.variance)));
}

/**
 * Score test for a linear trend in the log odds ratio across ordered strata
 * with scores x_k (Breslow & Day 1980, Statistical Methods in Cancer Research I,
 * §4.4, the test of trend in the odds ratio): with A_k and Var_k under the
 * common odds ratio θ (the Mantel–Haenszel estimate),
 *   X²_trend = [Σ x_k (a_k − A_k)]² / [Σ x_k² Var_k − (Σ x_k Var_k)² / Σ Var_k],
 * 1 df. The published form takes Σ (a_k − A_k) = 0, which the
 * Mantel–Haenszel θ meets only approximately; the scores are therefore
 * centred first at their Var-weighted mean x̄ = Σ x_k Var_k / Σ Var_k (which
 * leaves the denominator unchanged), so that scores counted from 0 or given
 * as calendar years give the same test. `direction` is the sign of
 * Σ (x_k − x̄)(a_k − A_k): +1 when the odds ratio grows with the score.
 * null with fewer than two informative strata or all scores equal.
 */
export function breslowDayTrend(strata: readonly CountMatrix[], scores: readonly number[], commonOddsRatio: number): (TestResult & { direction: -1 | 0 | 1 }) | null {
  if (scores.length !== strata.length) throw new Error(`breslowDayTrend: ${strata.length} strata but ${scores.length} scores`);
  const used: { x: number; s: StratumUnderCommonOdds }[] = [];
  breslowDayComponents(strata, commonOddsRatio).forEach((s, k) => {
    if (s !== null) used.push({ x: scores[k], s });
  });
  if (used.length < 2) return null;
  const totalVariance = compensatedSum(used.map(({ s }) => s.variance));
  const centre = compensatedSum(used.map(({ x, s }) => x * s.variance)) / totalVariance;
  const score = compensatedSum(used.map(({ x, s }) => (x - centre) * s.departure));
  const denominator = compensatedSum(used.map(({ x, s }) => (x - centre) * (x - centre) * s.variance));
  if (!(denominator > 0)) return null;
  const statistic = (score * score) / denominator;
  return { statistic, df: 1, pValue: upperTailChiSquare(statistic, 1), direction: score > 0 ? 1 : score < 0 ? -1 : 0 };
}

/**
 * The root A in the feasible range of (1 − θ)A² + (n − r1 − c1 + θ(r1 + c1))A − θ r1 c1 = 0.
 *
 * @example
 * // graduate admissions by department, men/women × admitted/rejected (Bickel, Hammel & O'Connell 1975, Science 187, 398–404), department A under the common odds ratio
 * expectedCellUnderOddsRatio(825, 601, 933, 0.9047) // 529.26 men admitted (512 observed)
 */
export function expectedCellUnderOddsRatio(r1: number, c1: number, n: number, theta: number): number {
  // start from a table with these margins (the one nearest independence) and shift it
  const a = Math.min(Math.min(r1, c1), Math.max(Math.max(0, r1 + c1 - n), Math.round((r1 * c1) / n)));
  return a + shiftToOddsRatio(a, r1 - a, c1 - a, n - r1 - c1 + a, ddFromNumber(theta));
}
