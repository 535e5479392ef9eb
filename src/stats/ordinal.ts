/**
 * Ordinal measures (gamma, Kendall's tau-b and tau-c, Somers' d) with their
 * standard errors, and the linear-by-linear test.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { compensatedSum } from '../numerics/compensatedSum.js';
import { CountMatrix, margins } from './contingency.js';
import { complementsInSum, ddAdd, ddFromNumber, ddMultiply, ddProduct, ddScale, ddSubtract, ddValue, ddZero, DoubleDouble } from '../numerics/doubleDouble.js';

/**
 * Ordinal measures for a table whose rows and columns are both ordered (in
 * the level order in force). For each cell,
 *   A_ij = Σ_{k<i,l<j} n_kl + Σ_{k>i,l>j} n_kl   (concordant with ij),
 *   D_ij = Σ_{k<i,l>j} n_kl + Σ_{k>i,l<j} n_kl   (discordant with ij),
 * and P = Σ n_ij A_ij, Q = Σ n_ij D_ij (each twice the number of pairs).
 * Asymptotic standard errors (non-null, "ASE1") and null standard errors
 * ("ASE0") follow Brown & Benedetti (1977), J. Am. Stat. Assoc. 72, 309–315,
 * and Agresti (2010), Analysis of Ordinal Categorical Data, 2nd ed., §7.
 */
export interface OrdinalEstimate {
  estimate: number | null;
  /** Asymptotic standard error without assuming independence. */
  standardError: number | null;
  /** z = estimate / null standard error. */
  z: number | null;
  /** Two-sided p-value of z (normal approximation). */
  pValue: number | null;
}

interface PairSums {
  A: number[][];
  D: number[][];
  /** A_ij − D_ij, formed without cancellation. */
  Delta: number[][];
  P: number;
  Q: number;
  /** P − Q, formed without cancellation (a difference of two sums near n²). */
  PminusQ: number;
  /** Q A_ij − P D_ij, formed without cancellation (for the standard error of gamma). */
  gammaTerms: number[][];
  n: number;
  rowTotals: number[];
  colTotals: number[];
  /** n − n_i. and n − n_.j, summed from the other margins. */
  otherRows: number[];
  otherCols: number[];
}

/**
 * The pair sums. Prefix sums of the table are kept in double-double, so every
 * block sum, every A_ij − D_ij and P − Q = Σ n_ij (A_ij − D_ij) are exact for
 * whole counts below 2^53 and accurate to about 2^-100 otherwise; near
 * independence P and Q agree to many digits and their difference would
 * otherwise lose them.
 */
function pairSums(counts: CountMatrix): PairSums {
  const r = counts.length;
  const c = counts[0].length;
  // 2-D prefix sums: S[i][j] = Σ_{k<i, l<j} n_kl
  const S: DoubleDouble[][] = Array.from({ length: r + 1 }, () => new Array<DoubleDouble>(c + 1).fill(ddZero));
  for (let i = 0; i < r; i++) {
    for (let j = 0; j < c; j++) {
      S[i + 1][j + 1] = ddAdd(ddSubtract(ddAdd(S[i][j + 1], S[i + 1][j]), S[i][j]), ddFromNumber(counts[i][j]));
    }
  }
  const block = (i0: number, i1: number, j0: number, j1: number): DoubleDouble =>
    i1 <= i0 || j1 <= j0 ? ddZero : ddAdd(ddSubtract(S[i1][j1], S[i0][j1]), ddSubtract(S[i0][j0], S[i1][j0]));
  const A: number[][] = [];
  const D: number[][] = [];
  const Delta: number[][] = [];
  const exactA: DoubleDouble[][] = [];
  const exactD: DoubleDouble[][] = [];
  let difference = ddZero;
  let exactP = ddZero;
  let exactQ = ddZero;
  for (let i = 0; i < r; i++) {
    A.push([]);
    D.push([]);
    Delta.push([]);
    exactA.push([]);
    exactD.push([]);
    for (let j = 0; j < c; j++) {
      const a = ddAdd(block(0, i, 0, j), block(i + 1, r, j + 1, c));
      const d = ddAdd(block(0, i, j + 1, c), block(i + 1, r, 0, j));
      const delta = ddSubtract(a, d);
      A[i].push(ddValue(a));
      D[i].push(ddValue(d));
      Delta[i].push(ddValue(delta));
      exactA[i].push(a);
      exactD[i].push(d);
      difference = ddAdd(difference, ddScale(delta, counts[i][j]));
      exactP = ddAdd(exactP, ddScale(a, counts[i][j]));
      exactQ = ddAdd(exactQ, ddScale(d, counts[i][j]));
    }
  }
  const gammaTerms = exactA.map((row, i) => row.map((a, j) => ddValue(ddSubtract(ddMultiply(exactQ, a), ddMultiply(exactP, exactD[i][j])))));
  const { rowTotals, colTotals, total } = margins(counts);
  return {
    A,
    D,
    Delta,
    P: ddValue(exactP),
    Q: ddValue(exactQ),
    PminusQ: ddValue(difference),
    gammaTerms,
    n: total,
    rowTotals,
    colTotals,
    otherRows: complementsInSum(rowTotals),
    otherCols: complementsInSum(colTotals),
  };
}

function twoSidedNormal(z: number): number {
  return upperTailChiSquare(z * z, 1);
}

function estimateWith(estimate: number | null, ase1Squared: number | null, ase0: number | null): OrdinalEstimate {
  if (estimate === null || !Number.isFinite(estimate)) return { estimate: null, standardError: null, z: null, pValue: null };
  const standardError = ase1Squared !== null && ase1Squared >= 0 && Number.isFinite(ase1Squared) ? Math.sqrt(ase1Squared) : null;
  const z = ase0 !== null && ase0 > 0 && Number.isFinite(ase0) ? estimate / ase0 : null;
  return { estimate, standardError, z, pValue: z === null ? null : twoSidedNormal(z) };
}

/**
 * Σ n_ij (A_ij − D_ij)² − (P − Q)²/n, the core of the null variances, as the
 * centred sum Σ n_ij (Δ_ij − (P − Q)/n)² (Σ n_ij Δ_ij = P − Q), which has no
 * cancellation.
 */
function nullCore(s: PairSums, counts: CountMatrix): number {
  const mean = s.PminusQ / s.n;
  const terms: number[] = [];
  counts.forEach((row, i) => row.forEach((v, j) => terms.push(v * (s.Delta[i][j] - mean) ** 2)));
  return compensatedSum(terms);
}

export interface OrdinalMeasures {
  gamma: OrdinalEstimate;
  kendallTauB: OrdinalEstimate;
  kendallTauC: OrdinalEstimate;
  somersDColsGivenRows: OrdinalEstimate;
  somersDRowsGivenCols: OrdinalEstimate;
}

/**
 * Goodman–Kruskal gamma γ = (P − Q)/(P + Q) (Goodman & Kruskal 1954);
 *   ASE1 = 4/(P+Q)² √(Σ n_ij (Q A_ij − P D_ij)²),  ASE0 = 2/(P+Q) √(core).
 * Kendall's tau-b τ_b = (P − Q)/√(w_r w_c), w_r = n² − Σ n_i.², w_c = n² − Σ n_.j²
 *   (Kendall 1945); ASE1 = (1/w²) √(Σ n_ij (2w d_ij + τ_b v_ij)² − n³ τ_b² (w_r + w_c)²)
 *   with w = √(w_r w_c), d_ij = A_ij − D_ij, v_ij = n_i. w_c + n_.j w_r; ASE0 = 2/w √(core).
 * Stuart's tau-c τ_c = m(P − Q)/(n²(m − 1)), m = min(r, c) (Stuart 1953);
 *   ASE1 = ASE0 = 2m/((m−1)n²) √(core).
 * Somers' d(C|R) = (P − Q)/w_r (Somers 1962, Am. Sociol. Rev. 27, 799–811);
 *   ASE1 = 2/w_r² √(Σ n_ij (w_r d_ij − (P − Q)(n − n_i.))²), ASE0 = 2/w_r √(core);
 *   d(R|C) likewise with w_c and n_.j.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135); for a 2×2 table gamma is Yule's Q
 * ordinalMeasures([[189, 10845], [104, 10933]]).gamma // { estimate: 0.2938, standardError: 0.0561, z: 5.004, pValue: 5.61e-7 }
 */
export function ordinalMeasures(counts: CountMatrix): OrdinalMeasures {
  const s = pairSums(counts);
  const { Delta, P, Q, PminusQ, n, rowTotals, colTotals, otherRows, otherCols } = s;
  const core = nullCore(s, counts);
  const r = counts.length;
  const c = counts[0].length;
  const sumCells = (f: (v: number, i: number, j: number) => number) => {
    const terms: number[] = [];
    counts.forEach((row, i) => row.forEach((v, j) => terms.push(f(v, i, j))));
    return compensatedSum(terms);
  };

  const gamma = estimateWith(
    P + Q > 0 ? PminusQ / (P + Q) : null,
    P + Q > 0 ? (16 / (P + Q) ** 4) * sumCells((v, i, j) => v * s.gammaTerms[i][j] ** 2) : null,
    P + Q > 0 ? (2 / (P + Q)) * Math.sqrt(core) : null,
  );

  // w_r = n² − Σ n_i.² = Σ n_i. (n − n_i.), likewise w_c
  const wr = compensatedSum(rowTotals.map((v, i) => v * otherRows[i]));
  const wc = compensatedSum(colTotals.map((v, j) => v * otherCols[j]));
  const w = Math.sqrt(wr) * Math.sqrt(wc);
  const tauB = w > 0 ? PminusQ / w : null;
  // Σ n_ij (2wΔ_ij + τ v_ij)² − n³τ²(w_r + w_c)² is Σ n_ij (x_ij − x̄)² with
  // x̄ = τ n (w_r + w_c); x_ij − x̄ = 2wΔ_ij − τ((n − n_i.) w_c + (n − n_.j) w_r).
  const kendallTauB = estimateWith(
    tauB,
    tauB === null ? null : sumCells((v, i, j) => v * (2 * w * Delta[i][j] - tauB * (otherRows[i] * wc + otherCols[j] * wr)) ** 2) / (wr * wr * wc * wc),
    w > 0 ? (2 / w) * Math.sqrt(core) : null,
  );

  const m = Math.min(r, c);
  const tauCFactor = m > 1 ? (2 * m) / ((m - 1) * n * n) : null;
  const kendallTauC = estimateWith(
    m > 1 ? (m * PminusQ) / (n * n * (m - 1)) : null,
    tauCFactor === null ? null : tauCFactor * tauCFactor * core,
    tauCFactor === null ? null : tauCFactor * Math.sqrt(core),
  );

  const somers = (weight: number, other: (i: number, j: number) => number) =>
    estimateWith(
      weight > 0 ? PminusQ / weight : null,
      weight > 0 ? (4 / weight ** 4) * sumCells((v, i, j) => v * (weight * Delta[i][j] - PminusQ * other(i, j)) ** 2) : null,
      weight > 0 ? (2 / weight) * Math.sqrt(core) : null,
    );

  return {
    gamma,
    kendallTauB,
    kendallTauC,
    somersDColsGivenRows: somers(wr, (i) => otherRows[i]),
    somersDRowsGivenCols: somers(wc, (_i, j) => otherCols[j]),
  };
}

/**
 * Linear-by-linear association test M² = (n − 1) r², df 1, where r is the
 * Pearson correlation of integer scores 1..R and 1..C over the table
 * (Mantel 1963, J. Am. Stat. Assoc. 58, 690–700; Agresti 2013 §3.4.1).
 * The cross-product sum is formed from the departures from independence,
 *   n·s_xy = Σ_ij (n n_ij − n_i. n_.j) i j,
 * each numerator exact in double-double, and the sums of squares from pairs
 * of levels, n·s_xx = Σ_{i<k} n_i. n_k. (k − i)², all terms non-negative, so
 * a correlation near 0 keeps its relative accuracy.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): for a 2×2 table M² = (n − 1)/n · X²
 * linearByLinear([[189, 10845], [104, 10933]]) // { statistic: 25.01, df: 1, pValue: 5.70e-7 }
 */
export function linearByLinear(counts: CountMatrix): TestResult | null {
  const { rowTotals, colTotals, total: n } = margins(counts);
  if (n < 2) return null;
  let crossProducts = ddZero;
  counts.forEach((row, i) =>
    row.forEach((v, j) => {
      const numerator = ddSubtract(ddProduct(n, v), ddProduct(rowTotals[i], colTotals[j]));
      crossProducts = ddAdd(crossProducts, ddScale(numerator, (i + 1) * (j + 1)));
    }),
  );
  const pairSquares = (totals: readonly number[]) => {
    const terms: number[] = [];
    for (let i = 0; i < totals.length; i++) for (let k = i + 1; k < totals.length; k++) terms.push(totals[i] * totals[k] * (k - i) ** 2);
    return compensatedSum(terms);
  };
  const sxx = pairSquares(rowTotals);
  const syy = pairSquares(colTotals);
  if (!(sxx > 0 && syy > 0)) return null;
  const sxy = ddValue(crossProducts);
  // r² = s_xy² / (s_xx s_yy); the common factors 1/n cancel
  const correlationSquared = Math.min(1, (sxy / sxx) * (sxy / syy));
  const statistic = (n - 1) * correlationSquared;
  return { statistic, df: 1, pValue: upperTailChiSquare(statistic, 1) };
}
