import { lowerTailChiSquare, upperTailChiSquare } from './chiSquareDistribution.js';
import { poissonDensityRaw } from './gamma.js';

/**
 * Noncentral chi-square tails as Poisson mixtures of central ones
 * (Johnson, Kotz & Balakrishnan 1995, Continuous Univariate Distributions 2,
 * ch. 29, eq. 29.2):
 *   P(X ≥ x; k, λ) = Σ_j e^{−λ/2} (λ/2)^j / j! · P(χ²_{k+2j} ≥ x).
 * Summed from the Poisson mode outwards until the weights no longer matter.
 */
function mixture(x: number, df: number, lambda: number, tail: (x: number, df: number) => number): number {
  if (lambda === 0) return tail(x, df);
  const half = lambda / 2;
  const mode = Math.floor(half);
  const weight = (j: number) => (j === 0 ? Math.exp(-half) : poissonDensityRaw(j, half));
  let sum = 0;
  let weightSeen = 0;
  for (let j = mode; ; j++) {
    const w = weight(j);
    sum += w * tail(x, df + 2 * j);
    weightSeen += w;
    if (w < 1e-17 * Math.max(sum, 1e-300) || (w < 1e-17 && j > mode + 10)) break;
  }
  for (let j = mode - 1; j >= 0; j--) {
    const w = weight(j);
    sum += w * tail(x, df + 2 * j);
    weightSeen += w;
    if (w < 1e-17 * Math.max(sum, 1e-300)) break;
  }
  return Math.min(1, sum);
}

export function upperTailNoncentralChiSquare(x: number, df: number, lambda: number): number {
  return mixture(x, df, lambda, upperTailChiSquare);
}

export function lowerTailNoncentralChiSquare(x: number, df: number, lambda: number): number {
  return mixture(x, df, lambda, lowerTailChiSquare);
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
    // f increases with λ; find f(λ) = 0.
    if (f(0) >= 0) return 0;
    let hi = Math.max(1, x);
    while (f(hi) < 0) hi *= 2;
    let lo = 0;
    for (let i = 0; i < 200 && hi - lo > 1e-10 * Math.max(1, hi); i++) {
      const mid = (lo + hi) / 2;
      if (f(mid) < 0) lo = mid;
      else hi = mid;
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
