/**
 * Design-based Wald tests that two independent samples estimate the same
 * quantities of an r × c table: the same association (log odds ratios) or
 * the same margin.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import type { CellCovariance, DesignEstimate } from './designCovariance.js';
import { dot } from './linearAlgebra.js';
import { solveLinear } from './stratified.js';
import { upperTailF } from './fDistribution.js';

/**
 * Two independent design-based estimates θ_a, θ_b of the same k quantities,
 * each a smooth function of its sample's cell proportions p with gradient
 * rows G (k × cells), are compared by the Wald statistic
 *
 *   W = d' (G_a V_a G_a' + G_b V_b G_b')⁻¹ d,   d = θ_b − θ_a,
 *
 * (the delta method, Wolter 2007, Introduction to Variance Estimation, 2nd
 * ed., §6.2; independent samples add their covariances), referred to χ² on
 * k df, and in the small-sample form with the design degrees of freedom
 * ν = ν_a + ν_b (the PSUs minus strata, or replicates minus one, of both):
 *
 *   F = (ν − k + 1) / (ν k) · W  on k and ν − k + 1 df
 *
 * (Fellegi, I. P. 1980, JASA 75, 261–268; Korn, E. L. & Graubard, B. I.
 * 1990, Am. Stat. 44, 270–276), the form that leads. F is null when
 * ν − k + 1 < 1.
 *
 * Two sets of quantities are offered:
 *  - the association: the (r−1)(c−1) log odds ratios against the last row
 *    and column, θ_ij = log p_ij − log p_ic − log p_rj + log p_rc (any other
 *    basis of the log-linear interaction gives the same W: it is a linear
 *    one-to-one map of these); undefined when a cell is empty in either
 *    sample;
 *  - a margin: the first r − 1 row (or c − 1 column) shares p_i+.
 *
 * @example The NHANES 2009–2010 extract of the survey package for R split into two samples by stratum
 *          (SDMVSTRA ≤ 82 and the rest, 8 design df each), agecat × race: the 9 log odds ratios give
 *          W = 16.18 and F = 0.899 on 9 and 8 df, p = 0.565; the row margin F = 4.01 on 3 and 14 df
 *          (test/stats/designWald.test.ts, recorded with svyby and svycontrast).
 */

export interface DesignWaldTest {
  /** the small-sample F form (leads), null when the design df are too few */
  statistic: number | null;
  numDf: number;
  denDf: number | null;
  pValue: number | null;
  /** W, on `numDf` degrees of freedom */
  wald: number;
  waldPValue: number;
  /** ν = ν_a + ν_b */
  designDegreesOfFreedom: number;
}

/** g' V h for the covariance V = diag(d) + Σ w_l u_l u_l'. */
function bilinear(covariance: CellCovariance, g: Float64Array, h: Float64Array): number {
  let value = 0;
  if (covariance.diagonal) for (let j = 0; j < covariance.size; j++) value += covariance.diagonal[j] * g[j] * h[j];
  covariance.factors.forEach((u, l) => {
    value += covariance.weights[l] * dot(u, g) * dot(u, h);
  });
  return value;
}

/** G V G' for the gradient rows G. */
export function gradientCovariance(covariance: CellCovariance, gradients: Float64Array[]): number[][] {
  return gradients.map((g) => gradients.map((h) => bilinear(covariance, g, h)));
}

/** The Wald test of equal quantities in two independent samples, from each one's values, gradients and covariance. */
export function independentWaldTest(
  a: { values: number[]; gradients: Float64Array[]; estimate: DesignEstimate },
  b: { values: number[]; gradients: Float64Array[]; estimate: DesignEstimate },
): DesignWaldTest | null {
  const k = a.values.length;
  if (k === 0) return null;
  const va = gradientCovariance(a.estimate.covariance, a.gradients);
  const vb = gradientCovariance(b.estimate.covariance, b.gradients);
  const sum = va.map((row, i) => row.map((x, j) => x + vb[i][j]));
  const d = b.values.map((x, i) => x - a.values[i]);
  const solved = solveLinear(sum, d);
  if (solved === null) return null;
  const wald = d.reduce((s, x, i) => s + x * solved[i], 0);
  return adjustedWald(wald, k, a.estimate.degreesOfFreedom + b.estimate.degreesOfFreedom);
}

/** W on d df, with its F form (ν − d + 1)/(ν d) W on d and ν − d + 1 df (Korn & Graubard 1990). */
export function adjustedWald(wald: number, d: number, nu: number): DesignWaldTest {
  const denDf = nu - d + 1;
  const statistic = denDf >= 1 ? ((nu - d + 1) / (nu * d)) * wald : null;
  return {
    statistic,
    numDf: d,
    denDf: statistic === null ? null : denDf,
    pValue: statistic === null ? null : upperTailF(statistic, d, denDf),
    wald,
    waldPValue: upperTailChiSquare(wald, d),
    designDegreesOfFreedom: nu,
  };
}

/** The (r−1)(c−1) log odds ratios against the last row and column, with their gradients; null when a cell is empty. */
export function logOddsRatios(p: ArrayLike<number>, rows: number, cols: number): { values: number[]; gradients: Float64Array[] } | null {
  for (let j = 0; j < rows * cols; j++) if (!(p[j] > 0)) return null;
  const values: number[] = [];
  const gradients: Float64Array[] = [];
  const at = (i: number, j: number) => i * cols + j;
  for (let i = 0; i < rows - 1; i++) {
    for (let j = 0; j < cols - 1; j++) {
      const cells = [at(i, j), at(i, cols - 1), at(rows - 1, j), at(rows - 1, cols - 1)];
      const signs = [1, -1, -1, 1];
      const g = new Float64Array(rows * cols);
      let value = 0;
      cells.forEach((cell, t) => {
        value += signs[t] * Math.log(p[cell]);
        g[cell] += signs[t] / p[cell];
      });
      values.push(value);
      gradients.push(g);
    }
  }
  return { values, gradients };
}

/** The first r − 1 row shares (by = 'row') or c − 1 column shares, with their gradients. */
export function marginShares(p: ArrayLike<number>, rows: number, cols: number, by: 'row' | 'col'): { values: number[]; gradients: Float64Array[] } {
  const count = by === 'row' ? rows : cols;
  const values: number[] = [];
  const gradients: Float64Array[] = [];
  for (let t = 0; t < count - 1; t++) {
    const g = new Float64Array(rows * cols);
    let value = 0;
    for (let i = 0; i < rows; i++) {
      for (let j = 0; j < cols; j++) {
        if ((by === 'row' ? i : j) !== t) continue;
        g[i * cols + j] = 1;
        value += p[i * cols + j];
      }
    }
    values.push(value);
    gradients.push(g);
  }
  return { values, gradients };
}
