/**
 * Cell, row and column percentages with design-based standard errors and
 * intervals.
 */
import { cellVariance, type CellCovariance, type DesignEstimate } from './designCovariance.js';
import { chooseProportionInterval, kornGraubardInterval, logitInterval, type ProportionInterval } from './proportionIntervals.js';
import type { DesignTests } from './raoScott.js';

/**
 * Weighted cell, row and column percentages of an r × c table with
 * design-based standard errors and confidence intervals.
 *
 *   cell     p_ij,              Var = V_(ij,ij)
 *   margins  p_i+ and p_+j,     Var = 1'V1 over the level's cells
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
  /** p_i+, the share of each row level among the complete rows */
  rowMargins: DesignProportion[];
  /** p_+j, the share of each column level */
  columnMargins: DesignProportion[];
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

/** Each factor's (and the diagonal's) sums over the cells of every row, or of every column. */
function domainSums(covariance: CellCovariance, rows: number, cols: number, by: 'row' | 'column'): { factors: Float64Array[]; diagonal: Float64Array | null } {
  const count = by === 'row' ? rows : cols;
  const sumOver = (v: Float64Array): Float64Array => {
    const out = new Float64Array(count);
    for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) out[by === 'row' ? i : j] += v[i * cols + j];
    return out;
  };
  return { factors: covariance.factors.map(sumOver), diagonal: covariance.diagonal ? sumOver(covariance.diagonal) : null };
}

/**
 * Cell, row and column proportions with standard errors and intervals at
 * `level` (default 0.95) for an r × c table (cells row-major) from a design
 * estimate.
 * @example On the stratified sample of the California Academic Performance Index (apistrat, strata by school
 *          type, fpc), the share of schools meeting their school-wide target that received an award (row
 *          proportion sch.wide = Yes, awards = Yes) is 0.7717 with se 0.0351
 *          (test/stats/designPercentages.test.ts, recorded from the survey library for R).
 */
export function designPercentages(estimate: DesignEstimate, rows: number, cols: number, level = 0.95): DesignPercentages {
  const { proportions: p, counts, covariance, degreesOfFreedom: df } = estimate;
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
  // Var of a ratio p_ij / p_(domain) with g = (e_ij − P · 1_domain)/p_domain, from the factors' sums over
  // the domain's cells: u·g = (u_ij − P Σ_domain u)/p_domain and Σ d g² = (d_ij (1 − 2P) + P² Σ_domain d)/p_domain².
  const rowSums = domainSums(covariance, rows, cols, 'row');
  const colSums = domainSums(covariance, rows, cols, 'column');
  const ratioVariance = (at: number, P: number, total: number, sums: { factors: Float64Array[]; diagonal: Float64Array | null }, domain: number): number => {
    let value = 0;
    if (covariance.diagonal && sums.diagonal) value += (covariance.diagonal[at] * (1 - 2 * P) + P * P * sums.diagonal[domain]) / (total * total);
    covariance.factors.forEach((u, l) => {
      const projection = (u[at] - P * sums.factors[l][domain]) / total;
      value += covariance.weights[l] * projection * projection;
    });
    return value;
  };
  for (let i = 0; i < rows; i++) {
    cell.push([]);
    row.push([]);
    column.push([]);
    for (let j = 0; j < cols; j++) {
      const at = i * cols + j;
      cell[i].push(describe(p[at], cellVariance(covariance, at), estimate.n, df, level));
      const R = rowTotals[i] > 0 ? p[at] / rowTotals[i] : 0; // row proportion p_ij / p_i+
      row[i].push(describe(R, rowTotals[i] > 0 ? ratioVariance(at, R, rowTotals[i], rowSums, i) : 0, rowCounts[i], df, level));
      const C = colTotals[j] > 0 ? p[at] / colTotals[j] : 0; // column proportion p_ij / p_+j
      column[i].push(describe(C, colTotals[j] > 0 ? ratioVariance(at, C, colTotals[j], colSums, j) : 0, colCounts[j], df, level));
    }
  }
  // margins: g = 1 on the level's cells, so u·g is the factor's sum over them
  const marginVariance = (sums: { factors: Float64Array[]; diagonal: Float64Array | null }, domain: number): number => {
    let value = sums.diagonal ? sums.diagonal[domain] : 0;
    covariance.factors.forEach((_u, l) => {
      value += covariance.weights[l] * sums.factors[l][domain] * sums.factors[l][domain];
    });
    return value;
  };
  const rowMargins = Array.from(rowTotals, (total, i) => describe(total, marginVariance(rowSums, i), estimate.n, df, level));
  const columnMargins = Array.from(colTotals, (total, j) => describe(total, marginVariance(colSums, j), estimate.n, df, level));
  return { level, degreesOfFreedom: df, cell, row, column, rowMargins, columnMargins };
}

/**
 * Cramér's V of the design-scaled statistic: V = √((X²/δ̄) / ((n/δ̄)(m − 1))),
 * m = min(r, c) (Cramér 1946, §21.9, with Rao & Scott's δ̄). Scaling the
 * statistic by δ̄ and the sample size to its design-effective value n/δ̄
 * together leaves V = √(X²/(n(m − 1))) of the weighted proportions: the
 * strength of association estimated for the population, which the design
 * does not change. What the design changes is how sure one can be of it
 * (the tests' p-values), not how strong it is. null when the tests are.
 * @example NHANES 2009–2010 agecat × race (15 strata, 31 PSUs): δ̄ = 1.458, effective size n/δ̄ ≈ 5894 of
 *          8591, and V equals the V of the weighted table (test/stats/designPercentages.test.ts).
 */
export function designCramersV(tests: DesignTests, rows: number, cols: number): { value: number; effectiveSampleSize: number } | null {
  const m = Math.min(rows, cols);
  if (!tests.designPearson || m < 2) return null;
  const effectiveSampleSize = tests.n / tests.designPearson.meanDesignEffect;
  return { value: Math.sqrt(tests.designPearson.statistic / (effectiveSampleSize * (m - 1))), effectiveSampleSize };
}
