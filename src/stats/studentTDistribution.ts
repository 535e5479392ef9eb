/**
 * Student's t distribution: tails and quantiles for real degrees of freedom.
 */
import { betaQuantileLogOdds, betaTails, logBeta } from './incompleteBeta.js';

/**
 * Student's t distribution with real df ν > 0, through the incomplete beta
 * function: for t ≥ 0
 *
 *   P(T > t) = ½ I_x(ν/2, ½),  x = ν / (ν + t²),  y = t² / (ν + t²)   (A&S 26.7.1, 26.5.27)
 *
 * and P(T > −t) = 1 − P(T > t) by symmetry (only formed where it is ≥ ½).
 * x and y are formed without cancellation (t² is never added to ν when it
 * would overflow), and the deviance difference a y − b x = (ν/2)(t−1)(t+1)/(ν+t²)
 * is passed in exact form, so far tails keep ~1e-13 relative accuracy down
 * to 1e-300.
 *
 * Source: Abramowitz, M. & Stegun, I. A. (1964), Handbook of Mathematical
 * Functions, §26.7.
 */
function tBetaArguments(t: number, df: number): { x: number; y: number; d: number } {
  const s = Math.abs(t);
  const a = df / 2;
  let x: number;
  let y: number;
  if (s * s <= df) {
    const q = (s * s) / df; // t²/ν ≤ 1
    x = 1 / (1 + q);
    y = q / (1 + q);
  } else {
    const r = df / s / s; // ν/t² < 1, without forming t² when it would overflow
    x = r / (1 + r);
    y = 1 / (1 + r);
  }
  // a y − ½ x = (ν/2)(t² − 1)/(ν + t²) = a·x·(t − 1)(t + 1)/ν
  const d = (a * x * ((s - 1) * (s + 1))) / df;
  return { x, y, d: Number.isFinite(d) ? d : a * y - 0.5 * x };
}

/**
 * I_x(ν/2, ½) where x = ν/(ν + t²) < 1e-300 (possible only for small ν and
 * huge t): the leading term x^a / (a B(a, ½)) of A&S 26.5.4, whose next term
 * is below 1e-300 of it, in logarithms so that x itself need not be formed.
 */
function farTail(t: number, df: number): number {
  const a = df / 2;
  const s = Math.abs(t);
  const logX = Math.log(df) - 2 * Math.log(s) - Math.log1p(df / s / s);
  return Math.exp(a * logX - Math.log(a) - logBeta(a, 0.5));
}

/**
 * P(T > t) for T ~ t(df), real df > 0.
 * @example upperTailStudentT(2.228139, 10) ≈ 0.025 (A&S table 26.10)
 */
export function upperTailStudentT(t: number, df: number): number {
  if (!(df > 0) || Number.isNaN(t)) return Number.NaN;
  if (t === Infinity) return 0;
  if (t === -Infinity) return 1;
  if (t === 0) return 0.5;
  const { x, y, d } = tBetaArguments(t, df);
  if (x < 1e-300 && t > 0) return 0.5 * farTail(t, df);
  const tails = betaTails(x, df / 2, 0.5, y, d);
  // I_x(ν/2, ½) = P(|T| > |t|): the lower beta tail
  return t > 0 ? 0.5 * tails.lower : 0.5 + 0.5 * tails.upper;
}

/** P(T ≤ t) for T ~ t(df). */
export function lowerTailStudentT(t: number, df: number): number {
  return upperTailStudentT(-t, df);
}

/** Two-sided P(|T| ≥ |t|) = I_x(ν/2, ½). */
export function twoSidedStudentT(t: number, df: number): number {
  if (!(df > 0) || Number.isNaN(t)) return Number.NaN;
  if (t === 0) return 1;
  if (!Number.isFinite(t)) return 0;
  const { x, y, d } = tBetaArguments(t, df);
  if (x < 1e-300) return farTail(t, df);
  return betaTails(x, df / 2, 0.5, y, d).lower;
}

/**
 * The t ≥ 0 with P(T > t) = q, for 0 < q ≤ ½ (and by symmetry below 0 for
 * q > ½): the critical value of a one-sided test or half of a two-sided
 * interval, accurate for tiny q. Solved on the beta scale: ½ I_x(ν/2, ½) = q
 * with t = √(ν y / x) = √ν · e^(−u/2), u = log(x/y).
 * @example upperQuantileStudentT(0.025, 10) ≈ 2.228139 (A&S table 26.10)
 */
export function upperQuantileStudentT(q: number, df: number): number {
  if (!(df > 0) || Number.isNaN(q)) return Number.NaN;
  if (q === 0.5) return 0;
  if (q > 0.5) return -upperQuantileStudentT(1 - q, df);
  if (q <= 0) return Infinity;
  const u = betaQuantileLogOdds(2 * q, df / 2, 0.5, 'lower');
  return Math.sqrt(df) * Math.exp(-u / 2);
}

/** The t with P(T ≤ t) = p. */
export function studentTQuantile(p: number, df: number): number {
  if (!(df > 0) || Number.isNaN(p)) return Number.NaN;
  if (p < 0.5) return -upperQuantileStudentT(p, df);
  return upperQuantileStudentT(1 - p, df);
}
