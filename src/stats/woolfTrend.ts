/**
 * The trend of the log odds ratio over ordered strata, by Woolf-weighted
 * regression.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { compensatedSum } from '../numerics/compensatedSum.js';
import { CountMatrix } from './contingency.js';
import { normalQuantile } from './normalDistribution.js';

export interface LogOddsRatioTrend {
  /** Change in the log odds ratio per unit of score (per wave, per year…); exp(slope) is the factor on the odds ratio. */
  slope: number;
  standardError: number;
  lower: number;
  upper: number;
  confidence: number;
  /** The fitted log odds ratio at score 0. */
  intercept: number;
  /** Wald test of slope = 0: z = slope/SE, referred as z² to χ²(1) (two-sided). */
  test: TestResult & { z: number };
  /** Σ w_k (y_k − fitted)² on K − 2 df: do the strata scatter about the line more than chance allows? null for two strata. */
  residualHeterogeneity: TestResult | null;
  /** Strata used (no empty row or column). */
  strataUsed: number;
  /** Indexes of strata where ½ was added to every cell because one was zero (Haldane 1956). */
  haldaneStrata: number[];
}

/**
 * Weighted least-squares regression of the stratum log odds ratios on the
 * stratum scores (waves, years), each weighted by the inverse of Woolf's
 * variance: y_k = log(a d / b c), w_k = (1/a + 1/b + 1/c + 1/d)⁻¹
 * (Woolf 1955, Ann. Hum. Genet. 19, 251–253), ½ added to every cell of a
 * stratum with a zero cell (Haldane 1956, Ann. Hum. Genet. 20, 309–311).
 * With the variances taken as known (a fixed-effect meta-regression;
 * Hedges & Olkin 1985, Statistical Methods for Meta-Analysis, ch. 8):
 *   slope = Σ w (x − x̄)(y − ȳ) / Σ w (x − x̄)²,  SE = 1/√(Σ w (x − x̄)²),
 * x̄, ȳ the w-weighted means; interval slope ± z SE; the Wald z = slope/SE;
 * residual heterogeneity Q = Σ w (y − ŷ)² on K − 2 df.
 * Strata with an empty row or column are left out. null with fewer than two
 * strata or all scores equal.
 *
 * @example
 * // GSS vocabulary, college degree × vocabulary 7+ over 22 waves (scores 0..21):
 * // slope −0.0358 per wave (the odds ratio shrinks by about 3.5 % a wave)
 */
export function woolfTrend(strata: readonly CountMatrix[], scores: readonly number[], confidence = 0.95): LogOddsRatioTrend | null {
  if (scores.length !== strata.length) throw new Error(`woolfTrend: ${strata.length} strata but ${scores.length} scores`);
  const x: number[] = [];
  const y: number[] = [];
  const w: number[] = [];
  const haldaneStrata: number[] = [];
  strata.forEach((t, k) => {
    let [[a, b], [c, d]] = t;
    if (a + b === 0 || c + d === 0 || a + c === 0 || b + d === 0) return;
    if (a === 0 || b === 0 || c === 0 || d === 0) {
      a += 0.5;
      b += 0.5;
      c += 0.5;
      d += 0.5;
      haldaneStrata.push(k);
    }
    x.push(scores[k]);
    y.push(Math.log(a) + Math.log(d) - Math.log(b) - Math.log(c));
    w.push(1 / (1 / a + 1 / b + 1 / c + 1 / d));
  });
  if (x.length < 2) return null;
  const sumW = compensatedSum(w);
  const meanX = compensatedSum(w.map((wk, k) => wk * x[k])) / sumW;
  const meanY = compensatedSum(w.map((wk, k) => wk * y[k])) / sumW;
  const sxx = compensatedSum(w.map((wk, k) => wk * (x[k] - meanX) ** 2));
  if (!(sxx > 0)) return null;
  const sxy = compensatedSum(w.map((wk, k) => wk * (x[k] - meanX) * (y[k] - meanY)));
  const slope = sxy / sxx;
  const standardError = 1 / Math.sqrt(sxx);
  const zCritical = normalQuantile(0.5 + confidence / 2);
  const z = slope / standardError;
  const residual = compensatedSum(w.map((wk, k) => wk * (y[k] - meanY - slope * (x[k] - meanX)) ** 2));
  const residualDf = x.length - 2;
  return {
    slope,
    standardError,
    lower: slope - zCritical * standardError,
    upper: slope + zCritical * standardError,
    confidence,
    intercept: meanY - slope * meanX,
    test: { statistic: z * z, df: 1, pValue: upperTailChiSquare(z * z, 1), z },
    residualHeterogeneity: residualDf > 0 ? { statistic: residual, df: residualDf, pValue: upperTailChiSquare(residual, residualDf) } : null,
    strataUsed: x.length,
    haldaneStrata,
  };
}
