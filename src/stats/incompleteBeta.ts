/**
 * The regularized incomplete beta function, its complement, density and
 * quantiles.
 */
import { devianceTermFromDifference, logGamma, stirlingError } from './gamma.js';

/**
 * The regularized incomplete beta function I_x(a, b) and its complement,
 * written so that both tails keep ~1e-13 relative accuracy down to the
 * smallest normal doubles; the F and Student t distributions are built on it.
 *
 *   I_x(a, b) = (1 / B(a, b)) ∫_0^x u^(a−1) (1 − u)^(b−1) du     (A&S 6.6.2, 26.5.1)
 *
 * Method. Whichever tail lies on the short side of the mean is evaluated as
 *
 *   I_x(a, b) = x^a y^b / (a B(a, b)) · 1/(1+ d1/(1+ d2/(1+ …)))   (A&S 26.5.8)
 *   d_(2m+1) = −(a+m)(a+b+m) x / ((a+2m)(a+2m+1)),  d_(2m) = m(b−m) x / ((a+2m−1)(a+2m)),
 *
 * by the modified Lentz method (Lentz 1976; Thompson & Barnett 1986), which
 * converges quickly for x < (a+1)/(a+b+2); the other tail comes from the
 * symmetry 1 − I_x(a, b) = I_y(b, a) with y = 1 − x passed in separately, so
 * a tail is never formed as 1 − cdf where it is small.
 *
 * The prefactor x^a y^b / B(a, b) is where naive code loses digits for large
 * a and b (a log x + b log y − log B cancels). It is computed in the
 * saddle-point form of Loader (2000), the same one the chi-square tail uses:
 *
 *   x^a y^b / B(a, b) = √(ab / (2π n)) · exp(δ(n) − δ(a) − δ(b) − bd0(a, n x) − bd0(b, n y)),
 *
 * n = a + b, δ Stirling's error term and bd0(a, m) = a log(a/m) + m − a the
 * deviance term, evaluated from the difference a − n x = a y − b x, which a
 * caller may supply more accurately than x alone gives it (the F and t tails
 * do, from their own arguments).
 *
 * Sources: Abramowitz, M. & Stegun, I. A. (1964), Handbook of Mathematical
 * Functions, §6.6 and §26.5; Loader, C. (2000), Fast and accurate computation
 * of binomial probabilities; Press, W. H. et al. (2007), Numerical Recipes,
 * 3rd ed., §6.4 (the continued fraction and where it converges).
 */

const EPSILON = 1e-16;
const TINY = 1e-300;
const MAX_ITERATIONS = 10_000_000;

const LOG_SQRT_2PI = 0.91893853320467274178032973640562;

/**
 * log B(a, b) = log Γ(a) + log Γ(b) − log Γ(a + b) (A&S 6.2.2). When a
 * parameter is large the three log Γ values are large and nearly cancel, so
 * Stirling's form log Γ(z) = (z − ½) log z − z + log √(2π) + δ(z) is
 * subtracted analytically first (δ as in gamma.ts), e.g. for A ≥ 10:
 *   log Γ(A) − log Γ(A + s) = (A − ½) log1p(−s/(A+s)) − s log(A+s) + s + δ(A) − δ(A+s).
 * @example logBeta(2, 3) = log(1/12)
 */
export function logBeta(a: number, b: number): number {
  const small = Math.min(a, b);
  const big = Math.max(a, b);
  const n = a + b;
  if (big < 10) return logGamma(a) + logGamma(b) - logGamma(n);
  const delta = stirlingError; // δ(z) = log Γ(z) − [(z − ½) log z − z + log √(2π)]
  if (small < 10) {
    const ratio = (big - 0.5) * Math.log1p(-small / n) - small * Math.log(n) + small + delta(big) - delta(n);
    return logGamma(small) + ratio;
  }
  return LOG_SQRT_2PI + (big - 0.5) * Math.log1p(-small / n) + (small - 0.5) * Math.log(small / n) - 0.5 * Math.log(n) + delta(a) + delta(b) - delta(n);
}

/**
 * x^a y^b / B(a, b) with y = 1 − x given separately and d = a y − b x
 * (= a − (a+b) x), in Loader's saddle-point form (see the module comment).
 */
function powerTerm(x: number, y: number, a: number, b: number, d: number): number {
  if (x <= 0 || y <= 0) return 0;
  const n = a + b;
  if (a < 1e-8 || b < 1e-8) {
    // Stirling's form needs a, b away from 0; here log B is small and the direct form is exact enough.
    return Math.exp(a * Math.log(x) + b * Math.log(y) - logBeta(a, b));
  }
  const exponent =
    stirlingError(n) -
    stirlingError(a) -
    stirlingError(b) -
    devianceTermFromDifference(a, n * x, d) -
    devianceTermFromDifference(b, n * y, -d);
  return Math.sqrt((a * b) / (2 * Math.PI * n)) * Math.exp(exponent);
}

/**
 * The continued fraction of Didonato & Morris (1992, ACM TOMS 18, 360–373,
 * algorithm 708, routine BFRAC) for I_x(a, b) / (x^a y^b / B(a, b)), written
 * in terms of λ = a − (a + b) x ≥ 0. Unlike the plain form of A&S 26.5.8
 * (whose partial numerators tend to −1 when x is near 1 and a is large, so
 * that every step cancels), its terms are sums of non-negative parts while
 * λ ≥ 0, the side of the mean on which it is used. Evaluated by the
 * three-term recurrence with rescaling, as in the published routine.
 */
function continuedFraction(x: number, y: number, a: number, b: number, lambda: number): number {
  const c = lambda + 1;
  const c0 = b / a;
  const c1 = 1 / a + 1;
  const yp1 = y + 1;
  let p = 1;
  let s = a + 1;
  let an = 0;
  let bn = 1;
  let anp1 = 1;
  let bnp1 = c / c1;
  let r = c1 / c;
  for (let n = 1; n < MAX_ITERATIONS; n++) {
    let t = n / a;
    const w = n * (b - n) * x;
    let e = a / s;
    const alpha = p * (p + c0) * e * e * (w * x);
    e = (1 + t) / (c1 + t + t);
    const beta = n + w / s + e * (c + n * yp1);
    p = 1 + t;
    s += 2;
    t = alpha * an + beta * anp1;
    an = anp1;
    anp1 = t;
    t = alpha * bn + beta * bnp1;
    bn = bnp1;
    bnp1 = t;
    const r0 = r;
    r = anp1 / bnp1;
    if (Math.abs(r - r0) <= EPSILON * r) break;
    an /= bnp1;
    bn /= bnp1;
    anp1 = r;
    bnp1 = 1;
  }
  return r;
}

export interface BetaTails {
  /** I_x(a, b) = P(X ≤ x) for X ~ Beta(a, b). */
  lower: number;
  /** 1 − I_x(a, b) = I_y(b, a) = P(X > x). */
  upper: number;
  /** x^a y^b / B(a, b): the density times x·y, i.e. d lower / d log(x/y). */
  power: number;
}

/**
 * Both tails of Beta(a, b) at x, the smaller one computed directly and the
 * other as its complement (see the module comment). `y` is 1 − x, passed
 * separately when the caller knows it more accurately; `d` is a y − b x when
 * the caller can compute it without cancellation.
 */
export function betaTails(x: number, a: number, b: number, y = 1 - x, d = a * y - b * x): BetaTails {
  if (!(a > 0 && b > 0) || Number.isNaN(x) || Number.isNaN(y)) return { lower: Number.NaN, upper: Number.NaN, power: Number.NaN };
  if (x <= 0) return { lower: 0, upper: 1, power: 0 };
  if (y <= 0) return { lower: 1, upper: 0, power: 0 };
  const power = powerTerm(x, y, a, b, d);
  // d = a − (a+b)x ≥ 0: x lies below the mean, the lower tail is the short one.
  if (d >= 0) {
    const lower = Math.min(1, power * continuedFraction(x, y, a, b, d));
    return { lower, upper: 1 - lower, power };
  }
  const upper = Math.min(1, power * continuedFraction(y, x, b, a, -d));
  return { lower: 1 - upper, upper, power };
}

/**
 * Regularized incomplete beta I_x(a, b) (A&S 6.6.2), the lower tail of
 * Beta(a, b). Pass y = 1 − x when it is known more accurately than 1 − x.
 * @example regularizedBeta(0.5, 2, 3) === 0.6875 (= 11/16, A&S 26.5.4 with integer a, b)
 */
export function regularizedBeta(x: number, a: number, b: number, y = 1 - x): number {
  return betaTails(x, a, b, y).lower;
}

/**
 * Complement 1 − I_x(a, b) = I_{1−x}(b, a), the upper tail of Beta(a, b),
 * computed directly where it is small.
 * @example regularizedBetaComplement(0.5, 2, 3) === 0.3125 (= 5/16)
 */
export function regularizedBetaComplement(x: number, a: number, b: number, y = 1 - x): number {
  return betaTails(x, a, b, y).upper;
}

/**
 * The Beta(a, b) density at x (y = 1 − x): x^(a−1) y^(b−1) / B(a, b) (A&S 26.1.33).
 * @example betaDensity(0.5, 2, 3) = 12 · 0.5 · 0.25 = 1.5
 */
export function betaDensity(x: number, a: number, b: number, y = 1 - x): number {
  if (!(x > 0 && y > 0)) {
    if (x === 0) return a < 1 ? Infinity : a === 1 ? b : 0;
    if (y === 0) return b < 1 ? Infinity : b === 1 ? a : 0;
    return Number.NaN;
  }
  return powerTerm(x, y, a, b, a * y - b * x) / (x * y);
}

/** x = 1/(1 + e^−u), y = 1/(1 + e^u), each without cancellation. */
function logisticPair(u: number): { x: number; y: number } {
  if (u >= 0) {
    const e = Math.exp(-u);
    return { x: 1 / (1 + e), y: e / (1 + e) };
  }
  const e = Math.exp(u);
  return { x: e / (1 + e), y: 1 / (1 + e) };
}

/**
 * Solves P(X ≤ x) = target (side 'lower') or P(X > x) = target (side
 * 'upper') for X ~ Beta(a, b), in the variable u = log(x/y), and returns u.
 * The tails are evaluated at x and y built from u directly, so a quantile near
 * 1 keeps the relative accuracy of 1 − x. Newton's method on log(tail)
 * (d tail/du = ±x^a y^b/B(a, b)), safeguarded by bisection on a bracket.
 * Callers pass target ≤ ½ for the side they ask about, or any target in (0, 1).
 */
export function betaQuantileLogOdds(target: number, a: number, b: number, side: 'lower' | 'upper'): number {
  if (!(target > 0 && target < 1) || !(a > 0 && b > 0)) {
    if (target === 0) return side === 'lower' ? -Infinity : Infinity;
    if (target === 1) return side === 'lower' ? Infinity : -Infinity;
    return Number.NaN;
  }
  // Solve on the side whose tail is ≤ ½, where its value is computed to full relative accuracy.
  if (target > 0.5) {
    return betaQuantileLogOdds(1 - target, a, b, side === 'lower' ? 'upper' : 'lower');
  }
  const sign = side === 'lower' ? 1 : -1; // the tail increases with u on the lower side
  const logTarget = Math.log(target);
  const evaluate = (u: number): { g: number; slope: number } => {
    // Beyond e^−700 the variable on the short side underflows; there the tail is its leading
    // term x^a/(a B(a, b)) (A&S 26.5.4 with x < 1e-300), taken in logarithms.
    if (u < -700 && side === 'lower') return { g: a * u - Math.log(a) - logBeta(a, b) - logTarget, slope: a };
    if (u > 700 && side === 'upper') return { g: -b * u - Math.log(b) - logBeta(a, b) - logTarget, slope: -b };
    const { x, y } = logisticPair(u);
    const tails = betaTails(x, a, b, y);
    const tail = side === 'lower' ? tails.lower : tails.upper;
    if (!(tail > 0)) return { g: -Infinity, slope: Number.NaN };
    return { g: Math.log(tail) - logTarget, slope: (sign * tails.power) / tail };
  };
  // Newton's method from the mean's log odds, log(a/b). The density in u, x^a y^b / B(a, b), is
  // log-concave, hence so are both tails (Prékopa 1973, Acta Sci. Math. 34, 335–343), and g is concave
  // and monotone: after the first step Newton's iterates approach the root from one side. A bracket is
  // kept all the same, for the steps where the tail underflows (g = −∞) or rounding misleads.
  let u = Math.log(a / b);
  let current = evaluate(u);
  let low = -Infinity;
  let high = Infinity;
  let step = 1;
  for (let iteration = 0; iteration < 400; iteration++) {
    if (current.g === 0) return u;
    // g·sign < 0 means u is below the root
    if (current.g * sign < 0) low = Math.max(low, u);
    else high = Math.min(high, u);
    let next = u - current.g / current.slope;
    const bracketed = Number.isFinite(low) && Number.isFinite(high);
    if (!Number.isFinite(next) || (bracketed && !(next > low && next < high))) {
      if (bracketed) next = 0.5 * (low + high);
      else {
        next = Number.isFinite(low) ? low + step : high - step;
        step *= 2;
      }
    }
    if (Math.abs(next) > 1e6) return next > 0 ? Infinity : -Infinity; // far beyond the double range of x or y
    if (Math.abs(next - u) <= 1e-15 * Math.max(1, Math.abs(u))) return next;
    if (bracketed && high - low <= 4e-16 * Math.max(1, Math.abs(low), Math.abs(high))) return next;
    u = next;
    current = evaluate(u);
  }
  return u;
}

/**
 * Quantile of Beta(a, b): the x with I_x(a, b) = p (A&S 26.5.1 inverted).
 * a = 0 or b = 0 are the degenerate limits (a point mass at 0 or 1), as the
 * Clopper–Pearson interval uses them.
 * @example betaQuantile(0.6875, 2, 3) ≈ 0.5
 */
export function betaQuantile(p: number, a: number, b: number): number {
  if (a === 0) return 0;
  if (b === 0) return 1;
  const u = betaQuantileLogOdds(p, a, b, 'lower');
  return logisticPair(u).x;
}

/**
 * The x with P(X > x) = q for X ~ Beta(a, b): the upper quantile, accurate for tiny q.
 * @example upperQuantileBeta(0.3125, 2, 3) ≈ 0.5 (1 − I_0.5(2, 3) = 5/16)
 */
export function upperQuantileBeta(q: number, a: number, b: number): number {
  if (a === 0) return 0;
  if (b === 0) return 1;
  const u = betaQuantileLogOdds(q, a, b, 'upper');
  return logisticPair(u).x;
}
