/**
 * Tests of independence for multiple-response questions: summed Pearson
 * statistics with Rao–Scott-type corrections.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { compensatedSum } from '../numerics/compensatedSum.js';

/**
 * Tests of independence for multiple-response ("pick any") questions, where
 * a respondent may choose several answers: the summed Pearson statistic over
 * the answers, which is not χ² because the answers of one respondent are
 * correlated, referred to χ² after a Rao–Scott-type adjustment
 * (Rao & Scott 1981, J. Am. Stat. Assoc. 76, 221–230) whose eigenvalues come
 * from the multinomial of the respondents' answer patterns
 * (Bilder, Loughin & Nettleton 2000, Commun. Stat. Theory Methods 29,
 * 1285–1316, for a single-response variable against a multiple-response one;
 * Bilder & Loughin 2004, Biometrics 60, 241–248, for two multiple-response
 * variables; Appendix A of each). Inputs are the answer patterns with their
 * counts (the sufficient statistics), so that a reader can count them in one pass.
 */

/** Respondents of one group sharing one pattern of answers (1 = chosen). */
export interface GroupAnswerPattern {
  group: number;
  answers: readonly number[];
  count: number;
}

/** Respondents sharing one pattern of answers to two multiple-response questions. */
export interface PairedAnswerPattern {
  first: readonly number[];
  second: readonly number[];
  count: number;
}

export interface MultipleResponseTest {
  /** The summed Pearson statistic X²_S. */
  statistic: number;
  /** Its nominal df: (r − 1)c for a group variable, IJ for two multiple-response questions. */
  df: number;
  /**
   * First-order Rao–Scott adjustment: X²_S / λ̄ on the nominal df, λ̄ the mean
   * eigenvalue Σλ/df (corrects the mean of the reference distribution).
   */
  firstOrder: TestResult & { meanEigenvalue: number };
  /**
   * Second-order adjustment in Bilder & Loughin's form: X²_S · df / Σλ² on
   * df² / Σλ² degrees of freedom (real), which also matches the variance.
   */
  secondOrder: TestResult;
  /** Bonferroni: the smallest part's p-value times the number of parts (capped at 1). */
  bonferroni: number;
  /** Σλ and Σλ² of D⁻¹Σ (see the functions). */
  sumEigenvalues: number;
  sumSquaredEigenvalues: number;
  /** Respondents counted. */
  n: number;
}

export interface GroupMultipleResponseTest extends MultipleResponseTest {
  /** Each answer's Pearson X² of group × chosen (r × 2), df r − 1; null for an answer left out. */
  answerStatistics: (TestResult | null)[];
  /** Answers chosen by nobody or by everybody (no test possible), left out. */
  answersLeftOut: number[];
  /** Groups with no respondent, left out. */
  groupsLeftOut: number[];
}

export interface PairedMultipleResponseTest extends MultipleResponseTest {
  /** X²_ij of answer i of the first question × answer j of the second (2 × 2, 1 df); null where left out. */
  pairStatistics: (TestResult | null)[][];
  firstAnswersLeftOut: number[];
  secondAnswersLeftOut: number[];
}

/**
 * Multiple marginal independence (MMI) of a single-response variable with r
 * groups and a multiple-response question with c answers (Bilder, Loughin &
 * Nettleton 2000): H0 says each answer is chosen at the same rate in every group.
 *   X²_S = Σ_j X²_j,  X²_j = Σ_i n_i (p̂_ij − p̄_j)² / (p̄_j (1 − p̄_j)),
 * p̂_ij the share of group i choosing j, p̄_j the share overall. Under H0,
 * X²_S ≈ Σ λ_k χ²₁ with λ the eigenvalues of D⁻¹Σ, where (a_i = n_i/n)
 *   Σ_(ij),(i'j') = Σ_l (δ_il − a_l)(δ_i'l − a_l) C_l(j, j') / a_l,
 *   C_l = the covariance of the answers within group l (divisor n_l),
 *   D_(ij) = p̄_j(1 − p̄_j)/a_i;
 * Σλ = tr(D⁻¹Σ) and Σλ² = tr((D⁻¹Σ)²) = Σ_ab Σ_ab²/(D_a D_b) need no
 * eigen-decomposition. Answers chosen by all or none and empty groups are
 * left out (and listed). null when fewer than two groups or no answer remain.
 */
export function groupMultipleResponseTest(patterns: readonly GroupAnswerPattern[]): GroupMultipleResponseTest | null {
  if (patterns.length === 0) return null;
  const groupCount = Math.max(...patterns.map((p) => p.group)) + 1;
  const answerCount = patterns[0].answers.length;
  const groupN = new Array<number>(groupCount).fill(0);
  for (const p of patterns) groupN[p.group] += p.count;
  const groups = groupN.map((v, i) => (v > 0 ? i : -1)).filter((i) => i >= 0);
  const groupsLeftOut = groupN.map((v, i) => (v > 0 ? -1 : i)).filter((i) => i >= 0);
  const n = compensatedSum(groupN);
  const chosen = new Array<number>(answerCount).fill(0);
  for (const p of patterns) p.answers.forEach((v, j) => (chosen[j] += v ? p.count : 0));
  const answers = chosen.map((v, j) => (v > 0 && v < n ? j : -1)).filter((j) => j >= 0);
  const answersLeftOut = chosen.map((v, j) => (v > 0 && v < n ? -1 : j)).filter((j) => j >= 0);
  const r = groups.length;
  const c = answers.length;
  if (r < 2 || c < 1) return null;
  const groupIndex = new Map(groups.map((g, i) => [g, i]));

  // Per group: counts of each answer and of each pair of answers.
  const pairCounts = groups.map(() => Array.from({ length: c }, () => new Array<number>(c).fill(0)));
  for (const p of patterns) {
    const i = groupIndex.get(p.group);
    if (i === undefined) continue;
    for (let x = 0; x < c; x++) {
      if (!p.answers[answers[x]]) continue;
      for (let y = 0; y < c; y++) if (p.answers[answers[y]]) pairCounts[i][x][y] += p.count;
    }
  }
  const nGroup = groups.map((g) => groupN[g]);
  const a = nGroup.map((v) => v / n);
  const share = pairCounts.map((m, i) => m.map((row, x) => row[x] / nGroup[i]));
  const overall = answers.map((j) => chosen[j] / n);
  const within = pairCounts.map((m, i) => m.map((row, x) => row.map((v, y) => v / nGroup[i] - share[i][x] * share[i][y])));

  const answerStatistics: (TestResult | null)[] = new Array(answerCount).fill(null);
  const parts: number[] = [];
  answers.forEach((j, x) => {
    const q = overall[x];
    const statistic = compensatedSum(nGroup.map((ni, i) => (ni * (share[i][x] - q) ** 2) / (q * (1 - q))));
    parts.push(statistic);
    answerStatistics[j] = { statistic, df: r - 1, pValue: upperTailChiSquare(statistic, r - 1) };
  });

  // Σ and D over the index (i, x) = i·c + x.
  const size = r * c;
  const D = new Array<number>(size);
  for (let i = 0; i < r; i++) for (let x = 0; x < c; x++) D[i * c + x] = (overall[x] * (1 - overall[x])) / a[i];
  const sigma = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let i = 0; i < r; i++)
    for (let i2 = 0; i2 < r; i2++)
      for (let l = 0; l < r; l++) {
        const factor = ((i === l ? 1 : 0) - a[l]) * ((i2 === l ? 1 : 0) - a[l]) / a[l];
        if (factor === 0) continue;
        for (let x = 0; x < c; x++) for (let y = 0; y < c; y++) sigma[i * c + x][i2 * c + y] += factor * within[l][x][y];
      }
  const parts2 = answerStatistics.filter((t): t is TestResult => t !== null);
  return { ...adjusted(compensatedSum(parts), (r - 1) * c, sigma, D, parts2.map((t) => t.pValue)), answerStatistics, answersLeftOut, groupsLeftOut, n };
}

/**
 * Simultaneous pairwise marginal independence (SPMI) of two multiple-response
 * questions with I and J answers (Bilder & Loughin 2004): H0 says every
 * answer of the first is independent of every answer of the second.
 *   X²_S = Σ_ij X²_ij,  X²_ij = n (p̂_ij − p̂_i q̂_j)² / (p̂_i(1 − p̂_i) q̂_j(1 − q̂_j)),
 * the Pearson statistic of the 2 × 2 table of answer i by answer j. Under H0,
 * X²_S ≈ Σ λ_k χ²₁ with λ the eigenvalues of D⁻¹Σ, Σ the covariance over
 * respondents (divisor n) of g_ij = (W_i − p̂_i)(Y_j − q̂_j) — the delta-method
 * covariance of the multinomial of answer patterns — and
 * D_ij = p̂_i(1 − p̂_i) q̂_j(1 − q̂_j). Answers chosen by all or none are left
 * out (and listed). null when no pair remains.
 */
export function pairedMultipleResponseTest(patterns: readonly PairedAnswerPattern[]): PairedMultipleResponseTest | null {
  if (patterns.length === 0) return null;
  const I0 = patterns[0].first.length;
  const J0 = patterns[0].second.length;
  const n = compensatedSum(patterns.map((p) => p.count));
  const firstChosen = new Array<number>(I0).fill(0);
  const secondChosen = new Array<number>(J0).fill(0);
  for (const p of patterns) {
    p.first.forEach((v, i) => (firstChosen[i] += v ? p.count : 0));
    p.second.forEach((v, j) => (secondChosen[j] += v ? p.count : 0));
  }
  const keep = (counts: number[]) => counts.map((v, i) => (v > 0 && v < n ? i : -1)).filter((i) => i >= 0);
  const leftOut = (counts: number[]) => counts.map((v, i) => (v > 0 && v < n ? -1 : i)).filter((i) => i >= 0);
  const first = keep(firstChosen);
  const second = keep(secondChosen);
  const I = first.length;
  const J = second.length;
  if (I < 1 || J < 1) return null;
  const p = first.map((i) => firstChosen[i] / n);
  const q = second.map((j) => secondChosen[j] / n);
  const size = I * J;

  // Moments over the patterns: E[g] and E[g gᵀ], g_ij = (W_i − p_i)(Y_j − q_j).
  const meanG = new Array<number>(size).fill(0);
  const second2 = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  const g = new Array<number>(size);
  for (const pattern of patterns) {
    const w = pattern.count / n;
    for (let x = 0; x < I; x++) for (let y = 0; y < J; y++) g[x * J + y] = ((pattern.first[first[x]] ? 1 : 0) - p[x]) * ((pattern.second[second[y]] ? 1 : 0) - q[y]);
    for (let u = 0; u < size; u++) {
      meanG[u] += w * g[u];
      if (g[u] === 0) continue;
      for (let v = 0; v < size; v++) second2[u][v] += w * g[u] * g[v];
    }
  }
  const sigma = second2.map((row, u) => row.map((v, x) => v - meanG[u] * meanG[x]));
  const D = new Array<number>(size);
  const pairStatistics: (TestResult | null)[][] = Array.from({ length: I0 }, () => new Array<TestResult | null>(J0).fill(null));
  const parts: number[] = [];
  const partP: number[] = [];
  for (let x = 0; x < I; x++)
    for (let y = 0; y < J; y++) {
      const u = x * J + y;
      D[u] = p[x] * (1 - p[x]) * q[y] * (1 - q[y]);
      // E[g_ij] = p_ij − p_i q_j, the departure of the 2 × 2 table from independence
      const statistic = (n * meanG[u] * meanG[u]) / D[u];
      parts.push(statistic);
      const test = { statistic, df: 1, pValue: upperTailChiSquare(statistic, 1) };
      partP.push(test.pValue);
      pairStatistics[first[x]][second[y]] = test;
    }
  return { ...adjusted(compensatedSum(parts), size, sigma, D, partP), pairStatistics, firstAnswersLeftOut: leftOut(firstChosen), secondAnswersLeftOut: leftOut(secondChosen), n };
}

/** The Rao–Scott-type referrals of X²_S from Σλ = tr(D⁻¹Σ) and Σλ² = Σ_ab Σ_ab²/(D_a D_b). */
function adjusted(statistic: number, df: number, sigma: number[][], D: number[], partPValues: number[]) {
  const size = D.length;
  const diagonal: number[] = [];
  const squares: number[] = [];
  for (let a = 0; a < size; a++) {
    diagonal.push(sigma[a][a] / D[a]);
    for (let b = 0; b < size; b++) squares.push((sigma[a][b] * sigma[a][b]) / (D[a] * D[b]));
  }
  const sumEigenvalues = compensatedSum(diagonal);
  const sumSquaredEigenvalues = compensatedSum(squares);
  const meanEigenvalue = sumEigenvalues / df;
  const first = statistic / meanEigenvalue;
  const secondStatistic = (statistic * df) / sumSquaredEigenvalues;
  const secondDf = (df * df) / sumSquaredEigenvalues;
  return {
    statistic,
    df,
    firstOrder: { statistic: first, df, pValue: upperTailChiSquare(first, df), meanEigenvalue },
    secondOrder: { statistic: secondStatistic, df: secondDf, pValue: upperTailChiSquare(secondStatistic, secondDf) },
    bonferroni: Math.min(1, partPValues.length * Math.min(...partPValues)),
    sumEigenvalues,
    sumSquaredEigenvalues,
  };
}
