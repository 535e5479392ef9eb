/** The odds ratio and relative risk of a 2×2 table, with their intervals. */
import { CountMatrix, isTwoByTwo } from './contingency.js';
import { normalQuantile } from './normalDistribution.js';

export interface IntervalEstimate {
  estimate: number;
  lower: number;
  upper: number;
  /** True when ½ was added to every cell because a cell was zero. */
  haldaneCorrection: boolean;
}

function withHaldane(counts: CountMatrix, needs: (a: number, b: number, c: number, d: number) => boolean) {
  const [[a, b], [c, d]] = counts;
  if (needs(a, b, c, d)) return { a: a + 0.5, b: b + 0.5, c: c + 0.5, d: d + 0.5, corrected: true };
  return { a, b, c, d, corrected: false };
}

/**
 * Sample odds ratio θ = ad/(bc) of the 2×2 table [[a, b], [c, d]] with the
 * Woolf (logit) interval exp(log θ ± z √(1/a + 1/b + 1/c + 1/d))
 * (Woolf 1955, Ann. Hum. Genet. 19, 251–253). When any cell is zero, ½ is
 * added to every cell first (Haldane 1956, Ann. Hum. Genet. 20, 309–311).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * oddsRatio([[189, 10845], [104, 10933]]) // { estimate: 1.832, lower: 1.440, upper: 2.331, haldaneCorrection: false }
 */
export function oddsRatio(counts: CountMatrix, confidence = 0.95): IntervalEstimate | null {
  if (!isTwoByTwo(counts)) return null;
  const { a, b, c, d, corrected } = withHaldane(counts, (a, b, c, d) => a === 0 || b === 0 || c === 0 || d === 0);
  const logEstimate = Math.log(a) + Math.log(d) - Math.log(b) - Math.log(c);
  const se = Math.sqrt(1 / a + 1 / b + 1 / c + 1 / d);
  const z = normalQuantile(0.5 + confidence / 2);
  return { estimate: Math.exp(logEstimate), lower: Math.exp(logEstimate - z * se), upper: Math.exp(logEstimate + z * se), haldaneCorrection: corrected };
}

/**
 * Relative risk of the first column level, first row against second:
 * RR = (a/(a+b)) / (c/(c+d)), with the Katz log interval
 * exp(log RR ± z √(1/a − 1/(a+b) + 1/c − 1/(c+d)))
 * (Katz, Baptista, Azen & Pike 1978, Biometrics 34, 469–474). When a or c is
 * zero, ½ is added to every cell first. null when a row is empty.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): the risk of infarction is 1.82 times higher on placebo
 * relativeRisk([[189, 10845], [104, 10933]]) // { estimate: 1.818, lower: 1.433, upper: 2.306, haldaneCorrection: false }
 */
export function relativeRisk(counts: CountMatrix, confidence = 0.95): IntervalEstimate | null {
  if (!isTwoByTwo(counts)) return null;
  const [[a0, b0], [c0, d0]] = counts;
  if (a0 + b0 === 0 || c0 + d0 === 0) return null;
  const { a, b, c, d, corrected } = withHaldane(counts, (a, _b, c) => a === 0 || c === 0);
  const logEstimate = Math.log(a / (a + b)) - Math.log(c / (c + d));
  const se = Math.sqrt(1 / a - 1 / (a + b) + 1 / c - 1 / (c + d));
  const z = normalQuantile(0.5 + confidence / 2);
  return { estimate: Math.exp(logEstimate), lower: Math.exp(logEstimate - z * se), upper: Math.exp(logEstimate + z * se), haldaneCorrection: corrected };
}
