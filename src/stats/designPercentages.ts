import { cellVariance, quadraticForm, type DesignEstimate } from './designCovariance.js';
import { chooseProportionInterval, kornGraubardInterval, logitInterval, type ProportionInterval } from './proportionIntervals.js';
import type { DesignTests } from './raoScott.js';

/**
 * Weighted cell, row and column percentages of an r × c table with
 * design-based standard errors and confidence intervals.
 *
 *   cell     p_ij,              Var = V_(ij,ij)
 *   row      R_ij = p_ij/p_i+,  Var = g'Vg,  g_kl = [k = i]([l = j] − R_ij)/p_i+
 *   column   C_ij = p_ij/p_+j,  Var = g'Vg,  g_kl = [l = j]([k = i] − C_ij)/p_+j
 *
 * (the delta method for a ratio of estimated totals, Wolter 2007,
 * Introduction to Variance Estimation, 2nd ed., §6.5; rows outside the
 * domain stay in the design through V). Intervals: logit with t on the
 * design df, or Korn–Graubard (proportionIntervals.ts), chosen by
 * chooseProportionInterval; both are returned. Proportions are fractions
 * (0–1); the design effect is Kish's Var / (P(1 − P)/m), m the domain's
 * unweighted complete rows (n, the row's or the column's).
 */

export interface DesignProportion {
  proportion: number;
  standardError: number;
  designEffect: number | null;
  /** unweighted complete rows of the domain the proportion is taken in */
  domainSize: number;
  lower: number | null;
  upper: number | null;
  method: 'logit' | 'korn-graubard';
  logit: ProportionInterval | null;
  kornGraubard: (ProportionInterval & { effectiveSize: number }) | null;
}

export interface DesignPercentages {
  level: number;
  degreesOfFreedom: number;
  cell: DesignProportion[][];
  row: DesignProportion[][];
  column: DesignProportion[][];
}

function describe(proportion: number, variance: number, domainSize: number, df: number, level: number): DesignProportion {
  const v = Math.max(0, variance);
  const logit = logitInterval(proportion, Math.sqrt(v), df, level);
  const kornGraubard = kornGraubardInterval(proportion, v, domainSize, df, level);
  const method = chooseProportionInterval(proportion, v);
  const chosen = method === 'logit' ? logit : kornGraubard;
  return {
    proportion,
    standardError: Math.sqrt(v),
    designEffect: proportion > 0 && proportion < 1 && domainSize > 0 ? (v * domainSize) / (proportion * (1 - proportion)) : null,
    domainSize,
    lower: chosen ? chosen.lower : null,
    upper: chosen ? chosen.upper : null,
    method,
    logit,
    kornGraubard,
  };
}

/**
 * Cell, row and column proportions with standard errors and intervals at
 * `level` (default 0.95) for an r × c table (cells row-major) from a design
 * estimate.
 * @example On the stratified sample of the California Academic Performance Index (apistrat), the share of
 *          elementary schools meeting the school-wide target is 0.835 with se 0.032
 *          (test/stats/designPercentages.test.ts, recorded from the survey library for R).
 */
export function designPercentages(estimate: DesignEstimate, rows: number, cols: number, level = 0.95): DesignPercentages {
  const { proportions: p, counts, covariance, degreesOfFreedom: df } = estimate;
  const K = rows * cols;
  const rowTotals = new Float64Array(rows);
  const colTotals = new Float64Array(cols);
  const rowCounts = new Float64Array(rows);
  const colCounts = new Float64Array(cols);
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      rowTotals[i] += p[i * cols + j];
      colTotals[j] += p[i * cols + j];
      rowCounts[i] += counts[i * cols + j];
      colCounts[j] += counts[i * cols + j];
    }
  }
  const cell: DesignProportion[][] = [];
  const row: DesignProportion[][] = [];
  const column: DesignProportion[][] = [];
  const g = new Float64Array(K);
  for (let i = 0; i < rows; i++) {
    cell.push([]);
    row.push([]);
    column.push([]);
    for (let j = 0; j < cols; j++) {
      const at = i * cols + j;
      cell[i].push(describe(p[at], cellVariance(covariance, at), estimate.n, df, level));
      // row proportion R_ij = p_ij / p_i+
      g.fill(0);
      const R = rowTotals[i] > 0 ? p[at] / rowTotals[i] : 0;
      for (let l = 0; l < cols; l++) g[i * cols + l] = -R / rowTotals[i];
      g[at] += 1 / rowTotals[i];
      row[i].push(describe(R, rowTotals[i] > 0 ? quadraticForm(covariance, g) : 0, rowCounts[i], df, level));
      // column proportion C_ij = p_ij / p_+j
      g.fill(0);
      const C = colTotals[j] > 0 ? p[at] / colTotals[j] : 0;
      for (let k = 0; k < rows; k++) g[k * cols + j] = -C / colTotals[j];
      g[at] += 1 / colTotals[j];
      column[i].push(describe(C, colTotals[j] > 0 ? quadraticForm(covariance, g) : 0, colCounts[j], df, level));
    }
  }
  return { level, degreesOfFreedom: df, cell, row, column };
}

/**
 * Cramér's V of the design-scaled statistic: V = √((X²/δ̄) / ((n/δ̄)(m − 1))),
 * m = min(r, c) (Cramér 1946, §21.9, with Rao & Scott's δ̄). Scaling the
 * statistic by δ̄ and the sample size to its design-effective value n/δ̄
 * together leaves V = √(X²/(n(m − 1))) of the weighted proportions: the
 * strength of association estimated for the population, which the design
 * does not change. What the design changes is how sure one can be of it
 * (the tests' p-values), not how strong it is. null when the tests are.
 */
export function designCramersV(tests: DesignTests, rows: number, cols: number): { value: number; effectiveSampleSize: number } | null {
  const m = Math.min(rows, cols);
  if (!tests.designPearson || m < 2) return null;
  const effectiveSampleSize = tests.n / tests.designPearson.meanDesignEffect;
  return { value: Math.sqrt(tests.designPearson.statistic / (effectiveSampleSize * (m - 1))), effectiveSampleSize };
}
