/**
 * Design-based domain estimates of a banner column and the test of the
 * difference between two columns of the same break variable, from the
 * design covariance of the cell proportions of question × break.
 */
import type { DesignEstimate } from './designCovariance.js';
import { twoSidedStudentT } from './studentTDistribution.js';

/**
 * A ratio estimated within one column (a domain) of an r × c table of
 * estimated cell proportions p (row-major):
 *
 *   R_a = Σ_i num_i p_ia / Σ_i den_i p_ia
 *
 * A column share of a set S of rows (a level, a net): num_i = [i ∈ S],
 * den_i = 1. A domain mean of scores x_i (levels without a score left out):
 * num_i = x_i [scored], den_i = [scored].
 *
 * Linearised (delta method for a ratio of estimated totals; Wolter 2007,
 * Introduction to Variance Estimation, 2nd ed., §6.5), its gradient is
 * g_ia = (num_i − R_a den_i) / D_a on column a's cells (D_a = Σ_i den_i p_ia)
 * and 0 elsewhere, and with V = diag(d) + Σ_l λ_l u_l u_l' (designCovariance.ts)
 *
 *   Var(R_a)      = Σ_i d_ia g_ia² + Σ_l λ_l (u_l·g_a)²
 *   Cov(R_a, R_b) = Σ_l λ_l (u_l·g_a)(u_l·g_b)          (a ≠ b: no diagonal term, the cells differ)
 *
 * The covariance term is what makes two columns that share PSUs dependent
 * (Korn & Graubard 1999, Analysis of Health Surveys, §5.2; Lumley 2010,
 * Complex Surveys, §2.4 and svycontrast). Because the influence function of
 * a smooth function of ratios is the chain rule of theirs, the linearised
 * variance equals that of the domain ratio linearised directly (Binder 1983).
 * With replicate weights the ratio is computed in each replicate r from its
 * own proportions p_(r) (the replicate estimate of the ratio itself, Wolter
 * 2007, ch. 4; as svyby does), and u_l·g_a is replaced by the replicate's
 * deviation R_a(r) − centre, the centre being the mean of the replicate
 * ratios or the full-sample ratio, as for the proportions (§5); then
 *   Var(R_a) = Σ_r λ_r (R_a(r) − centre_a)², Cov likewise.
 */
export interface DomainRatio {
  /** R_a, or null when the column has no weight on its denominator. */
  estimate: number | null;
  variance: number | null;
  /** u_l·g_a for each factor l of V (empty when the estimate is null). */
  projections: Float64Array;
}

/** The ratio of every column of an r × c estimate for one (num, den) pair of row weights. */
export function domainRatios(estimate: DesignEstimate, rows: number, cols: number, num: ArrayLike<number>, den: ArrayLike<number>): DomainRatio[] {
  const { proportions: p, covariance } = estimate;
  const out: DomainRatio[] = [];
  const L = covariance.factors.length;
  for (let a = 0; a < cols; a++) {
    let N = 0;
    let D = 0;
    for (let i = 0; i < rows; i++) {
      N += num[i] * p[i * cols + a];
      D += den[i] * p[i * cols + a];
    }
    if (!(D > 0)) {
      out.push({ estimate: null, variance: null, projections: new Float64Array(0) });
      continue;
    }
    const R = N / D;
    if (estimate.kind === 'replicate' && estimate.replicateCentre) {
      out.push(replicateRatio(estimate, estimate.replicateCentre, rows, cols, a, num, den, R));
      continue;
    }
    const g = new Float64Array(rows);
    for (let i = 0; i < rows; i++) g[i] = (num[i] - R * den[i]) / D;
    let variance = 0;
    if (covariance.diagonal) for (let i = 0; i < rows; i++) variance += covariance.diagonal[i * cols + a] * g[i] * g[i];
    const projections = new Float64Array(L);
    for (let l = 0; l < L; l++) {
      const u = covariance.factors[l];
      let s = 0;
      for (let i = 0; i < rows; i++) s += u[i * cols + a] * g[i];
      projections[l] = s;
      variance += covariance.weights[l] * s * s;
    }
    out.push({ estimate: R, variance: Math.max(0, variance), projections });
  }
  return out;
}

/** The ratio of column a in every replicate, its deviations from their mean (or from the full-sample ratio) and its variance. */
function replicateRatio(estimate: DesignEstimate, centre: Float64Array, rows: number, cols: number, a: number, num: ArrayLike<number>, den: ArrayLike<number>, full: number): DomainRatio {
  const { factors, weights } = estimate.covariance;
  const L = factors.length;
  const values = new Float64Array(L);
  for (let l = 0; l < L; l++) {
    let N = 0;
    let D = 0;
    for (let i = 0; i < rows; i++) {
      const at = i * cols + a;
      const p = centre[at] + factors[l][at];
      N += num[i] * p;
      D += den[i] * p;
    }
    // A replicate with no weight in the column gives no ratio: it sits at the centre (adds nothing).
    values[l] = D > 0 ? N / D : Number.NaN;
  }
  const kept = values.filter((v) => !Number.isNaN(v));
  const middle = estimate.centre === 'full-sample' ? full : kept.reduce((x, y) => x + y, 0) / Math.max(1, kept.length);
  const projections = values.map((v) => (Number.isNaN(v) ? 0 : v - middle));
  let variance = 0;
  for (let l = 0; l < L; l++) variance += weights[l] * projections[l] * projections[l];
  return { estimate: full, variance: Math.max(0, variance), projections };
}

/** Cov(R_a, R_b) of two different columns from their projections. */
export function domainCovariance(estimate: DesignEstimate, first: DomainRatio, second: DomainRatio): number {
  const weights = estimate.covariance.weights;
  let s = 0;
  for (let l = 0; l < weights.length; l++) s += weights[l] * first.projections[l] * second.projections[l];
  return s;
}

export interface DomainDifferenceTest {
  /** R_a − R_b. */
  difference: number;
  standardError: number;
  /** t = difference / standardError. */
  statistic: number;
  /** The design's degrees of freedom (PSUs − strata, or replicates − 1). */
  df: number;
  pValue: number;
}

/**
 * The design-based test of R_a = R_b for two columns of one break variable:
 *
 *   t = (R_a − R_b) / √(Var R_a + Var R_b − 2 Cov(R_a, R_b))
 *
 * referred to Student's t on the design's degrees of freedom (PSUs − strata
 * for a linearised design, replicates − 1 for replicate weights), two-sided:
 * the Wald test of a single contrast of domain estimates (Korn & Graubard
 * 1999, §5.2 and §3.5 on the design df; the t test of svyttest and
 * svycontrast in Lumley 2010, §2.4, 3.5). null when the difference has no
 * variance or the design no degrees of freedom.
 * @example NHANES 2009–2010 (15 strata, 31 PSUs, df 16), HI_CHOL = 1 among race 1 against race 2:
 *          the t of svycontrast on svyby(~I(HI_CHOL == 1), ~race, svymean, covmat = TRUE), recorded in
 *          fixtures/reference/banner-design-reference.json (test/stats/designDomainRatios.test.ts).
 */
export function domainDifferenceTest(estimate: DesignEstimate, first: DomainRatio, second: DomainRatio): DomainDifferenceTest | null {
  if (first.estimate === null || second.estimate === null || first.variance === null || second.variance === null) return null;
  const df = estimate.degreesOfFreedom;
  const variance = first.variance + second.variance - 2 * domainCovariance(estimate, first, second);
  const difference = first.estimate - second.estimate;
  // A variance at rounding level of the estimates' own is no variance (e.g. both shares 0 or 1).
  const scale = Math.max(first.variance, second.variance);
  if (!(variance > 1e-12 * scale) || !(variance > 0) || !(df > 0)) return null;
  const standardError = Math.sqrt(variance);
  const statistic = difference / standardError;
  return { difference, standardError, statistic, df, pValue: twoSidedStudentT(statistic, df) };
}
