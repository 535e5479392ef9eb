import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { CountMatrix, margins } from './contingency.js';

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
  P: number;
  Q: number;
  n: number;
  rowTotals: number[];
  colTotals: number[];
}

function pairSums(counts: CountMatrix): PairSums {
  const r = counts.length;
  const c = counts[0].length;
  // 2-D prefix sums: S[i][j] = Σ_{k<i, l<j} n_kl
  const S = Array.from({ length: r + 1 }, () => new Array<number>(c + 1).fill(0));
  for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) S[i + 1][j + 1] = S[i][j + 1] + S[i + 1][j] - S[i][j] + counts[i][j];
  const block = (i0: number, i1: number, j0: number, j1: number) => (i1 <= i0 || j1 <= j0 ? 0 : S[i1][j1] - S[i0][j1] - S[i1][j0] + S[i0][j0]);
  const A: number[][] = [];
  const D: number[][] = [];
  let P = 0;
  let Q = 0;
  for (let i = 0; i < r; i++) {
    A.push([]);
    D.push([]);
    for (let j = 0; j < c; j++) {
      const a = block(0, i, 0, j) + block(i + 1, r, j + 1, c);
      const d = block(0, i, j + 1, c) + block(i + 1, r, 0, j);
      A[i].push(a);
      D[i].push(d);
      P += counts[i][j] * a;
      Q += counts[i][j] * d;
    }
  }
  const { rowTotals, colTotals, total } = margins(counts);
  return { A, D, P, Q, n: total, rowTotals, colTotals };
}

function twoSidedNormal(z: number): number {
  return upperTailChiSquare(z * z, 1);
}

function estimateWith(estimate: number | null, ase1Squared: number | null, ase0: number | null): OrdinalEstimate {
  if (estimate === null || !Number.isFinite(estimate)) return { estimate: null, standardError: null, z: null, pValue: null };
  const standardError = ase1Squared !== null && ase1Squared >= 0 ? Math.sqrt(ase1Squared) : null;
  const z = ase0 !== null && ase0 > 0 ? estimate / ase0 : null;
  return { estimate, standardError, z, pValue: z === null ? null : twoSidedNormal(z) };
}

/** Σ n_ij (A_ij − D_ij)² − (P − Q)²/n, the core of the null variances. */
function nullCore(s: PairSums, counts: CountMatrix): number {
  let sum = 0;
  counts.forEach((row, i) => row.forEach((v, j) => (sum += v * (s.A[i][j] - s.D[i][j]) ** 2)));
  return Math.max(0, sum - (s.P - s.Q) ** 2 / s.n);
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
 */
export function ordinalMeasures(counts: CountMatrix): OrdinalMeasures {
  const s = pairSums(counts);
  const { A, D, P, Q, n, rowTotals, colTotals } = s;
  const core = nullCore(s, counts);
  const r = counts.length;
  const c = counts[0].length;
  const sumCells = (f: (v: number, i: number, j: number) => number) => {
    let total = 0;
    counts.forEach((row, i) => row.forEach((v, j) => (total += f(v, i, j))));
    return total;
  };

  const gammaEstimate = P + Q > 0 ? (P - Q) / (P + Q) : null;
  const gamma = estimateWith(
    gammaEstimate,
    P + Q > 0 ? (16 / (P + Q) ** 4) * sumCells((v, i, j) => v * (Q * A[i][j] - P * D[i][j]) ** 2) : null,
    P + Q > 0 ? (2 / (P + Q)) * Math.sqrt(core) : null,
  );

  const wr = n * n - rowTotals.reduce((t, v) => t + v * v, 0);
  const wc = n * n - colTotals.reduce((t, v) => t + v * v, 0);
  const w = Math.sqrt(wr * wc);
  const tauB = w > 0 ? (P - Q) / w : null;
  const kendallTauB = estimateWith(
    tauB,
    tauB === null
      ? null
      : (sumCells((v, i, j) => v * (2 * w * (A[i][j] - D[i][j]) + tauB * (rowTotals[i] * wc + colTotals[j] * wr)) ** 2) -
          n ** 3 * tauB * tauB * (wr + wc) ** 2) /
          w ** 4,
    w > 0 ? (2 / w) * Math.sqrt(core) : null,
  );

  const m = Math.min(r, c);
  const tauCFactor = m > 1 ? (2 * m) / ((m - 1) * n * n) : null;
  const kendallTauC = estimateWith(
    m > 1 ? (m * (P - Q)) / (n * n * (m - 1)) : null,
    tauCFactor === null ? null : tauCFactor * tauCFactor * core,
    tauCFactor === null ? null : tauCFactor * Math.sqrt(core),
  );

  const somers = (weight: number, margin: (i: number, j: number) => number) =>
    estimateWith(
      weight > 0 ? (P - Q) / weight : null,
      weight > 0 ? (4 / weight ** 4) * sumCells((v, i, j) => v * (weight * (A[i][j] - D[i][j]) - (P - Q) * (n - margin(i, j))) ** 2) : null,
      weight > 0 ? (2 / weight) * Math.sqrt(core) : null,
    );

  return {
    gamma,
    kendallTauB,
    kendallTauC,
    somersDColsGivenRows: somers(wr, (i) => rowTotals[i]),
    somersDRowsGivenCols: somers(wc, (_i, j) => colTotals[j]),
  };
}

/**
 * Linear-by-linear association test M² = (n − 1) r², df 1, where r is the
 * Pearson correlation of integer scores 1..R and 1..C over the table
 * (Mantel 1963, J. Am. Stat. Assoc. 58, 690–700; Agresti 2013 §3.4.1).
 */
export function linearByLinear(counts: CountMatrix): TestResult | null {
  const { rowTotals, colTotals, total: n } = margins(counts);
  if (n < 2) return null;
  const rowMean = rowTotals.reduce((s, v, i) => s + (i + 1) * v, 0) / n;
  const colMean = colTotals.reduce((s, v, j) => s + (j + 1) * v, 0) / n;
  let sxy = 0;
  counts.forEach((row, i) => row.forEach((v, j) => (sxy += v * (i + 1 - rowMean) * (j + 1 - colMean))));
  const sxx = rowTotals.reduce((s, v, i) => s + v * (i + 1 - rowMean) ** 2, 0);
  const syy = colTotals.reduce((s, v, j) => s + v * (j + 1 - colMean) ** 2, 0);
  if (!(sxx > 0 && syy > 0)) return null;
  const correlation = sxy / Math.sqrt(sxx * syy);
  const statistic = (n - 1) * correlation * correlation;
  return { statistic, df: 1, pValue: upperTailChiSquare(statistic, 1) };
}
