/**
 * Noncentral chi-square tails, and the interval for Cramér's V by inverting
 * them.
 */
import { lowerTailChiSquare, upperTailChiSquare } from './chiSquareDistribution.js';
import { poissonDensityRaw, regularizedGammaLower, regularizedGammaUpper } from './gamma.js';

/**
 * Noncentral chi-square tails as Poisson mixtures of central ones
 * (Johnson, Kotz & Balakrishnan 1995, Continuous Univariate Distributions 2,
 * ch. 29, eq. 29.2):
 *   P(X ≥ x; k, λ) = Σ_j e^{−λ/2} (λ/2)^j / j! · Q(k/2 + j, x/2).
 * Only the j where the Poisson weight matters are summed (the mode ± 12
 * standard deviations, widened until the weights fall below 1e-20 of the
 * largest). Along j the central tails follow the recurrence
 *   Q(a + 1, y) = Q(a, y) + y^a e^{−y} / Γ(a + 1)   (A&S 6.5.21),
 * run upwards for the upper tail and downwards for the lower tail, the
 * directions in which it only adds, so each term costs O(1).
 */
function weightRange(half: number): { first: number; last: number } {
  const mode = Math.floor(half);
  const spread = Math.ceil(12 * Math.sqrt(half) + 20);
  return { first: Math.max(0, mode - spread), last: mode + spread };
}

function poissonWeight(j: number, half: number): number {
  return j === 0 ? Math.exp(-half) : poissonDensityRaw(j, half);
}

export function upperTailNoncentralChiSquare(x: number, df: number, lambda: number): number {
  if (lambda === 0) return upperTailChiSquare(x, df);
  if (x <= 0) return 1;
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

export function lowerTailNoncentralChiSquare(x: number, df: number, lambda: number): number {
  if (lambda === 0) return lowerTailChiSquare(x, df);
  if (x <= 0) return 0;
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
 * Confidence limits for the noncentrality λ of the observed X², by inverting
 * the noncentral chi-square distribution (the pivot method of Smithson 2003,
 * Confidence Intervals, ch. 4): λ_L solves P(X ≥ x; λ_L) = α/2 and λ_U solves
 * P(X ≤ x; λ_U) = α/2; a limit is 0 when even λ = 0 cannot reach it.
 */
export function noncentralityInterval(x: number, df: number, confidence: number): { lower: number; upper: number } {
  const alphaHalf = (1 - confidence) / 2;
  const solve = (f: (lambda: number) => number): number => {
    // f increases with λ; find f(λ) = 0 by the Illinois variant of regula falsi
    // (Dowell & Jarratt 1971), which keeps a bracket and converges superlinearly.
    let lo = 0;
    let flo = f(lo);
    if (flo >= 0) return 0;
    let hi = Math.max(1, x);
    let fhi = f(hi);
    while (fhi < 0) {
      lo = hi;
      flo = fhi;
      hi *= 2;
      fhi = f(hi);
    }
    let side = 0;
    let previous = Number.NaN;
    for (let i = 0; i < 200; i++) {
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
      if (Math.abs(mid - previous) <= 1e-11 * Math.max(1, mid) || hi - lo <= 1e-10 * Math.max(1, hi)) return mid;
      previous = mid;
    }
    return (lo + hi) / 2;
  };
  const lower = solve((lambda) => upperTailNoncentralChiSquare(x, df, lambda) - alphaHalf);
  const upper = solve((lambda) => alphaHalf - lowerTailNoncentralChiSquare(x, df, lambda));
  return { lower, upper };
}

/**
 * Interval for the population Cramér's V = √(λ / (n (m − 1))), m = min(r, c),
 * from the noncentrality interval above (λ = n(m−1)V² under the alternative;
 * Smithson 2003, ch. 4). Capped at 1.
 */
export function cramersVInterval(chiSquare: number, df: number, n: number, r: number, c: number, confidence: number): { lower: number; upper: number } | null {
  const m = Math.min(r, c);
  if (!(n > 0) || m < 2 || df < 1) return null;
  const { lower, upper } = noncentralityInterval(chiSquare, df, confidence);
  const toV = (lambda: number) => Math.min(1, Math.sqrt(lambda / (n * (m - 1))));
  return { lower: toV(lower), upper: toV(upper) };
}

/**
 * Median-unbiased estimate of the population Cramér's V: √(λ̂ / (n (m − 1)))
 * with λ̂ solving P(X ≥ x; λ̂) = ½, 0 when even λ = 0 gives less (the point
 * the pivot interval above is built around, Smithson 2003, ch. 4). Because
 * P(X ≥ x; λ) rises with λ, it always lies between the interval's limits,
 * whatever the confidence level; the sample V need not.
 */
export function cramersVMedianEstimate(chiSquare: number, df: number, n: number, r: number, c: number): number | null {
  const m = Math.min(r, c);
  if (!(n > 0) || m < 2 || df < 1) return null;
  const { lower } = noncentralityInterval(chiSquare, df, 0);
  return Math.min(1, Math.sqrt(lower / (n * (m - 1))));
}
