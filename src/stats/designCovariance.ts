/**
 * The design-based covariance of estimated cell proportions, by
 * linearisation or by replicate weights.
 */
import { dataError, usageError } from '../errors.js';
import { dot } from './linearAlgebra.js';
import type { PsuCellTotals, ReplicateCellTotals } from './designTally.js';

/**
 * The design-based covariance matrix V of the estimated cell proportions
 * p_j = Σ w y_j / Σ w (complete rows), by linearisation (Taylor series) from
 * per-PSU totals or from replicate weights, following the conventions of
 * design-based-tests.md §2–5 and §8.
 *
 * Linearised (with replacement at the first stage):
 *   z_i = w_i (y_i − p) / Σw for complete rows, z_i = 0 for rows outside the
 *   domain; t_hc = Σ_{i in PSU c of stratum h} z_i;
 *   V = Σ_h (1 − f_h) n_h/(n_h − 1) Σ_c (t_hc − t̄_h)(t_hc − t̄_h)',
 *   n_h the PSUs of stratum h in the whole file, t̄_h = Σ_c t_hc / n_h,
 *   f_h = n_h / F_h for an --fpc value F_h > 1, f_h = F_h for F_h ≤ 1.
 * Source: Wolter, K. M. (2007), Introduction to Variance Estimation, 2nd ed.,
 * §6.11 (Taylor series for a ratio, stratified multistage, with-replacement
 * ultimate clusters); Binder, D. A. (1983), Int. Stat. Rev. 51, 279–292; for
 * domains, Cochran, W. G. (1977), Sampling Techniques, 3rd ed., §5A.13–14.
 *
 * Replicate weights (full replicate weight columns, not multipliers):
 *   V = scale Σ_r s_r (p_(r) − centre)(p_(r) − centre)', centre the mean of
 *   the replicate estimates (or, as an option, the full-sample p), scale
 *   jk1 (R−1)/R, jkn 1 with per-replicate factors s_r (usually (n_h − 1)/n_h),
 *   brr 1/R, fay 1/(R (1−ρ)²), bootstrap 1/(R−1); s_r = 1 except for jkn.
 * Source: Wolter (2007), ch. 3–5; Fay, R. E. (1989), Proc. Survey Research
 * Methods Section, ASA, 212–217; Rao, J. N. K. & Wu, C. F. J. (1988),
 * JASA 83, 231–241; Rust, K. F. & Rao, J. N. K. (1996), Stat. Methods Med.
 * Res. 5, 283–310.
 *
 * V is held in factored form, diag(d) + Σ_l λ_l u_l u_l', so that memory and
 * time stay at (PSUs or replicates) × cells: with clusters one factor per PSU
 * (u = t_hc − t̄_h, λ = (1 − f_h) n_h/(n_h − 1)), with replicates one per
 * replicate, without clusters (every row a PSU) a diagonal and three signed
 * factors per stratum built from Σw and Σw² per cell:
 *   Σ_{i in h} z_i z_i' = (1/W²)[diag(s_h) − s_h p' − p s_h' + S_h p p'],
 *   s_h = Σ w² by cell, S_h = Σ s_h, W = Σ w, and t̄_h = (a_h − W_h p)/(W n_h).
 */

export type LonelyPsuTreatment = 'fail' | 'certainty' | 'adjust' | 'average';
export type ReplicateMethod = 'jk1' | 'jkn' | 'brr' | 'fay' | 'bootstrap';

/** V = diag(diagonal) + Σ_l weights[l] · factors[l] factors[l]'. */
export interface CellCovariance {
  size: number;
  diagonal: Float64Array | null;
  factors: Float64Array[];
  weights: number[];
}

export interface DesignEstimate {
  kind: 'taylor' | 'replicate';
  /** K = number of table cells (row-major r × c when used with designTests) */
  size: number;
  /** estimated cell proportions p (complete rows) */
  proportions: Float64Array;
  /** unweighted complete rows per cell */
  counts: Float64Array;
  /** n: unweighted complete rows */
  n: number;
  weightTotal: number;
  covariance: CellCovariance;
  /** Taylor: PSUs − strata; replicates: R − 1 */
  degreesOfFreedom: number;
  strata: number | null;
  psus: number | null;
  /** labels of the strata with a single PSU (and no fpc of 1) */
  lonelyStrata: string[];
  lonelyPsu: LonelyPsuTreatment | null;
  fpc: boolean;
  replicates: number | null;
  method: ReplicateMethod | null;
  centre: 'replicate-mean' | 'full-sample' | null;
  /** replicates left out because their weights sum to zero over the complete rows */
  droppedReplicates: number;
  /** Replicate weights: the centre the factors are measured from, so that replicate r's proportions are centre + factors[r]. */
  replicateCentre?: Float64Array;
}

/** Where each of the caller's cell numbers goes in the table (−1: outside the table, a domain row). */
export interface CellLayout {
  size: number;
  position?: ArrayLike<number>;
}

function layoutOf(capacity: number, layout?: CellLayout): { size: number; position: (cell: number) => number } {
  if (!layout) return { size: capacity, position: (cell) => cell };
  const position = layout.position;
  return { size: layout.size, position: position ? (cell) => (cell < position.length ? position[cell] : -1) : (cell) => (cell < layout.size ? cell : -1) };
}

/** Maps a per-cell array in the caller's numbering to table positions (summing merged cells). */
function toTable(values: Float64Array, size: number, position: (cell: number) => number): Float64Array {
  const out = new Float64Array(size);
  for (let cell = 0; cell < values.length; cell++) {
    if (values[cell] === 0) continue;
    const at = position(cell);
    if (at >= 0) out[at] += values[cell];
  }
  return out;
}

function sum(values: Float64Array): number {
  // pairwise-free Neumaier summation: totals of up to millions of weights
  let s = 0;
  let c = 0;
  for (const v of values) {
    const t = s + v;
    c += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
    s = t;
  }
  return s + c;
}

/** The fraction f_h sampled from stratum h, from its --fpc value (conventions §3). */
export function samplingFraction(psus: number, fpc: number | null, stratum: string): number {
  if (fpc === null || fpc === 0) return 0;
  if (fpc <= 1) return fpc;
  if (fpc < psus) {
    throw dataError(`--fpc gives ${fpc} PSUs in the population of stratum "${stratum}", fewer than the ${psus} in the sample`);
  }
  return psus / fpc;
}

function lonelyError(stratum: string, psus: string): never {
  throw dataError(
    `stratum "${stratum}" has only one PSU${psus}, so its variance cannot be estimated; choose --lonely-psu certainty, adjust or average (see the methods note)`,
  );
}

/**
 * The linearised covariance of the cell proportions from the per-PSU totals
 * of a `PsuCellTotals` (see the module comment for the formula).
 * `lonelyPsu` treats strata with a single PSU (conventions §8): fail (a
 * data error naming the stratum), certainty (the stratum adds nothing),
 * adjust (the PSU's total measured from the grand mean, 0 here, times
 * 1 − f_h, without n_h/(n_h − 1)), average (V of the other strata times
 * strata / strata with 2+ PSUs). A stratum whose fpc says all of its PSUs
 * were taken (f_h = 1) adds nothing and is not lonely.
 * @example
 *   const tally = new DesignTally({ clustered: true });
 *   tally.addRows({ cell, weight, stratum, cluster });
 *   const estimate = linearizedCovariance(tally.totals, { lonelyPsu: 'fail', layout: { size: r * c } });
 */
export function linearizedCovariance(totals: PsuCellTotals, options: { lonelyPsu?: LonelyPsuTreatment; layout?: CellLayout } = {}): DesignEstimate {
  const lonelyPsu = options.lonelyPsu ?? 'fail';
  const index = totals.index;
  const { size, position } = layoutOf(totals.cellCapacity, options.layout);
  const strata = index.strataSummary();
  const unitTotals = totals.weightTotals.map((t) => toTable(t, size, position));
  const cellTotals = new Float64Array(size);
  for (const t of unitTotals) for (let j = 0; j < size; j++) cellTotals[j] += t[j];
  const weightTotal = sum(cellTotals);
  const counts = toTable(totals.counts, size, position);
  const n = sum(counts);
  if (!(weightTotal > 0)) throw dataError('the weights of the complete rows sum to zero: no table to estimate');
  const p = cellTotals.map((t) => t / weightTotal);

  const factors: Float64Array[] = [];
  const weights: number[] = [];
  let diagonal: Float64Array | null = null;
  const lonelyStrata: string[] = [];
  let contributingStrata = 0;

  if (index.clustered) {
    // t_hc = (T_hc − p W_hc) / W for every PSU with complete rows; PSUs without them have t = 0
    const psusOfStratum: number[][] = strata.map(() => []);
    for (let psu = 0; psu < index.unitCount; psu++) psusOfStratum[index.stratumOfPsu(psu)].push(psu);
    strata.forEach((stratum, h) => {
      const f = samplingFraction(stratum.psus, stratum.fpc, stratum.label);
      const deviations: Float64Array[] = [];
      for (const psu of psusOfStratum[h]) {
        const T = unitTotals[psu];
        if (!T) continue;
        const W = sum(T);
        if (W === 0 && T.every((v) => v === 0)) continue;
        deviations.push(T.map((v, j) => (v - p[j] * W) / weightTotal));
      }
      if (f >= 1) {
        contributingStrata++;
        return;
      }
      const nh = stratum.psus;
      if (nh === 1) {
        lonelyStrata.push(stratum.label);
        if (lonelyPsu === 'fail') lonelyError(stratum.label, '');
        if (lonelyPsu === 'adjust') {
          for (const t of deviations) {
            factors.push(t);
            weights.push(1 - f);
          }
        }
        return;
      }
      contributingStrata++;
      const c = ((1 - f) * nh) / (nh - 1);
      const mean = new Float64Array(size);
      for (const t of deviations) for (let j = 0; j < size; j++) mean[j] += t[j] / nh;
      for (const t of deviations) {
        for (let j = 0; j < size; j++) t[j] -= mean[j];
        factors.push(t);
        weights.push(c);
      }
      const empty = nh - deviations.length; // PSUs with no complete row: t = 0, deviation −t̄
      if (empty > 0 && mean.some((v) => v !== 0)) {
        factors.push(mean);
        weights.push(c * empty);
      }
    });
  } else {
    // every row its own PSU: per stratum Σw (a), Σw² (s) by cell, n_h rows
    diagonal = new Float64Array(size);
    const W2 = weightTotal * weightTotal;
    strata.forEach((stratum, h) => {
      const f = samplingFraction(stratum.psus, stratum.fpc, stratum.label);
      const a = totals.weightTotals[h] ? toTable(totals.weightTotals[h], size, position) : new Float64Array(size);
      const s = totals.squareTotals[h] ? toTable(totals.squareTotals[h], size, position) : new Float64Array(size);
      if (f >= 1) {
        contributingStrata++;
        return;
      }
      const nh = stratum.psus;
      let c: number;
      let centred: boolean;
      if (nh === 1) {
        lonelyStrata.push(stratum.label);
        if (lonelyPsu === 'fail') lonelyError(stratum.label, ' (a single row)');
        if (lonelyPsu !== 'adjust') return;
        c = 1 - f;
        centred = false;
      } else {
        contributingStrata++;
        c = ((1 - f) * nh) / (nh - 1);
        centred = true;
      }
      const S = sum(s);
      if (S > 0) {
        // (1/W²)[diag(s) − s p' − p s' + S p p'] = diag(s)/W² + u1 u1' − u2 u2'
        const root = Math.sqrt(S);
        for (let j = 0; j < size; j++) diagonal![j] += (c * s[j]) / W2;
        factors.push(s.map((sj, j) => (S * p[j] - sj) / (root * weightTotal)));
        weights.push(c);
        factors.push(s.map((sj) => sj / (root * weightTotal)));
        weights.push(-c);
      }
      if (centred) {
        const Wh = sum(a);
        const mean = a.map((aj, j) => (aj - Wh * p[j]) / (weightTotal * nh));
        if (mean.some((v) => v !== 0)) {
          factors.push(mean);
          weights.push(-c * nh);
        }
      }
    });
  }

  if (lonelyPsu === 'average' && lonelyStrata.length > 0) {
    if (contributingStrata === 0) throw dataError('every stratum has a single PSU: --lonely-psu average has no stratum to average over');
    const factor = strata.length / contributingStrata;
    for (let l = 0; l < weights.length; l++) weights[l] *= factor;
    if (diagonal) for (let j = 0; j < size; j++) diagonal[j] *= factor;
  }

  return {
    kind: 'taylor',
    size,
    proportions: p,
    counts,
    n,
    weightTotal,
    covariance: { size, diagonal, factors, weights },
    degreesOfFreedom: index.psuCount - strata.length,
    strata: strata.length,
    psus: index.psuCount,
    lonelyStrata,
    lonelyPsu,
    fpc: strata.some((s) => s.fpc !== null),
    replicates: null,
    method: null,
    centre: null,
    droppedReplicates: 0,
  };
}

/** The scale of a replicate method (conventions §5); jkn's per-replicate factors come separately. */
export function replicateScale(method: ReplicateMethod, replicates: number, rho = 0.5): number {
  switch (method) {
    case 'jk1':
      return (replicates - 1) / replicates;
    case 'jkn':
      return 1;
    case 'brr':
      return 1 / replicates;
    case 'fay':
      if (!(rho >= 0 && rho < 1)) throw usageError(`--fay-rho must be at least 0 and below 1, not ${rho}`);
      return 1 / (replicates * (1 - rho) * (1 - rho));
    case 'bootstrap':
      return 1 / (replicates - 1);
  }
}

/**
 * The replicate-weight covariance of the cell proportions (module comment),
 * from a `ReplicateCellTotals`. `scaleFactors` are jkn's per-replicate
 * factors (required for jkn, refused otherwise); `centre` is 'replicate-mean'
 * (default) or 'full-sample'. A replicate whose weights sum to zero over the
 * complete rows has no estimate; it is left out and counted.
 * @example
 *   const totals = new ReplicateCellTotals(16);            // e.g. 16 BRR replicate columns
 *   totals.add(cell, fullWeight, replicateWeightsOfTheRow); // per complete row
 *   const estimate = replicateCovariance(totals, { method: 'brr', layout: { size: r * c } });
 *   // NHANES 2009–2010 agecat × race with 16 BRR replicates: F = 20.54 on 4.73 and 71.0 df
 *   // (test/stats/raoScott.test.ts, recorded from the survey library for R)
 */
export function replicateCovariance(
  totals: ReplicateCellTotals,
  options: { method: ReplicateMethod; rho?: number; scaleFactors?: ArrayLike<number>; centre?: 'replicate-mean' | 'full-sample'; layout?: CellLayout },
): DesignEstimate {
  const R = totals.replicates;
  if (R < 2) throw usageError(`replicate weights need at least 2 replicate columns, not ${R}`);
  const { method } = options;
  const centreKind = options.centre ?? 'replicate-mean';
  if (method === 'jkn' && (!options.scaleFactors || options.scaleFactors.length !== R)) {
    throw usageError(`--replicate-method jkn needs one scale factor per replicate (${R}), ${options.scaleFactors ? `not ${options.scaleFactors.length}` : 'none given'}`);
  }
  if (method !== 'jkn' && options.scaleFactors) throw usageError(`per-replicate scale factors apply to --replicate-method jkn only, not ${method}`);
  const scale = replicateScale(method, R, options.rho ?? 0.5);
  const { size, position } = layoutOf(totals.cellCapacity, options.layout);
  const full = toTable(totals.totals[R], size, position);
  const weightTotal = sum(full);
  if (!(weightTotal > 0)) throw dataError('the weights of the complete rows sum to zero: no table to estimate');
  const p = full.map((t) => t / weightTotal);
  const counts = toTable(totals.counts, size, position);
  const estimates: { values: Float64Array; factor: number }[] = [];
  let dropped = 0;
  for (let r = 0; r < R; r++) {
    const T = toTable(totals.totals[r], size, position);
    const W = sum(T);
    if (W === 0) {
      dropped++;
      continue;
    }
    estimates.push({ values: T.map((t) => t / W), factor: options.scaleFactors ? options.scaleFactors[r] : 1 });
  }
  if (estimates.length < 2) throw dataError(`only ${estimates.length} replicate(s) have weight on the complete rows: no replicate variance`);
  const centre = new Float64Array(size);
  if (centreKind === 'full-sample') centre.set(p);
  else for (const e of estimates) for (let j = 0; j < size; j++) centre[j] += e.values[j] / estimates.length;
  const factors = estimates.map((e) => e.values.map((v, j) => v - centre[j]));
  const weights = estimates.map((e) => scale * e.factor);
  return {
    kind: 'replicate',
    size,
    proportions: p,
    counts,
    n: sum(counts),
    weightTotal,
    covariance: { size, diagonal: null, factors, weights },
    degreesOfFreedom: R - 1,
    strata: null,
    psus: null,
    lonelyStrata: [],
    lonelyPsu: null,
    fpc: false,
    replicates: R,
    method,
    centre: centreKind,
    droppedReplicates: dropped,
    replicateCentre: centre,
  };
}

/** g' V g for a vector g over the cells. */
export function quadraticForm(covariance: CellCovariance, g: ArrayLike<number>): number {
  let value = 0;
  if (covariance.diagonal) for (let j = 0; j < covariance.size; j++) value += covariance.diagonal[j] * g[j] * g[j];
  covariance.factors.forEach((u, l) => {
    const projection = dot(u, g);
    value += covariance.weights[l] * projection * projection;
  });
  return value;
}

/** g' V g for a g that is non-zero only at `indices` (values there in `values`): O(L · support). */
export function sparseQuadraticForm(covariance: CellCovariance, indices: ArrayLike<number>, values: ArrayLike<number>): number {
  let value = 0;
  if (covariance.diagonal) for (let a = 0; a < indices.length; a++) value += covariance.diagonal[indices[a]] * values[a] * values[a];
  covariance.factors.forEach((u, l) => {
    let projection = 0;
    for (let a = 0; a < indices.length; a++) projection += u[indices[a]] * values[a];
    value += covariance.weights[l] * projection * projection;
  });
  return value;
}

/** V_jj, the variance of one cell proportion. */
export function cellVariance(covariance: CellCovariance, j: number): number {
  let value = covariance.diagonal ? covariance.diagonal[j] : 0;
  covariance.factors.forEach((u, l) => {
    value += covariance.weights[l] * u[j] * u[j];
  });
  return value;
}

/** V as a dense row-major size × size matrix (for small tables and tests). */
export function denseCovariance(covariance: CellCovariance): Float64Array {
  const K = covariance.size;
  const V = new Float64Array(K * K);
  if (covariance.diagonal) for (let j = 0; j < K; j++) V[j * K + j] = covariance.diagonal[j];
  covariance.factors.forEach((u, l) => {
    const w = covariance.weights[l];
    for (let i = 0; i < K; i++) {
      const wi = w * u[i];
      if (wi === 0) continue;
      const row = i * K;
      for (let j = 0; j < K; j++) V[row + j] += wi * u[j];
    }
  });
  return V;
}
