/** Tails of the chi-square distribution. */
import { regularizedGammaLower, regularizedGammaUpper } from './gamma.js';

/**
 * Upper tail of the chi-square distribution, P(X ≥ x) for X ~ χ²(df):
 * Q(df/2, x/2), the upper regularized incomplete gamma function
 * (Abramowitz & Stegun 26.4.19). Computed directly, so p-values keep their
 * relative accuracy down to the smallest normal doubles (0 only below ~1e-308).
 */
export function upperTailChiSquare(x: number, df: number): number {
  if (!(df > 0)) return Number.NaN;
  if (Number.isNaN(x)) return Number.NaN;
  if (x <= 0) return 1;
  return regularizedGammaUpper(df / 2, x / 2);
}

/** Lower tail P(X ≤ x) for X ~ χ²(df). */
export function lowerTailChiSquare(x: number, df: number): number {
  if (!(df > 0)) return Number.NaN;
  if (x <= 0) return 0;
  return regularizedGammaLower(df / 2, x / 2);
}
