import { upperTailChiSquare } from './chiSquareDistribution.js';
import { CountMatrix, compensatedSum, degreesOfFreedom, expectedCounts, isTwoByTwo } from './contingency.js';

export interface TestResult {
  statistic: number;
  df: number;
  pValue: number;
}

/**
 * Pearson's chi-square statistic X² = Σ (n_ij − E_ij)² / E_ij with
 * df = (r−1)(c−1), referred to the upper tail of χ²(df).
 * Pearson, K. (1900). Phil. Mag. 50, 157–175; Agresti (2013) §3.2.1.
 */
export function pearsonChiSquare(counts: CountMatrix, expected: CountMatrix = expectedCounts(counts)): TestResult {
  const df = degreesOfFreedom(counts);
  const terms: number[] = [];
  counts.forEach((row, i) =>
    row.forEach((nij, j) => {
      const e = expected[i][j];
      terms.push(((nij - e) * (nij - e)) / e);
    }),
  );
  const statistic = compensatedSum(terms);
  return { statistic, df, pValue: upperTailChiSquare(statistic, df) };
}

/**
 * Likelihood-ratio chi-square G² = 2 Σ n_ij log(n_ij / E_ij), with
 * 0·log 0 = 0 (Wilks 1938; Agresti 2013 §3.2.1), df = (r−1)(c−1).
 */
export function likelihoodRatioChiSquare(counts: CountMatrix, expected: CountMatrix = expectedCounts(counts)): TestResult {
  const df = degreesOfFreedom(counts);
  const terms: number[] = [];
  counts.forEach((row, i) =>
    row.forEach((nij, j) => {
      if (nij > 0) terms.push(nij * Math.log(nij / expected[i][j]));
    }),
  );
  const statistic = Math.max(0, 2 * compensatedSum(terms));
  return { statistic, df, pValue: upperTailChiSquare(statistic, df) };
}

/**
 * Yates' continuity-corrected chi-square for a 2×2 table,
 * X²_Y = Σ (|n_ij − E_ij| − ½)² / E_ij (Yates 1934, J. R. Stat. Soc. Suppl. 1,
 * 217–235). The correction is capped at |n_ij − E_ij| so that it never
 * overshoots (the rule scipy.stats.chi2_contingency applies). null unless 2×2.
 */
export function yatesChiSquare(counts: CountMatrix, expected: CountMatrix = expectedCounts(counts)): TestResult | null {
  if (!isTwoByTwo(counts)) return null;
  const terms: number[] = [];
  counts.forEach((row, i) =>
    row.forEach((nij, j) => {
      const e = expected[i][j];
      const deviation = Math.abs(nij - e);
      const corrected = deviation - Math.min(0.5, deviation);
      terms.push((corrected * corrected) / e);
    }),
  );
  const statistic = compensatedSum(terms);
  return { statistic, df: 1, pValue: upperTailChiSquare(statistic, 1) };
}
