/** Welch's t test of two means from summary statistics. */
import { twoSidedStudentT } from './studentTDistribution.js';

/** A column's summary of a numeric question. With weights: weighted mean and SD, n the Kish effective base. */
export interface SummaryStatistics {
  mean: number;
  sd: number;
  n: number;
}

export interface WelchTest {
  /** mean₁ − mean₂ */
  difference: number;
  /** √(s₁²/n₁ + s₂²/n₂) */
  standardError: number;
  t: number;
  /** Welch–Satterthwaite degrees of freedom (real). */
  df: number;
  /** Two-sided p-value from Student's t with df. */
  pValue: number;
}

/**
 * Welch's t-test of equal means from summary statistics (Welch 1947,
 * Biometrika 34, 28–35), with the Welch–Satterthwaite df (Satterthwaite
 * 1946, Biometrics Bull. 2, 110–114):
 *   t = (x̄₁ − x̄₂) / √(v₁ + v₂),  v_i = s_i²/n_i,
 *   df = (v₁ + v₂)² / (v₁²/(n₁ − 1) + v₂²/(n₂ − 1)),
 * two-sided p = P(|T_df| ≥ |t|). With weights, pass the weighted mean and SD
 * and the Kish effective base as n (common practice; it ignores clustering
 * and strata of a survey design). null when a group has n ≤ 1 or both
 * standard errors are zero.
 *
 * @example
 * // 20.1 (SD 4.2, n 30) against 17.6 (SD 6.3, n 25): t = 1.6949, df = 40.475, p = 0.0978
 * welchTTest({ mean: 20.1, sd: 4.2, n: 30 }, { mean: 17.6, sd: 6.3, n: 25 });
 */
export function welchTTest(first: SummaryStatistics, second: SummaryStatistics): WelchTest | null {
  if (!(first.n > 1 && second.n > 1)) return null;
  const v1 = (first.sd * first.sd) / first.n;
  const v2 = (second.sd * second.sd) / second.n;
  const variance = v1 + v2;
  if (!(variance > 0)) return null;
  const standardError = Math.sqrt(variance);
  const difference = first.mean - second.mean;
  const t = difference / standardError;
  const df = (variance * variance) / ((v1 * v1) / (first.n - 1) + (v2 * v2) / (second.n - 1));
  return { difference, standardError, t, df, pValue: twoSidedStudentT(t, df) };
}
