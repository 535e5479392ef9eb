/**
 * Snedecor's F distribution: tails and quantiles for real degrees of
 * freedom.
 */
import { betaQuantileLogOdds, betaTails, logBeta } from './incompleteBeta.js';

/**
 * Snedecor's F distribution with real (not necessarily integer) degrees of
 * freedom df1, df2 > 0, through the incomplete beta function:
 *
 *   P(F ≤ f) = I_x(df1/2, df2/2),  P(F > f) = I_y(df2/2, df1/2),
 *   x = df1 f / (df1 f + df2),  y = df2 / (df1 f + df2)      (A&S 26.6.2)
 *
 * x and y are each formed without cancellation, and the deviance difference
 * a y − b x that the beta prefactor needs is passed in its exact form
 * (df1/2)·y·(1 − f), so the far tails keep ~1e-13 relative accuracy down to
 * 1e-300 (see incompleteBeta.ts). The upper tail is never formed as 1 − cdf
 * where it is small.
 *
 * Source: Abramowitz, M. & Stegun, I. A. (1964), Handbook of Mathematical
 * Functions, §26.6.
 */
function fBetaArguments(f: number, df1: number, df2: number): { x: number; y: number; d: number } {
  const a = df1 / 2;
  const ratio = df2 / df1; // x/y = f / ratio
  let x: number;
  let y: number;
  if (f <= ratio) {
    const q = f / ratio; // df1 f / df2 ≤ 1
    x = q / (1 + q);
    y = 1 / (1 + q);
  } else {
    const r = ratio / f; // df2 / (df1 f) < 1
    x = 1 / (1 + r);
    y = r / (1 + r);
  }
  return { x, y, d: a * y * (1 - f) };
}

/**
 * A tail whose beta variable (x for the lower, y for the upper) is below
 * 1e-300, where it may not be representable: the leading term
 * v^p / (p B(a, b)) of A&S 26.5.4, whose next term is below 1e-300 of it,
 * taken in logarithms (log v = log(v/(1−v)) − log1p(v/(1−v))).
 */
function farTail(logOdds: number, p: number, a: number, b: number): number {
  const logV = logOdds - Math.log1p(Math.exp(logOdds));
  return Math.exp(p * logV - Math.log(p) - logBeta(a, b));
}

/**
 * Upper tail P(F ≥ f) for F ~ F(df1, df2), real df (A&S 26.6.2).
 * @example upperTailF(3.8853, 2, 12) ≈ 0.05 (the 5% point of F(2, 12), A&S table 26.9)
 */
export function upperTailF(f: number, df1: number, df2: number): number {
  if (!(df1 > 0 && df2 > 0) || Number.isNaN(f)) return Number.NaN;
  if (f <= 0) return 1;
  if (f === Infinity) return 0;
  const { x, y, d } = fBetaArguments(f, df1, df2);
  // y/x = (df2/df1)/f
  if (y < 1e-300) return farTail(Math.log(df2 / df1) - Math.log(f), df2 / 2, df1 / 2, df2 / 2);
  return betaTails(x, df1 / 2, df2 / 2, y, d).upper;
}

/**
 * Lower tail P(F ≤ f) for F ~ F(df1, df2).
 * @example lowerTailF(3.8853, 2, 12) ≈ 0.95 (A&S table 26.9)
 */
export function lowerTailF(f: number, df1: number, df2: number): number {
  if (!(df1 > 0 && df2 > 0) || Number.isNaN(f)) return Number.NaN;
  if (f <= 0) return 0;
  if (f === Infinity) return 1;
  const { x, y, d } = fBetaArguments(f, df1, df2);
  // x/y = f/(df2/df1)
  if (x < 1e-300) return farTail(Math.log(f) - Math.log(df2 / df1), df1 / 2, df1 / 2, df2 / 2);
  return betaTails(x, df1 / 2, df2 / 2, y, d).lower;
}

/** f from the log odds u = log(x/y) of the beta variable: f = (df2/df1)·e^u. */
function fromLogOdds(u: number, df1: number, df2: number): number {
  return (df2 / df1) * Math.exp(u);
}

/**
 * The f with P(F ≤ f) = p.
 * @example fQuantile(0.95, 2, 12) ≈ 3.8853 (A&S table 26.9)
 */
export function fQuantile(p: number, df1: number, df2: number): number {
  if (!(df1 > 0 && df2 > 0)) return Number.NaN;
  return fromLogOdds(betaQuantileLogOdds(p, df1 / 2, df2 / 2, 'lower'), df1, df2);
}

/**
 * The f with P(F > f) = q, accurate for tiny q (critical values, interval ends).
 * @example upperQuantileF(0.05, 2, 12) ≈ 3.8853 (A&S table 26.9)
 */
export function upperQuantileF(q: number, df1: number, df2: number): number {
  if (!(df1 > 0 && df2 > 0)) return Number.NaN;
  return fromLogOdds(betaQuantileLogOdds(q, df1 / 2, df2 / 2, 'upper'), df1, df2);
}
