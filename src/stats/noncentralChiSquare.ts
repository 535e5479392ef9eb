/**
 * Noncentral chi-square tails, and the interval for Cramér's V by inverting
 * them.
 */
import { lowerTailChiSquare, upperTailChiSquare } from './chiSquareDistribution.js';
import { poissonDensityRaw, regularizedGammaLower, regularizedGammaUpper } from './gamma.js';
import { upperTailNormal } from './normalDistribution.js';

/**
 * The Poisson weights that matter in the mixture below: the mode ± 12
 * standard deviations (and 20 more), beyond which a weight is below 1e-31 of
 * the largest.
 */
function weightRange(half: number): { first: number; last: number } {
  const mode = Math.floor(half);
  const spread = Math.ceil(12 * Math.sqrt(half) + 20);
  return { first: Math.max(0, mode - spread), last: mode + spread };
}

function poissonWeight(j: number, half: number): number {
  return j === 0 ? Math.exp(-half) : poissonDensityRaw(j, half);
}

/**
 * Above this X² (or noncentrality) the tails are taken from the Edgeworth
 * series instead of the Poisson mixture, whose work grows as √λ: there the
 * series is accurate to about 1e-11 in a tail probability near the centre
 * (see edgeworthLowerTail).
 */
export const EDGEWORTH_THRESHOLD = 1e6;

/**
 * Upper tail of the noncentral chi-square distribution, P(X ≥ x) for
 * X ~ χ²(k, λ), as a Poisson mixture of central tails (Johnson, Kotz &
 * Balakrishnan 1995, Continuous Univariate Distributions 2, 2nd ed., ch. 29,
 * eq. 29.2):
 *   P(X ≥ x; k, λ) = Σ_j e^{−λ/2} (λ/2)^j / j! · Q(k/2 + j, x/2).
 * Only the j where the Poisson weight matters are summed (weightRange), and
 * along j the central tails follow the recurrence
 *   Q(a + 1, y) = Q(a, y) + y^a e^{−y} / Γ(a + 1)   (A&S 6.5.21),
 * run upwards, the direction in which it only adds, so each term costs O(1).
 * For x or λ above EDGEWORTH_THRESHOLD the Edgeworth series stands in (the
 * mixture would need 12√λ terms per call).
 *
 * @example
 * // the power of the 1-df test at the observed X² = 25.01 of the aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135), if λ were 10
 * upperTailNoncentralChiSquare(25.01, 1, 10) // 0.0330
 */
export function upperTailNoncentralChiSquare(x: number, df: number, lambda: number): number {
  if (lambda === 0) return upperTailChiSquare(x, df);
  if (x <= 0) return 1;
  if (x > EDGEWORTH_THRESHOLD || lambda > EDGEWORTH_THRESHOLD) return edgeworthUpperTail(x, df, lambda);
  const half = lambda / 2;
  const y = x / 2;
  const { first, last } = weightRange(half);
  let a = df / 2 + first;
  let q = regularizedGammaUpper(a, y);
  let density = poissonDensityRaw(a, y); // y^a e^{−y} / Γ(a + 1)
  let weight = poissonWeight(first, half);
  let sum = 0;
  for (let j = first; j <= last; j++) {
    sum += weight * q;
    q += density;
    a += 1;
    density *= y / a;
    weight *= half / (j + 1);
  }
  return Math.min(1, sum);
}

/**
 * Lower tail P(X ≤ x) of the noncentral chi-square, the mirror of
 * upperTailNoncentralChiSquare: the same mixture of central lower tails, with
 * P(a − 1, y) = P(a, y) + y^{a−1} e^{−y} / Γ(a) run downwards (where it only adds).
 *
 * @example
 * // X² = 25.01 of the aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135), at λ = 10
 * lowerTailNoncentralChiSquare(25.01, 1, 10) // 0.9670
 */
export function lowerTailNoncentralChiSquare(x: number, df: number, lambda: number): number {
  if (lambda === 0) return lowerTailChiSquare(x, df);
  if (x <= 0) return 0;
  if (x > EDGEWORTH_THRESHOLD || lambda > EDGEWORTH_THRESHOLD) return edgeworthLowerTail(x, df, lambda);
  const half = lambda / 2;
  const y = x / 2;
  const { first, last } = weightRange(half);
  let a = df / 2 + last;
  let p = regularizedGammaLower(a, y);
  let density = poissonDensityRaw(a, y); // y^a e^{−y} / Γ(a + 1)
  let weight = poissonWeight(last, half);
  let sum = 0;
  for (let j = last; j >= first; j--) {
    sum += weight * p;
    // P(a − 1, y) = P(a, y) + y^{a−1} e^{−y} / Γ(a), and that density is the last one times a / y
    if (a - 1 <= 0) break;
    density *= a / y;
    a -= 1;
    p += density;
    weight *= j / half;
    // Refresh the density from its direct form now and then, so that one that
    // underflowed to 0 far out in the tail cannot stay 0 (P only adds terms, so it does not drift).
    if ((last - j) % 64 === 63) density = poissonDensityRaw(a, y);
  }
  return Math.min(1, sum);
}

/**
 * The Edgeworth correction to the normal tail of the standardised
 * noncentral chi-square, z = (x − κ₁)/√κ₂, with the cumulants
 * κ_r = 2^{r−1}(r − 1)! (k + rλ) (JKB 1995, eq. 29.7) and γ_m = κ_{m+2}/κ₂^{(m+2)/2}:
 *   F(z) = Φ(z) − φ(z)[γ₁/6 He₂ + γ₂/24 He₃ + γ₁²/72 He₅
 *                       + γ₃/120 He₄ + γ₁γ₂/144 He₆ + γ₁³/1296 He₈] + O(κ₂^{-2})
 * (Kendall & Stuart 1977, The Advanced Theory of Statistics 1, 4th ed., §6.18),
 * He_m the Hermite polynomials. Returns z and the bracketed correction.
 */
function edgeworth(x: number, df: number, lambda: number): { z: number; correction: number } {
  const k2 = 2 * (df + 2 * lambda);
  const sd = Math.sqrt(k2);
  const z = (x - (df + lambda)) / sd;
  const g1 = (8 * (df + 3 * lambda)) / (k2 * sd);
  const g2 = (48 * (df + 4 * lambda)) / (k2 * k2);
  const g3 = (384 * (df + 5 * lambda)) / (k2 * k2 * sd);
  const z2 = z * z;
  const he2 = z2 - 1;
  const he3 = z * (z2 - 3);
  const he4 = z2 * (z2 - 6) + 3;
  const he5 = z * (z2 * (z2 - 10) + 15);
  const he6 = z2 * (z2 * (z2 - 15) + 45) - 15;
  const he8 = z2 * (z2 * (z2 * (z2 - 28) + 210) - 420) + 105;
  const correction = (g1 / 6) * he2 + (g2 / 24) * he3 + ((g1 * g1) / 72) * he5 + (g3 / 120) * he4 + ((g1 * g2) / 144) * he6 + ((g1 * g1 * g1) / 1296) * he8;
  return { z, correction };
}

const INVERSE_SQRT_2PI = 0.3989422804014327;

/**
 * Lower tail of the noncentral chi-square by the Edgeworth series above. The
 * omitted terms are O(κ₂⁻²): against the Poisson mixture, the relative error
 * of a tail probability at |z| ≤ 2 falls from 6e-10 at λ = 10⁵ to 8e-12 at
 * λ = 9·10⁵ (as λ⁻²), so beyond 10⁶ a confidence limit for λ moves by less
 * than 1e-14 relative. It is used only there.
 */
export function edgeworthLowerTail(x: number, df: number, lambda: number): number {
  const { z, correction } = edgeworth(x, df, lambda);
  const density = INVERSE_SQRT_2PI * Math.exp(-0.5 * z * z);
  return Math.min(1, Math.max(0, upperTailNormal(-z) - density * correction));
}

/** Upper tail of the noncentral chi-square by the same Edgeworth series (see edgeworthLowerTail). */
export function edgeworthUpperTail(x: number, df: number, lambda: number): number {
  const { z, correction } = edgeworth(x, df, lambda);
  const density = INVERSE_SQRT_2PI * Math.exp(-0.5 * z * z);
  return Math.min(1, Math.max(0, upperTailNormal(z) + density * correction));
}

const MAX_BRACKET_DOUBLINGS = 1100;
const MAX_ROOT_ITERATIONS = 200;

/**
 * Confidence limits for the noncentrality λ of the observed X², by inverting
 * the noncentral chi-square distribution (the pivot method of Smithson 2003,
 * Confidence Intervals, ch. 4): λ_L solves P(X ≥ x; λ_L) = α/2 and λ_U solves
 * P(X ≤ x; λ_U) = α/2; a limit is 0 when even λ = 0 cannot reach it. The
 * root finding is bounded (1100 doublings of the bracket, 200 steps);
 * `converged` is false when a bound was reached.
 *
 * @example
 * // X² = 25.01 on 1 df, the aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * noncentralityInterval(25.01, 1, 0.95) // { lower: 9.25, upper: 48.46, converged: true }
 */
export function noncentralityInterval(x: number, df: number, confidence: number): { lower: number; upper: number; converged: boolean } {
  const alphaHalf = (1 - confidence) / 2;
  let converged = true;
  const solve = (f: (lambda: number) => number): number => {
    // f increases with λ; find f(λ) = 0 by the Illinois variant of regula falsi
    // (Dowell & Jarratt 1971), which keeps a bracket and converges superlinearly.
    let lo = 0;
    let flo = f(lo);
    if (!(flo < 0)) return 0;
    let hi = Math.max(1, x);
    let fhi = f(hi);
    // The root lies below x + 40√x + 100 for any α/2 above 1e-300; the
    // doubling is bounded all the same.
    for (let doublings = 0; fhi < 0 && doublings < MAX_BRACKET_DOUBLINGS; doublings++) {
      lo = hi;
      flo = fhi;
      hi *= 2;
      fhi = f(hi);
    }
    if (!(fhi >= 0)) {
      converged = false;
      return hi;
    }
    let side = 0;
    let previous = Number.NaN;
    for (let i = 0; i < MAX_ROOT_ITERATIONS; i++) {
      let mid = (lo * fhi - hi * flo) / (fhi - flo);
      if (!(mid > lo && mid < hi)) mid = (lo + hi) / 2;
      const fmid = f(mid);
      if (fmid === 0) return mid;
      if (fmid < 0) {
        lo = mid;
        flo = fmid;
        if (side === -1) fhi /= 2;
        side = -1;
      } else {
        hi = mid;
        fhi = fmid;
        if (side === 1) flo /= 2;
        side = 1;
      }
      if (Math.abs(mid - previous) <= 1e-13 * Math.max(1, mid) || hi - lo <= 1e-13 * Math.max(1, hi)) return mid;
      previous = mid;
    }
    converged = false;
    return (lo + hi) / 2;
  };
  const lower = solve((lambda) => upperTailNoncentralChiSquare(x, df, lambda) - alphaHalf);
  const upper = solve((lambda) => alphaHalf - lowerTailNoncentralChiSquare(x, df, lambda));
  return { lower, upper, converged };
}

/**
 * Interval for the population Cramér's V = √(λ / (n (m − 1))), m = min(r, c),
 * from the noncentrality interval above (λ = n(m−1)V² under the alternative;
 * Smithson 2003, ch. 4). Capped at 1. `tails` says how the noncentral tails
 * were computed (the Edgeworth series once X² passes 5·10⁵, where the limits
 * reach past 10⁶). null when the table leaves V undefined or the root finding
 * did not converge within its bounds.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): X² = 25.01, n = 22071
 * cramersVInterval(25.01, 1, 22071, 2, 2, 0.95) // { lower: 0.0205, upper: 0.0469, tails: 'poisson-mixture' }
 */
export function cramersVInterval(
  chiSquare: number,
  df: number,
  n: number,
  r: number,
  c: number,
  confidence: number,
): { lower: number; upper: number; tails: 'poisson-mixture' | 'edgeworth' } | null {
  const m = Math.min(r, c);
  if (!(n > 0) || m < 2 || df < 1 || !Number.isFinite(chiSquare) || !Number.isFinite(n)) return null;
  const { lower, upper, converged } = noncentralityInterval(chiSquare, df, confidence);
  if (!converged) return null;
  const toV = (lambda: number) => Math.min(1, Math.sqrt(lambda / (n * (m - 1))));
  return { lower: toV(lower), upper: toV(upper), tails: chiSquare > EDGEWORTH_THRESHOLD / 2 ? 'edgeworth' : 'poisson-mixture' };
}

/**
 * Median-unbiased estimate of the population Cramér's V: √(λ̂ / (n (m − 1)))
 * with λ̂ solving P(X ≥ x; λ̂) = ½, 0 when even λ = 0 gives less (the point
 * the pivot interval above is built around, Smithson 2003, ch. 4). Because
 * P(X ≥ x; λ) rises with λ, it always lies between the interval's limits,
 * whatever the confidence level; the sample V need not.
  *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): X² = 25.01, n = 22071
 * cramersVMedianEstimate(25.01, 1, 22071, 2, 2) // 0.0337
 */
export function cramersVMedianEstimate(chiSquare: number, df: number, n: number, r: number, c: number): number | null {
  const m = Math.min(r, c);
  if (!(n > 0) || m < 2 || df < 1) return null;
  if (!Number.isFinite(chiSquare) || !Number.isFinite(n)) return null;
  const { lower, converged } = noncentralityInterval(chiSquare, df, 0);
  if (!converged) return null;
  return Math.min(1, Math.sqrt(lower / (n * (m - 1))));
}
