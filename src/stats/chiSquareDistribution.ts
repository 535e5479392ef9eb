/** Tails of the chi-square distribution. */
import { regularizedGammaLower, regularizedGammaUpper } from './gamma.js';

/**
 * Upper tail of the chi-square distribution, P(X ≥ x) for X ~ χ²(df):
 * Q(df/2, x/2), the upper regularized incomplete gamma function
 * (Abramowitz & Stegun 26.4.19). Computed directly, so p-values keep their
 * relative accuracy down to the smallest normal doubles (0 only below ~1e-308).
 *
 * @example
 * // the 5% critical value of χ² with 1 df (Abramowitz & Stegun 1964, Table 26.8)
 * upperTailChiSquare(3.841458820694124, 1) // 0.05
 */
export function upperTailChiSquare(x: number, df: number): number {
  if (!(df > 0)) return Number.NaN;
  if (Number.isNaN(x)) return Number.NaN;
  if (x <= 0) return 1;
  return regularizedGammaUpper(df / 2, x / 2);
}

/**
 * Lower tail P(X ≤ x) for X ~ χ²(df).
 *
 * @example
 * // Abramowitz & Stegun 1964, Table 26.8: 3.841459 is the 95% point for 1 df
 * lowerTailChiSquare(3.841458820694124, 1) // 0.95
 */
export function lowerTailChiSquare(x: number, df: number): number {
  if (!(df > 0)) return Number.NaN;
  if (x <= 0) return 0;
  return regularizedGammaLower(df / 2, x / 2);
}
