/**
 * Noncentral chi-square tails, and the interval for Cramér's V by inverting
 * them.
 */
import { lowerTailChiSquare, upperTailChiSquare } from './chiSquareDistribution.js';
import { poissonDensityRaw, regularizedGammaLower, regularizedGammaUpper } from './gamma.js';
import { normalQuantile, upperTailNormal } from './normalDistribution.js';

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
  return upperTailWithSlope(x, df, lambda).tail;
}

/**
 * A tail of the noncentral chi-square and its slope in λ, from one pass over
 * the mixture. Differentiating eq. 29.2 term by term, with
 * d/dλ e^{−λ/2}(λ/2)^j/j! = ½(w_{j−1} − w_j), gives
 *   ∂P(X ≥ x)/∂λ = ½ Σ_j w_j [Q(a + 1, y) − Q(a, y)] = ½ Σ_j w_j y^a e^{−y}/Γ(a + 1),
 * a = k/2 + j: the noncentral density with k + 2 degrees of freedom at x,
 * whose terms are the densities the recurrence already holds (the lower
 * tail's slope is its negative). The slope is NaN where the Edgeworth series
 * or the central tail stands in (the root finding then steps without it).
 */
interface TailWithSlope {
  tail: number;
  /** d tail / dλ: positive for the upper tail, negative for the lower; NaN when not computed. */
  slope: number;
}

function upperTailWithSlope(x: number, df: number, lambda: number): TailWithSlope {
  if (lambda === 0) return { tail: upperTailChiSquare(x, df), slope: Number.NaN };
  if (x <= 0) return { tail: 1, slope: 0 };
  if (x > EDGEWORTH_THRESHOLD || lambda > EDGEWORTH_THRESHOLD) return { tail: edgeworthUpperTail(x, df, lambda), slope: Number.NaN };
  const half = lambda / 2;
  const y = x / 2;
  const { first, last } = weightRange(half);
  let a = df / 2 + first;
  let q = regularizedGammaUpper(a, y);
  let density = poissonDensityRaw(a, y); // y^a e^{−y} / Γ(a + 1)
  let weight = poissonWeight(first, half);
  let sum = 0;
  let slope = 0;
  for (let j = first; j <= last; j++) {
    sum += weight * q;
    slope += weight * density;
    q += density;
    a += 1;
    density *= y / a;
    weight *= half / (j + 1);
  }
  return { tail: Math.min(1, sum), slope: slope / 2 };
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
  return lowerTailWithSlope(x, df, lambda).tail;
}

/** The lower tail and its slope in λ (−½ Σ_j w_j y^a e^{−y}/Γ(a + 1), see upperTailWithSlope). */
function lowerTailWithSlope(x: number, df: number, lambda: number): TailWithSlope {
  if (lambda === 0) return { tail: lowerTailChiSquare(x, df), slope: Number.NaN };
  if (x <= 0) return { tail: 0, slope: 0 };
  if (x > EDGEWORTH_THRESHOLD || lambda > EDGEWORTH_THRESHOLD) return { tail: edgeworthLowerTail(x, df, lambda), slope: Number.NaN };
  const half = lambda / 2;
  const y = x / 2;
  const { first, last } = weightRange(half);
  let a = df / 2 + last;
  let p = regularizedGammaLower(a, y);
  let density = poissonDensityRaw(a, y); // y^a e^{−y} / Γ(a + 1)
  let weight = poissonWeight(last, half);
  let sum = 0;
  let slope = 0;
  for (let j = last; j >= first; j--) {
    sum += weight * p;
    slope += weight * density;
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
  return { tail: Math.min(1, sum), slope: -slope / 2 };
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

/** Relative accuracy of the noncentrality limits. */
const ROOT_TOLERANCE = 1e-13;

/**
 * The root of an increasing function of λ ≥ 0 (0 when the function is not
 * negative at 0), from `start`: Newton's steps on the slope each tail gives
 * with its value, kept inside the bracket found so far; a step that would
 * leave it, or a missing slope, gives way to a regula falsi step of the
 * Illinois variant (Dowell & Jarratt 1971) once the bracket is closed, and
 * to doubling λ before. It stops when a step is below ROOT_TOLERANCE (relative;
 * absolute below 1), or when the error left after the step, the Newton
 * bound |f''| / (2|f'|) · step² with f'' from the last two slopes, is ten
 * times below it, or when the bracket is that narrow. `converged` is false
 * when the bounds (1100 doublings, 200 steps) were reached.
 */
function increasingRoot(f: (lambda: number) => TailWithSlope, atZero: number, start: number): { root: number; converged: boolean } {
  if (!(atZero < 0)) return { root: 0, converged: true };
  let lo = 0;
  let flo = atZero;
  let hi = Infinity;
  let fhi = Number.NaN;
  let side = 0;
  let doublings = 0;
  let lambda = start > 0 && Number.isFinite(start) ? start : 1;
  let previous: { lambda: number; slope: number } | null = null;
  for (let i = 0; i < MAX_ROOT_ITERATIONS + MAX_BRACKET_DOUBLINGS; i++) {
    const { tail: value, slope } = f(lambda);
    if (value === 0) return { root: lambda, converged: true };
    if (value < 0) {
      lo = lambda;
      flo = value;
      if (side === -1) fhi /= 2;
      side = -1;
    } else if (value > 0) {
      hi = lambda;
      fhi = value;
      if (side === 1) flo /= 2;
      side = 1;
    } else {
      return { root: lambda, converged: false }; // not a number: no root to find
    }
    let next = Number.NaN;
    if (slope > 0 && Number.isFinite(slope)) {
      const step = value / slope;
      const newton = lambda - step;
      const scale = ROOT_TOLERANCE * Math.max(1, Math.abs(newton));
      if (Math.abs(step) <= scale) return { root: newton, converged: true };
      if (newton > lo && newton < hi) {
        if (previous !== null) {
          const curvature = Math.abs(slope - previous.slope) / Math.abs(lambda - previous.lambda);
          if ((curvature / (2 * slope)) * step * step <= scale / 10) return { root: newton, converged: true };
        }
        next = newton;
      }
      previous = { lambda, slope };
    }
    if (Number.isNaN(next)) {
      if (hi === Infinity) {
        if (++doublings > MAX_BRACKET_DOUBLINGS) return { root: lambda, converged: false };
        next = Math.max(1, lambda) * 2;
      } else {
        next = (lo * fhi - hi * flo) / (fhi - flo);
        if (!(next > lo && next < hi)) next = (lo + hi) / 2;
      }
    }
    if (hi !== Infinity && hi - lo <= ROOT_TOLERANCE * Math.max(1, hi)) return { root: next, converged: true };
    lambda = next;
  }
  return { root: hi === Infinity ? lambda : (lo + hi) / 2, converged: false };
}

/**
 * Where the normal approximation of X ~ χ²(k, λ), N(k + λ, 2(k + 2λ)), puts
 * x at z standard deviations above the mean (z > 0: the lower limit, z < 0:
 * the upper), solved for λ: with s = √(2k + 4λ), s² + 4zs − 4(x − k/2) = 0.
 * The start of the root finding.
 */
function normalStart(x: number, df: number, z: number): number {
  const s = 2 * (-z + Math.sqrt(Math.max(0, z * z + x - df / 2)));
  return (s * s - 2 * df) / 4;
}

/**
 * Confidence limits for the noncentrality λ of the observed X², by inverting
 * the noncentral chi-square distribution (the pivot method of Smithson 2003,
 * Confidence Intervals, ch. 4): λ_L solves P(X ≥ x; λ_L) = α/2 and λ_U solves
 * P(X ≤ x; λ_U) = α/2; a limit is 0 when even λ = 0 cannot reach it. Each
 * root is found by Newton's method from the normal approximation's limit,
 * on the slope each tail gives with its value, inside a bracket
 * (increasingRoot), to 1e-13 relative; `converged` is false when a bound was
 * reached.
 *
 * @example
 * // X² = 25.01 on 1 df, the aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * noncentralityInterval(25.01, 1, 0.95) // { lower: 9.25, upper: 48.46, converged: true }
 */
export function noncentralityInterval(x: number, df: number, confidence: number): { lower: number; upper: number; converged: boolean } {
  const lower = lowerNoncentralityLimit(x, df, confidence);
  const alphaHalf = (1 - confidence) / 2;
  const z = alphaHalf < 0.5 ? -normalQuantile(alphaHalf) : 0;
  const upper = increasingRoot(
    (lambda) => {
      const { tail, slope } = lowerTailWithSlope(x, df, lambda);
      return { tail: alphaHalf - tail, slope: -slope };
    },
    alphaHalf - lowerTailChiSquare(x, df),
    normalStart(x, df, -z),
  );
  return { lower: lower.root, upper: upper.root, converged: lower.converged && upper.converged };
}

/** λ_L of noncentralityInterval alone: P(X ≥ x; λ_L) = α/2. */
function lowerNoncentralityLimit(x: number, df: number, confidence: number): { root: number; converged: boolean } {
  const alphaHalf = (1 - confidence) / 2;
  const z = alphaHalf < 0.5 ? -normalQuantile(alphaHalf) : 0;
  return increasingRoot(
    (lambda) => {
      const { tail, slope } = upperTailWithSlope(x, df, lambda);
      return { tail: tail - alphaHalf, slope };
    },
    upperTailChiSquare(x, df) - alphaHalf,
    normalStart(x, df, z),
  );
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
  // Only λ̂, the lower limit at confidence 0, is needed.
  const { root, converged } = lowerNoncentralityLimit(chiSquare, df, 0);
  if (!converged) return null;
  return Math.min(1, Math.sqrt(root / (n * (m - 1))));
}
