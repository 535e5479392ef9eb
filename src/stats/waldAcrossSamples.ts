/**
 * Design-based Wald tests across K independent samples (survey waves) of
 * the same q quantities: are they equal in every sample, do they follow a
 * trend over ordered samples, does one sample stand out. Each sample brings
 * its estimate θ_k, its design covariance Σ_k (delta method, Taylor or
 * replicate) and its design degrees of freedom ν_k; the samples are
 * independent, so their covariances add and cross-covariances are zero.
 *
 * The method is weighted least squares on functions of cell proportions
 * with their estimated covariance (Grizzle, J. E., Starmer, C. F. & Koch,
 * G. G. 1969, Biometrics 25, 489–504), with design-based covariances in
 * place of multinomial ones (Koch, G. G., Freeman, D. H. & Freeman, J. L.
 * 1975, Int. Stat. Rev. 43, 59–78): a model for the stacked θ is fitted by
 * generalized least squares with weights Σ_k⁻¹ and a hypothesis is tested by
 * the drop in the weighted residual sum of squares Q (a Wald statistic). With
 * ν = Σ ν_k the design df of all the samples, a Wald statistic W on d df is
 * also given in the small-sample F form
 *
 *   F = (ν − d + 1) / (ν d) · W  on d and ν − d + 1 df
 *
 * (Fellegi 1980, JASA 75, 261–268; Korn & Graubard 1990, Am. Stat. 44,
 * 270–276), which leads; it is null when ν − d + 1 < 1.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { upperQuantileF } from './fDistribution.js';
import { upperQuantileStudentT } from './studentTDistribution.js';
import { solveLinear } from './stratified.js';
import { adjustedWald, type DesignWaldTest } from './designWald.js';

/** One sample's estimate of the q quantities, their design covariance (q × q) and its design degrees of freedom. */
export interface SampleEstimate {
  values: number[];
  covariance: number[][];
  degreesOfFreedom: number;
}

/** A Wald statistic W on d df with its F form (the same record as two samples' test in designWald.ts). */
export type WaldAcross = DesignWaldTest;
export { adjustedWald };

function totalDf(samples: readonly SampleEstimate[]): number {
  return samples.reduce((s, x) => s + x.degreesOfFreedom, 0);
}

/**
 * Equal quantities in every sample: with D the stacked differences
 * θ_k − θ_1 (k = 2…K) and S their covariance (blocks Σ_1 + Σ_k on the
 * diagonal, Σ_1 off it), W = D' S⁻¹ D on (K − 1) q df. When every Σ_k is
 * invertible this is the GLS residual Σ_k (θ_k − θ̄)' Σ_k⁻¹ (θ_k − θ̄) around
 * the precision-weighted mean θ̄; this form also holds when a sample's own
 * covariance is singular (a share of 0 in a wave). A difference that is 0
 * with variance 0 (a level absent from both samples it compares) is left out
 * with its df. For K = 2 it is the test of two independent samples,
 * d'(Σ_1 + Σ_2)⁻¹d. null when S is singular.
 */
export function waldHomogeneity(samples: readonly SampleEstimate[]): WaldAcross | null {
  const K = samples.length;
  if (K < 2) return null;
  const q = samples[0].values.length;
  if (q === 0) return null;
  const size = (K - 1) * q;
  const first = samples[0];
  const D: number[] = [];
  const S: number[][] = Array.from({ length: size }, () => new Array<number>(size).fill(0));
  for (let k = 1; k < K; k++) {
    for (let a = 0; a < q; a++) {
      D.push(samples[k].values[a] - first.values[a]);
      for (let l = 1; l < K; l++) {
        for (let b = 0; b < q; b++) S[(k - 1) * q + a][(l - 1) * q + b] = first.covariance[a][b] + (k === l ? samples[k].covariance[a][b] : 0);
      }
    }
  }
  // A difference that is zero with zero variance (a level absent from both waves it compares) carries
  // no information: it is left out, and the df with it (a generalized inverse of S on those coordinates).
  const largest = Math.max(...S.map((row, i) => row[i]), 0);
  const kept: number[] = [];
  for (let i = 0; i < size; i++) {
    if (S[i][i] > 1e-14 * largest) kept.push(i);
    else if (D[i] !== 0) return null;
  }
  if (kept.length === 0) return null;
  const Dk = kept.map((i) => D[i]);
  const solved = solveLinear(kept.map((i) => kept.map((j) => S[i][j])), Dk);
  if (solved === null) return null;
  const wald = Dk.reduce((s, x, i) => s + x * solved[i], 0);
  return adjustedWald(wald, kept.length, totalDf(samples));
}

/** The inverse of a symmetric positive-definite matrix by Cholesky; null when it is not positive definite. */
export function inverseSymmetric(matrix: readonly (readonly number[])[]): number[][] | null {
  const n = matrix.length;
  const L: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const scale = Math.max(...matrix.map((row, i) => Math.abs(row[i])), 0);
  if (!(scale > 0)) return null;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = matrix[i][j];
      for (let m = 0; m < j; m++) s -= L[i][m] * L[j][m];
      if (i === j) {
        if (!(s > 1e-13 * scale)) return null;
        L[i][i] = Math.sqrt(s);
      } else L[i][j] = s / L[j][j];
    }
  }
  // L⁻¹ column by column, then (L L')⁻¹ = L⁻ᵀ L⁻¹
  const Li: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let c = 0; c < n; c++) {
    for (let i = c; i < n; i++) {
      let s = i === c ? 1 : 0;
      for (let m = c; m < i; m++) s -= L[i][m] * Li[m][c];
      Li[i][c] = s / L[i][i];
    }
  }
  const out: number[][] = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let m = i; m < n; m++) s += Li[m][i] * Li[m][j];
      out[i][j] = s;
      out[j][i] = s;
    }
  }
  return out;
}

const matVec = (A: readonly (readonly number[])[], x: readonly number[]) => A.map((row) => row.reduce((s, v, j) => s + v * x[j], 0));
const dotOf = (x: readonly number[], y: readonly number[]) => x.reduce((s, v, j) => s + v * y[j], 0);

/** Each sample's precision Σ_k⁻¹, or null when one is singular. */
export function precisions(samples: readonly SampleEstimate[]): number[][][] | null {
  const out: number[][][] = [];
  for (const s of samples) {
    const inverse = inverseSymmetric(s.covariance);
    if (inverse === null) return null;
    out.push(inverse);
  }
  return out;
}

/**
 * The precision-weighted (GLS) common value θ̄ = (Σ A_k)⁻¹ Σ A_k θ_k,
 * A_k = Σ_k⁻¹, with its covariance (Σ A_k)⁻¹; null when a precision is
 * missing or the sum is singular.
 */
export function commonValue(samples: readonly SampleEstimate[], A: readonly number[][][]): { values: number[]; covariance: number[][] } | null {
  const q = samples[0].values.length;
  const M = Array.from({ length: q }, (_v, a) => Array.from({ length: q }, (_w, b) => A.reduce((s, Ak) => s + Ak[a][b], 0)));
  const rhs = new Array<number>(q).fill(0);
  samples.forEach((s, k) => matVec(A[k], s.values).forEach((v, a) => (rhs[a] += v)));
  const covariance = inverseSymmetric(M);
  if (covariance === null) return null;
  return { values: matVec(covariance, rhs), covariance };
}

/**
 * Whether sample k stands out: the drop in the homogeneity statistic when
 * sample k is freed from the common value, which is
 *   W_k = (θ_k − θ̄_(−k))' (Σ_k + Σ̄_(−k))⁻¹ (θ_k − θ̄_(−k)),
 * θ̄_(−k) the GLS common value of the other samples and Σ̄_(−k) its
 * covariance, on q df (F form with the ν of all samples); for q = 1 also
 * the signed z = (θ_k − θ̄_(−k))/√(Σ_k + Σ̄_(−k)). null entries where the
 * other samples give no common value.
 */
export function departuresFromOthers(samples: readonly SampleEstimate[], A: readonly number[][][]): ({ test: WaldAcross; z: number | null } | null)[] {
  const K = samples.length;
  const q = samples[0].values.length;
  const nu = totalDf(samples);
  return samples.map((s, k) => {
    const others = samples.filter((_x, j) => j !== k);
    const common = commonValue(others, A.filter((_x, j) => j !== k));
    if (common === null || K < 2) return null;
    const d = s.values.map((v, a) => v - common.values[a]);
    const S = s.covariance.map((row, a) => row.map((v, b) => v + common.covariance[a][b]));
    const solved = solveLinear(S, d);
    if (solved === null) return null;
    const wald = dotOf(d, solved);
    return { test: adjustedWald(wald, q, nu), z: q === 1 ? d[0] / Math.sqrt(S[0][0]) : null };
  });
}

/** A trend of one quantity over ordered samples, by GLS regression on the scores. */
export interface LinearTrend {
  slope: number;
  standardError: number;
  /** Interval slope ± t(ν) SE at `confidence`. */
  lower: number;
  upper: number;
  confidence: number;
  /** The fitted value at score 0. */
  intercept: number;
  /** The precision-weighted mean value (the common value under no trend). */
  common: number;
  /** Wald test of slope = 0: W = (slope/SE)², F form on 1 and ν df. */
  test: WaldAcross;
  /** The samples about the line: Q = Σ (θ_k − fitted)²/σ_k² on K − 2 df (χ²), null for two samples. */
  scatter: { statistic: number; df: number; pValue: number } | null;
}

/**
 * One quantity per sample (q = 1, e.g. a 2×2 table's log odds ratio) with
 * variance σ_k²: weighted least squares of θ_k on the score x_k with weights
 * w_k = 1/σ_k² (variances taken as known: Hedges & Olkin 1985, Statistical
 * Methods for Meta-Analysis, ch. 8; with design-based variances, Koch,
 * Freeman & Freeman 1975):
 *   slope = Σ w (x − x̄)(θ − θ̄) / Σ w (x − x̄)²,  SE = 1/√(Σ w (x − x̄)²),
 * x̄ and θ̄ the w-weighted means. null for fewer than two samples, a variance
 * that is not positive, or equal scores.
 */
export function linearTrend(samples: readonly SampleEstimate[], scores: readonly number[], confidence = 0.95): LinearTrend | null {
  const K = samples.length;
  if (K < 2 || scores.length !== K) return null;
  const w = samples.map((s) => 1 / s.covariance[0][0]);
  if (!w.every((x) => Number.isFinite(x) && x > 0)) return null;
  const y = samples.map((s) => s.values[0]);
  const W = w.reduce((a, b) => a + b, 0);
  const xBar = w.reduce((a, wk, k) => a + wk * scores[k], 0) / W;
  const yBar = w.reduce((a, wk, k) => a + wk * y[k], 0) / W;
  let sxx = 0;
  let sxy = 0;
  for (let k = 0; k < K; k++) {
    sxx += w[k] * (scores[k] - xBar) ** 2;
    sxy += w[k] * (scores[k] - xBar) * (y[k] - yBar);
  }
  if (!(sxx > 0)) return null;
  const slope = sxy / sxx;
  const standardError = 1 / Math.sqrt(sxx);
  const nu = totalDf(samples);
  const t = upperQuantileStudentT((1 - confidence) / 2, nu);
  const intercept = yBar - slope * xBar;
  let residual = 0;
  for (let k = 0; k < K; k++) residual += w[k] * (y[k] - intercept - slope * scores[k]) ** 2;
  return {
    slope,
    standardError,
    lower: slope - t * standardError,
    upper: slope + t * standardError,
    confidence,
    intercept,
    common: yBar,
    test: adjustedWald((slope / standardError) ** 2, 1, nu),
    scatter: K > 2 ? { statistic: residual, df: K - 2, pValue: upperTailChiSquare(residual, K - 2) } : null,
  };
}

/** A layer-effect trend in q quantities over ordered samples, fitted by GLS. */
export interface LayerEffectWald {
  /** β: change in the log of the strength of every quantity per unit of score. */
  slope: number;
  standardError: number;
  /** Interval {β : Q(β) − Q(β̂) ≤ F(1, ν) quantile}; an end beyond the search range ±8/(score range) is null. */
  lower: number | null;
  upper: number | null;
  confidence: number;
  /** The common pattern ψ at the mean score. */
  pattern: number[];
  /** φ_k = exp(β (x_k − x̄)) per sample. */
  layerStrength: number[];
  scoreCentre: number;
  /** Q of the model of equal quantities (β = 0) and of the trend model. */
  homogeneousQ: number;
  trendQ: number;
  /** The drop Q(0) − Q(β̂), a Wald statistic on 1 df, F form on 1 and ν df. */
  test: WaldAcross;
  /** The trend model's own fit: Q(β̂) on (K − 1) q − 1 df (χ²), null when that is 0. */
  fit: { statistic: number; df: number; pValue: number } | null;
}

/**
 * The layer-effect ("uniform difference") model of Xie (1992, Am. Sociol.
 * Rev. 57, 380–395) for the log odds ratios θ_k of K samples, with a
 * log-linear trend:
 *   θ_k = φ_k ψ,  φ_k = exp(β (x_k − x̄)),
 * fitted by generalized least squares with weights A_k = Σ_k⁻¹ (minimum
 * Q = Σ_k (θ_k − φ_k ψ)' A_k (θ_k − φ_k ψ); Grizzle, Starmer & Koch 1969,
 * with design-based covariances as in Koch, Freeman & Freeman 1975). For a
 * given β the best ψ is (Σ φ_k² A_k)⁻¹ Σ φ_k A_k θ_k and Q(β) is the
 * profile; β̂ minimizes it (a grid of 161 points over ±8/(score range),
 * golden-section search, then bisection on the profile's derivative). The test is Q(0) − Q(β̂),
 * Q(0) the GLS homogeneity statistic; SE from the Gauss–Newton information
 * of (ψ, β); the interval is {β : Q(β) − Q(β̂) ≤ F_{1,ν}(confidence)}, the
 * one the test inverts. null for fewer than two samples, a singular
 * covariance, or equal scores.
 */
export function layerEffectWald(samples: readonly SampleEstimate[], scores: readonly number[], confidence = 0.95): LayerEffectWald | null {
  const K = samples.length;
  if (K < 2 || scores.length !== K) return null;
  const q = samples[0].values.length;
  const A = precisions(samples);
  if (A === null || q === 0) return null;
  const scoreCentre = scores.reduce((a, b) => a + b, 0) / K;
  const x = scores.map((s) => s - scoreCentre);
  const span = Math.max(...scores) - Math.min(...scores);
  if (!(span > 0)) return null;
  const bound = 8 / span;
  const total = samples.reduce((s, smp, k) => s + dotOf(smp.values, matVec(A[k], smp.values)), 0);
  const Aθ = samples.map((s, k) => matVec(A[k], s.values));
  const profile = (beta: number): { Q: number; psi: number[] } | null => {
    const phi = x.map((v) => Math.exp(beta * v));
    const M = Array.from({ length: q }, (_v, a) => Array.from({ length: q }, (_w, b) => A.reduce((s, Ak, k) => s + phi[k] * phi[k] * Ak[a][b], 0)));
    const b = new Array<number>(q).fill(0);
    Aθ.forEach((v, k) => v.forEach((y, a) => (b[a] += phi[k] * y)));
    const psi = solveLinear(M, b);
    if (psi === null) return null;
    return { Q: total - dotOf(b, psi), psi };
  };
  const Qat = (beta: number) => profile(beta)?.Q ?? Number.POSITIVE_INFINITY;
  const grid = 160;
  let best = 0;
  let bestQ = Qat(0);
  for (let g = 0; g <= grid; g++) {
    const beta = -bound + (2 * bound * g) / grid;
    const value = Qat(beta);
    if (value < bestQ) {
      bestQ = value;
      best = beta;
    }
  }
  // golden-section search in the grid cell on either side of the best point
  const step = (2 * bound) / grid;
  let lo = Math.max(-bound, best - step);
  let hi = Math.min(bound, best + step);
  const ratio = (Math.sqrt(5) - 1) / 2;
  let c1 = hi - ratio * (hi - lo);
  let c2 = lo + ratio * (hi - lo);
  let q1 = Qat(c1);
  let q2 = Qat(c2);
  while (hi - lo > 1e-12 * bound) {
    if (q1 <= q2) {
      hi = c2;
      c2 = c1;
      q2 = q1;
      c1 = hi - ratio * (hi - lo);
      q1 = Qat(c1);
    } else {
      lo = c1;
      c1 = c2;
      q1 = q2;
      c2 = lo + ratio * (hi - lo);
      q2 = Qat(c2);
    }
  }
  // the minimum to full precision: the root of the profile's derivative, which by the envelope theorem is
  // dQ/dβ = −2 Σ_k x_k φ_k ψ′A_k(θ_k − φ_k ψ) at the best ψ for β, by bisection where it changes sign
  const derivative = (beta: number): number => {
    const at = profile(beta);
    if (at === null) return Number.NaN;
    let g = 0;
    samples.forEach((smp, k) => {
      const phi = Math.exp(beta * x[k]);
      const residual = smp.values.map((v, a) => v - phi * at.psi[a]);
      g += -2 * x[k] * phi * dotOf(at.psi, matVec(A[k], residual));
    });
    return g;
  };
  let slope = (lo + hi) / 2;
  let below = Math.max(-bound, slope - step);
  let above = Math.min(bound, slope + step);
  if (derivative(below) < 0 && derivative(above) > 0) {
    for (let it = 0; it < 200 && above - below > 0; it++) {
      const mid = (below + above) / 2;
      if (mid === below || mid === above) break;
      if (derivative(mid) < 0) below = mid;
      else above = mid;
    }
    slope = (below + above) / 2;
  }
  const fitted = profile(slope);
  const homogeneous = profile(0);
  if (fitted === null || homogeneous === null) return null;
  const trendQ = Math.min(fitted.Q, bestQ);
  const homogeneousQ = homogeneous.Q;
  const nu = totalDf(samples);
  const drop = Math.max(0, homogeneousQ - trendQ);
  // Gauss–Newton information of (ψ, β): J_k = [φ_k I, x_k φ_k ψ]
  const phi = x.map((v) => Math.exp(slope * v));
  const psi = fitted.psi;
  const Ipp = Array.from({ length: q }, (_v, a) => Array.from({ length: q }, (_w, b) => A.reduce((s, Ak, k) => s + phi[k] * phi[k] * Ak[a][b], 0)));
  const Ipb = new Array<number>(q).fill(0);
  let Ibb = 0;
  A.forEach((Ak, k) => {
    const Akpsi = matVec(Ak, psi);
    Akpsi.forEach((v, a) => (Ipb[a] += x[k] * phi[k] * phi[k] * v));
    Ibb += x[k] * x[k] * phi[k] * phi[k] * dotOf(psi, Akpsi);
  });
  const solved = solveLinear(Ipp, Ipb);
  const schur = solved === null ? Number.NaN : Ibb - dotOf(Ipb, solved);
  const standardError = schur > 0 ? 1 / Math.sqrt(schur) : Number.NaN;
  // the interval the test inverts: Q(β) − Q(β̂) = F quantile, searched by bisection on each side
  const critical = upperQuantileF(1 - confidence, 1, nu);
  const end = (towards: number): number | null => {
    if (Qat(towards) - trendQ <= critical) return null;
    let inside = slope;
    let outside = towards;
    for (let it = 0; it < 200 && Math.abs(outside - inside) > 1e-12 * bound; it++) {
      const mid = (inside + outside) / 2;
      if (Qat(mid) - trendQ <= critical) inside = mid;
      else outside = mid;
    }
    return (inside + outside) / 2;
  };
  const fitDf = (K - 1) * q - 1;
  return {
    slope,
    standardError,
    lower: end(-bound),
    upper: end(bound),
    confidence,
    pattern: psi,
    layerStrength: phi,
    scoreCentre,
    homogeneousQ,
    trendQ,
    test: adjustedWald(drop, 1, nu),
    fit: fitDf > 0 ? { statistic: trendQ, df: fitDf, pValue: upperTailChiSquare(trendQ, fitDf) } : null,
  };
}
