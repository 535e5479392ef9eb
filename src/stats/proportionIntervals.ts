/** Confidence intervals for a proportion estimated from a complex sample. */
import { betaQuantile, upperQuantileBeta } from './incompleteBeta.js';
import { upperQuantileStudentT } from './studentTDistribution.js';

/**
 * Confidence intervals for a proportion estimated from a complex sample,
 * given its design-based standard error and the design degrees of freedom.
 */

/** t_(df, 1−α/2), remembered: a table asks for the same few (α, df) thousands of times. */
const criticalValues = new Map<string, number>();
function criticalT(alpha: number, df: number): number {
  const key = `${alpha}:${df}`;
  let t = criticalValues.get(key);
  if (t === undefined) {
    if (criticalValues.size > 4096) criticalValues.clear();
    t = upperQuantileStudentT(alpha / 2, df);
    criticalValues.set(key, t);
  }
  return t;
}

export interface ProportionInterval {
  lower: number;
  upper: number;
  method: 'logit' | 'korn-graubard';
}

/**
 * Logit-transformed interval with Student's t on the design df:
 *   logit(p̂) ± t_(df, 1−α/2) · se(p̂) / (p̂ (1 − p̂)),  mapped back by 1/(1 + e^−x)
 * (the delta method for log(p/(1−p)); Korn & Graubard 1999, Analysis of
 * Health Surveys, §3.2.3; Heeringa, West & Berglund 2017, Applied Survey Data
 * Analysis, 2nd ed., §6.2.2). null for p̂ of 0 or 1, where the logit is infinite.
 * @example logitInterval(0.2, 0.04, 30) → [0.1305, 0.2941] (t_30 = 2.0423)
 */
export function logitInterval(p: number, standardError: number, df: number, level = 0.95): ProportionInterval | null {
  if (!(p > 0 && p < 1) || !(df > 0) || !(standardError >= 0)) return null;
  const t = criticalT(1 - level, df);
  const centre = Math.log(p / (1 - p));
  const half = (t * standardError) / (p * (1 - p));
  const expit = (x: number): number => 1 / (1 + Math.exp(-x));
  return { lower: expit(centre - half), upper: expit(centre + half), method: 'logit' };
}

/**
 * Korn–Graubard interval: the Clopper–Pearson interval on the design
 * effective sample size, adjusted for the design degrees of freedom
 * (Korn, E. L. & Graubard, B. I. 1998, Survey Methodology 24, 193–201;
 * Parker et al. 2017, NCHS Data Presentation Standards for Proportions,
 * Vital Health Stat 2(175)):
 *   n* = p̂(1 − p̂)/v(p̂) · (t_(n−1, 1−α/2) / t_(df, 1−α/2))²   (n* = n when v(p̂) = 0),
 *   lower = B⁻¹(α/2; n*p̂, n*(1−p̂) + 1),  upper = B⁻¹(1 − α/2; n*p̂ + 1, n*(1−p̂)),
 * B⁻¹ the beta quantile, lower = 0 when p̂ = 0 and upper = 1 when p̂ = 1.
 * n is the unweighted sample size of the domain (its complete rows).
 * null when n < 2 (no t on n − 1 df).
 * @example With binomial variance and df = n − 1 it is Clopper–Pearson: 7 of 20 →
 *          kornGraubardInterval(0.35, 0.35 · 0.65 / 20, 20, 19) → [0.1539, 0.5922]
 *          (Newcombe 1998, Stat. Med. 17, 857–872, table II).
 */
export function kornGraubardInterval(p: number, variance: number, n: number, df: number, level = 0.95): (ProportionInterval & { effectiveSize: number }) | null {
  if (!(p >= 0 && p <= 1) || !(n >= 2) || !(df > 0) || !(variance >= 0)) return null;
  const alpha = 1 - level;
  const raw = variance > 0 && p > 0 && p < 1 ? (p * (1 - p)) / variance : n;
  const ratio = criticalT(alpha, n - 1) / criticalT(alpha, df);
  const effectiveSize = raw * ratio * ratio;
  const x = effectiveSize * p;
  const lower = p > 0 ? betaQuantile(alpha / 2, x, effectiveSize - x + 1) : 0;
  const upper = p < 1 ? upperQuantileBeta(alpha / 2, x + 1, effectiveSize - x) : 1;
  return { lower, upper, method: 'korn-graubard', effectiveSize };
}

/**
 * The interval to report: Korn–Graubard when p̂ is 0 or 1 or when the
 * design-effective count of the rarer outcome, n_eff · min(p̂, 1 − p̂) with
 * n_eff = p̂(1 − p̂)/v(p̂), is below 10 (where the logit interval's normal
 * approximation is poor and Korn–Graubard keeps its coverage; the rule of ten
 * expected events is common practice); the logit interval otherwise.
 */
export function chooseProportionInterval(p: number, variance: number): 'logit' | 'korn-graubard' {
  if (!(p > 0 && p < 1) || !(variance > 0)) return 'korn-graubard';
  const effective = (p * (1 - p)) / variance;
  return effective * Math.min(p, 1 - p) < 10 ? 'korn-graubard' : 'logit';
}
