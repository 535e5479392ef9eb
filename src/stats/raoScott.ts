/**
 * Rao–Scott design-based tests of independence (corrected chi-square and F).
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { likelihoodRatioChiSquare, pearsonChiSquare } from './chiSquareTests.js';
import type { DesignEstimate } from './designCovariance.js';
import { generalizedDesignEffects, type GeneralizedDesignEffects } from './designEffects.js';
import { upperTailF } from './fDistribution.js';

/**
 * Rao–Scott design-based tests of independence in an r × c table
 * (design-based-tests.md §1, §7).
 *
 *   X² = n Σ (p_ij − p_i+ p_+j)² / (p_i+ p_+j),   G² = 2n Σ p_ij log(p_ij / (p_i+ p_+j)),
 *
 * the Pearson and likelihood-ratio statistics of the weighted table rescaled
 * to n, the unweighted number of complete rows. With the generalized design
 * effects δ̄ = trace(Δ)/k and trace(Δ²) (designEffects.ts):
 *
 *   first order   X²/δ̄ and G²/δ̄, referred to χ² on k = (r−1)(c−1) df
 *                 (Rao & Scott 1981, JASA 76, 221–230; 1984, Ann. Statist. 12, 46–60);
 *   second order  F = X² / trace(Δ) on ν₁ = trace(Δ)² / trace(Δ²) = k/(1 + a²)
 *                 and ν₂ = ν₁ × design df (Thomas, D. R. & Rao, J. N. K. 1987,
 *                 JASA 82, 630–636; Rao & Thomas 1989, in Skinner, Holt & Smith,
 *                 Analysis of Complex Surveys, ch. 4), p from F(ν₁, ν₂) with
 *                 real df. This is the test to lead with when a design is given.
 *
 * The identity designPearson.statistic = k × designF.statistic holds by
 * construction, and ν₁ = 1 for a 2 × 2 table.
 */

export interface DesignChiSquare {
  statistic: number;
  df: number;
  pValue: number;
  meanDesignEffect: number;
}

export interface DesignFTest {
  statistic: number;
  numDf: number;
  denDf: number;
  pValue: number;
}

export interface DesignTests {
  /** X² and G² of the weighted table rescaled to n */
  pearson: number;
  likelihoodRatio: number;
  n: number;
  designPearson: DesignChiSquare | null;
  designLikelihoodRatio: DesignChiSquare | null;
  designF: DesignFTest | null;
  designEffects: GeneralizedDesignEffects;
  /** why the design tests are null, when they are */
  reason: string | null;
}

/** The weighted table rescaled to total n: n p_ij, as rows of counts. */
export function rescaledTable(p: ArrayLike<number>, n: number, rows: number, cols: number): number[][] {
  return Array.from({ length: rows }, (_r, i) => Array.from({ length: cols }, (_c, j) => n * p[i * cols + j]));
}

/** designPearson: X²/δ̄ on k df (Rao & Scott 1981). */
export function designPearson(pearson: number, effects: GeneralizedDesignEffects): DesignChiSquare {
  const statistic = pearson / effects.mean;
  return { statistic, df: effects.k, pValue: upperTailChiSquare(statistic, effects.k), meanDesignEffect: effects.mean };
}

/** designLikelihoodRatio: G²/δ̄ on k df (Rao & Scott 1984). */
export function designLikelihoodRatio(likelihoodRatio: number, effects: GeneralizedDesignEffects): DesignChiSquare {
  const statistic = likelihoodRatio / effects.mean;
  return { statistic, df: effects.k, pValue: upperTailChiSquare(statistic, effects.k), meanDesignEffect: effects.mean };
}

/** designF: X²/trace(Δ) on trace²/trace(Δ²) and that times the design df (Thomas & Rao 1987). */
export function designF(pearson: number, effects: GeneralizedDesignEffects, designDegreesOfFreedom: number): DesignFTest {
  const statistic = pearson / effects.trace;
  const numDf = (effects.trace * effects.trace) / effects.traceOfSquare;
  const denDf = numDf * designDegreesOfFreedom;
  return { statistic, numDf, denDf, pValue: upperTailF(statistic, numDf, denDf) };
}

/**
 * All design-based tests of independence for an r × c table from a design
 * estimate (linearizedCovariance or replicateCovariance, cells row-major).
 * Every row and column must have weight (drop empty levels first). The
 * tests are null, with the reason, when the design variance of the
 * independence contrasts is zero or the design has no degrees of freedom.
 * @example On the one-stage cluster sample of the California Academic Performance Index (apiclus1, 15 school
 *          districts, fpc), sch.wide × stype gives F = 5.193 on 1.495 and 20.92 df, p = 0.0217, δ̄ = 1.150
 *          (test/stats/raoScott.test.ts, recorded from the survey library for R).
 */
export function designTests(estimate: DesignEstimate, rows: number, cols: number): DesignTests {
  if (rows < 2 || cols < 2) throw new Error(`designTests: a ${rows} × ${cols} table has no independence test`);
  const { proportions: p, n } = estimate;
  const table = rescaledTable(p, n, rows, cols);
  for (let i = 0; i < rows; i++) if (!table[i].some((v) => v > 0)) throw new Error(`designTests: row ${i} of the table is empty`);
  for (let j = 0; j < cols; j++) if (!table.some((row) => row[j] > 0)) throw new Error(`designTests: column ${j} of the table is empty`);
  const pearson = pearsonChiSquare(table).statistic;
  const likelihoodRatio = likelihoodRatioChiSquare(table).statistic;
  const effects = generalizedDesignEffects(p, estimate.covariance, n, rows, cols);
  let reason: string | null = null;
  if (!(effects.trace > 0)) reason = 'the design variance of the independence contrasts is zero (every stratum fully enumerated or lone PSUs treated as certain)';
  else if (!(estimate.degreesOfFreedom > 0)) reason = `the design has ${estimate.degreesOfFreedom} degrees of freedom (PSUs minus strata)`;
  if (reason) {
    return { pearson, likelihoodRatio, n, designPearson: null, designLikelihoodRatio: null, designF: null, designEffects: effects, reason };
  }
  return {
    pearson,
    likelihoodRatio,
    n,
    designPearson: designPearson(pearson, effects),
    designLikelihoodRatio: designLikelihoodRatio(likelihoodRatio, effects),
    designF: designF(pearson, effects, estimate.degreesOfFreedom),
    designEffects: effects,
    reason: null,
  };
}
