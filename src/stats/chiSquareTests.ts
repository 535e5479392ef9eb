/**
 * Pearson's chi-square, the likelihood-ratio G² and Yates' continuity-
 * corrected test of independence.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { devianceTermFromDifference } from './gamma.js';
import { compensatedSum } from '../numerics/compensatedSum.js';
import { CountMatrix, degreesOfFreedom, deviationsFromIndependence, isTwoByTwo } from './contingency.js';

export interface TestResult {
  statistic: number;
  df: number;
  pValue: number;
}

/**
 * Pearson's chi-square statistic X² = Σ (n_ij − E_ij)² / E_ij with
 * df = (r−1)(c−1), referred to the upper tail of χ²(df).
 * Pearson, K. (1900). Phil. Mag. 50, 157–175; Agresti (2013) §3.2.1.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * pearsonChiSquare([[189, 10845], [104, 10933]]) // { statistic: 25.01, df: 1, pValue: 5.69e-7 }
 */
export function pearsonChiSquare(counts: CountMatrix): TestResult {
  const df = degreesOfFreedom(counts);
  const { deviation, expected } = deviationsFromIndependence(counts);
  const terms: number[] = [];
  deviation.forEach((row, i) => row.forEach((d, j) => terms.push((d * d) / expected[i][j])));
  const statistic = compensatedSum(terms);
  return { statistic, df, pValue: upperTailChiSquare(statistic, df) };
}

/**
 * Likelihood-ratio chi-square G² = 2 Σ n_ij log(n_ij / E_ij), with
 * 0·log 0 = 0 (Wilks 1938; Agresti 2013 §3.2.1), df = (r−1)(c−1).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * likelihoodRatioChiSquare([[189, 10845], [104, 10933]]) // { statistic: 25.37, df: 1, pValue: 4.73e-7 }
 */
export function likelihoodRatioChiSquare(counts: CountMatrix): TestResult {
  const df = degreesOfFreedom(counts);
  const { deviation, expected } = deviationsFromIndependence(counts);
  // G² = 2 Σ [n log(n/E) − (n − E)] (the added terms sum to zero); each term
  // is Loader's deviance bd0(n, E), evaluated from the exact difference d = n − E
  // so that near-independent tables keep their digits.
  const terms: number[] = [];
  counts.forEach((row, i) =>
    row.forEach((nij, j) => {
      const d = deviation[i][j];
      const e = expected[i][j];
      terms.push(nij === 0 ? e : devianceTermFromDifference(nij, e, d));
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
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * yatesChiSquare([[189, 10845], [104, 10933]]) // { statistic: 24.43, df: 1, pValue: 7.71e-7 }
 */
export function yatesChiSquare(counts: CountMatrix): TestResult | null {
  if (!isTwoByTwo(counts)) return null;
  const { deviation: departures, expected } = deviationsFromIndependence(counts);
  const terms: number[] = [];
  counts.forEach((row, i) =>
    row.forEach((_nij, j) => {
      const e = expected[i][j];
      const deviation = Math.abs(departures[i][j]);
      const corrected = deviation - Math.min(0.5, deviation);
      terms.push((corrected * corrected) / e);
    }),
  );
  const statistic = compensatedSum(terms);
  return { statistic, df: 1, pValue: upperTailChiSquare(statistic, 1) };
}
