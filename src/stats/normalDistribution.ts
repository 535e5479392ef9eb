/** The standard normal distribution: upper tail and quantile. */
import { regularizedGammaUpper } from './gamma.js';

/**
 * Upper tail of the standard normal, P(Z ≥ z) = ½ erfc(z/√2), with
 * erfc(t) = Q(½, t²) for t ≥ 0 (A&S 7.1.2 with 6.5.17), so far tails keep
 * their relative accuracy.
 *
 * @example
 * // Abramowitz & Stegun 1964, Table 26.1: the upper 2.5% point is 1.959964
 * upperTailNormal(1.959963984540054) // 0.025
 */
export function upperTailNormal(z: number): number {
  if (Number.isNaN(z)) return Number.NaN;
  if (z >= 0) return 0.5 * regularizedGammaUpper(0.5, (z * z) / 2);
  return 1 - 0.5 * regularizedGammaUpper(0.5, (z * z) / 2);
}

/**
 * Quantile of the standard normal: the z with P(Z ≤ z) = p. A rational
 * starting value (the logistic-type approximation of A&S 26.2.23) is refined
 * by Halley's method on the tail function above until it is exact to double
 * precision.
 *
 * @example
 * // Abramowitz & Stegun 1964, Table 26.5
 * normalQuantile(0.975) // 1.959963984540054
 */
export function normalQuantile(p: number): number {
  if (!(p > 0 && p < 1)) {
    if (p === 0) return -Infinity;
    if (p === 1) return Infinity;
    return Number.NaN;
  }
  if (p > 0.5) return -normalQuantile(1 - p);
  // p ≤ 0.5: z ≤ 0. A&S 26.2.23 for the upper tail q = p.
  const t = Math.sqrt(-2 * Math.log(p));
  let z = -(t - (2.515517 + 0.802853 * t + 0.010328 * t * t) / (1 + 1.432788 * t + 0.189269 * t * t + 0.001308 * t * t * t));
  for (let i = 0; i < 50; i++) {
    const cdf = upperTailNormal(-z); // P(Z ≤ z)
    const density = Math.exp(-0.5 * z * z) / Math.sqrt(2 * Math.PI);
    if (density === 0) break;
    const e = (cdf - p) / density;
    const step = e / (1 + 0.5 * z * e); // Halley
    z -= step;
    if (Math.abs(step) < 1e-15 * Math.max(1, Math.abs(z))) break;
  }
  return z;
}
