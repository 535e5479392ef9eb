/**
 * The layer-effect (uniform difference) model with a log-linear trend over
 * ordered waves (Xie 1992).
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { compensatedSum } from '../numerics/compensatedSum.js';
import { devianceTerm } from './gamma.js';
import { normalQuantile } from './normalDistribution.js';
import { LayerStack } from './threeWay.js';

export interface LayerEffectTrend {
  /** β: change in the log of the association's strength per unit of score (per wave, per year). */
  slope: number;
  /** Profile-likelihood interval for β at `confidence`; an end is null when it lies beyond the search range. */
  lower: number | null;
  upper: number | null;
  confidence: number;
  /** Likelihood-ratio test of β = 0 (the same association in every layer) against the trend, 1 df. */
  test: TestResult;
  /** G² of the no-three-way model (β = 0) and of the trend model, against the saturated table. */
  homogeneousDeviance: number;
  trendDeviance: number;
  /** The trend model's own fit: G² on (no-three-way df) − 1. */
  fit: TestResult | null;
  /** φ_k = exp(β (x_k − x̄)): each layer's association strength relative to a layer at the mean score. */
  layerStrength: number[];
  /** The mean score x̄ the scores were centred at. */
  scoreCentre: number;
  /** False when an inner fit reached its sweep bound before settling. */
  converged: boolean;
}

interface FitState {
  m: Float64Array;
  psi: Float64Array;
  phi: Float64Array;
  converged: boolean;
}

/**
 * Log-multiplicative layer-effect ("uniform difference") model with a
 * log-linear trend in the layer parameters (Xie 1992, Am. Sociol. Rev. 57,
 * 380–395; Erikson & Goldthorpe 1992, The Constant Flux, ch. 3):
 *   log m_ijk = α_ik + γ_jk + φ_k ψ_ij,  φ_k = exp(β (x_k − x̄)),
 * every log odds ratio of layer k is that of the mean layer times φ_k, so
 * the association grows (β > 0) or fades (β < 0) by the factor exp(β) per
 * unit of score. β = 0 is the model of no three-way interaction.
 * Fitted by Poisson maximum likelihood: for a given β, cycles of exact
 * scaling to the n_i+k and n_+jk margins and a Newton step for each ψ_ij
 * (its score Σ_k φ_k (n − m), information Σ_k φ_k² m) until no fitted cell
 * moves by more than 1e-12 (relative); β̂ is the root of the profile score
 * Σ (n − m) (x_k − x̄) φ_k ψ_ij, found by bracketing and the Illinois
 * (regula falsi) method. The test is the likelihood-ratio statistic
 * G²(β = 0) − G²(β̂) on 1 df; the interval is the profile-likelihood
 * interval {β : G²(β) − G²(β̂) ≤ χ²₁(confidence)} (Venzon & Moolgavkar 1988,
 * Appl. Stat. 37, 87–94). β is searched within ±8/(score range).
 * null for fewer than two layers, fewer than two rows or columns, or equal scores.
 *
 * @example
 * // GSS vocabulary, education × vocabulary over 22 waves (scores 0..21): β = −0.0127,
 * // the association weakening by about 1.3 % a wave; LR = 34.44, 1 df
 */
export function layerEffectTrend(layers: LayerStack, scores: readonly number[], confidence = 0.95, maxIterations = 20_000): LayerEffectTrend | null {
  const K = layers.length;
  if (K < 2 || scores.length !== K) return null;
  const r = layers[0].length;
  const c = r === 0 ? 0 : layers[0][0].length;
  if (r < 2 || c < 2) return null;
  const scoreCentre = compensatedSum(scores) / K;
  const x = scores.map((s) => s - scoreCentre);
  const span = Math.max(...scores) - Math.min(...scores);
  if (!(span > 0)) return null;
  const bound = 8 / span;
  const n = new Float64Array(K * r * c);
  for (let k = 0; k < K; k++) for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) n[(k * r + i) * c + j] = layers[k][i][j];

  let converged = true;
  const state: FitState = { m: new Float64Array(K * r * c).fill(1), psi: new Float64Array(r * c), phi: new Float64Array(K).fill(1), converged: true };
  for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) if (layers.every((t) => t[i][j] === 0)) for (let k = 0; k < K; k++) state.m[(k * r + i) * c + j] = 0;

  const cache = new Map<number, { deviance: number; score: number }>();
  const evaluate = (beta: number) => {
    const known = cache.get(beta);
    if (known) return known;
    fitAt(beta, n, K, r, c, x, state, maxIterations);
    converged &&= state.converged;
    const devianceTerms: number[] = [];
    const scoreTerms: number[] = [];
    for (let k = 0; k < K; k++)
      for (let i = 0; i < r; i++)
        for (let j = 0; j < c; j++) {
          const cell = (k * r + i) * c + j;
          const m = state.m[cell];
          if (m > 0) devianceTerms.push(n[cell] === 0 ? m : devianceTerm(n[cell], m));
          scoreTerms.push((n[cell] - m) * x[k] * state.phi[k] * state.psi[i * c + j]);
        }
    const value = { deviance: Math.max(0, 2 * compensatedSum(devianceTerms)), score: compensatedSum(scoreTerms) };
    cache.set(beta, value);
    return value;
  };

  const homogeneous = evaluate(0);
  // Bracket the root of the profile score (decreasing through β̂), stepping away from 0.
  const direction = homogeneous.score > 0 ? 1 : -1;
  let inner = 0;
  let outer = direction * 0.05 / span;
  while (Math.abs(outer) <= bound && Math.sign(evaluate(outer).score) === direction) {
    inner = outer;
    outer *= 2;
  }
  if (Math.abs(outer) > bound) outer = direction * bound;
  const slope = homogeneous.score === 0 ? 0 : illinoisRoot((b) => evaluate(b).score, inner, outer);
  // A fit that broke down (non-finite counts) gives no estimate.
  if (!Number.isFinite(slope) || !Number.isFinite(evaluate(slope).deviance)) return null;
  const best = evaluate(slope);
  const statistic = Math.max(0, homogeneous.deviance - best.deviance);
  const critical = normalQuantile(0.5 + confidence / 2) ** 2; // χ²₁ quantile = z²
  const excess = (b: number) => evaluate(b).deviance - best.deviance - critical;
  // Near β̂ the profile deviance is about quadratic, G²(β) − G²(β̂) ≈ −S'(β̂)(β − β̂)² with S the
  // profile score (−½ dG²/dβ), so each end lies about √(critical / −S'(β̂)) from β̂; S' from one
  // more fit a small step away. That distance, when it is within the search range, brackets each end
  // (checked by the fits at 0.8 and 1.25 times it); otherwise, or when it does not bracket, the
  // search widens from there as from 0.05/span.
  const probe = 5e-4 / span;
  const curvature = (evaluate(slope + probe).score - best.score) / probe;
  const halfWidth = curvature < 0 && Number.isFinite(curvature) ? Math.sqrt(critical / -curvature) : null;
  const end = (sign: 1 | -1): number | null => {
    let step = 0.05 / span;
    let near = slope;
    if (halfWidth !== null && Math.abs(slope + sign * 1.25 * halfWidth) <= bound) {
      step = 1.25 * halfWidth;
      const inside = slope + sign * 0.8 * halfWidth;
      if (excess(inside) < 0) near = inside;
    }
    let far = slope + sign * step;
    while (excess(far) < 0) {
      near = far;
      step *= 2;
      far = slope + sign * step;
      if (!(Math.abs(far) <= bound)) return null;
    }
    return illinoisRoot(excess, near, far);
  };
  const lower = end(-1);
  const upper = end(1);
  const fitDf = noThreeWayDf(layers) - 1;
  fitAt(slope, n, K, r, c, x, state, maxIterations);
  return {
    slope,
    lower,
    upper,
    confidence,
    test: { statistic, df: 1, pValue: upperTailChiSquare(statistic, 1) },
    homogeneousDeviance: homogeneous.deviance,
    trendDeviance: best.deviance,
    fit: fitDf > 0 ? { statistic: best.deviance, df: fitDf, pValue: upperTailChiSquare(best.deviance, fitDf) } : null,
    layerStrength: Array.from(state.phi),
    scoreCentre,
    converged,
  };
}

/** (K−1)(r−1)(c−1), the df of no three-way interaction without zero margins. */
function noThreeWayDf(layers: LayerStack): number {
  return (layers.length - 1) * (layers[0].length - 1) * (layers[0][0].length - 1);
}

/** The fit for a given β, started from the previous state (the φψ term moved to the new φ). */
function fitAt(beta: number, n: Float64Array, K: number, r: number, c: number, x: readonly number[], state: FitState, maxIterations: number): void {
  const { m, psi, phi } = state;
  for (let k = 0; k < K; k++) {
    const next = Math.exp(beta * x[k]);
    const change = next - phi[k];
    if (change !== 0) for (let i = 0; i < r; i++) for (let j = 0; j < c; j++) m[(k * r + i) * c + j] *= Math.exp(change * psi[i * c + j]);
    phi[k] = next;
  }
  const previous = new Float64Array(m.length);
  state.converged = false;
  for (let sweep = 0; sweep < maxIterations; sweep++) {
    previous.set(m);
    // n_i+k
    for (let k = 0; k < K; k++)
      for (let i = 0; i < r; i++) {
        let observed = 0;
        let fitted = 0;
        for (let j = 0; j < c; j++) {
          observed += n[(k * r + i) * c + j];
          fitted += m[(k * r + i) * c + j];
        }
        const factor = fitted > 0 && observed > 0 ? observed / fitted : 0;
        for (let j = 0; j < c; j++) m[(k * r + i) * c + j] *= factor;
      }
    // n_+jk
    for (let k = 0; k < K; k++)
      for (let j = 0; j < c; j++) {
        let observed = 0;
        let fitted = 0;
        for (let i = 0; i < r; i++) {
          observed += n[(k * r + i) * c + j];
          fitted += m[(k * r + i) * c + j];
        }
        const factor = fitted > 0 && observed > 0 ? observed / fitted : 0;
        for (let i = 0; i < r; i++) m[(k * r + i) * c + j] *= factor;
      }
    // ψ_ij: one Newton step each
    for (let i = 0; i < r; i++)
      for (let j = 0; j < c; j++) {
        let score = 0;
        let information = 0;
        for (let k = 0; k < K; k++) {
          const cell = (k * r + i) * c + j;
          score += phi[k] * (n[cell] - m[cell]);
          information += phi[k] * phi[k] * m[cell];
        }
        if (!(information > 0)) continue;
        // A Newton step, damped to at most one unit of ψ: with sparse cells the
        // information can be tiny and a full step would overflow exp().
        const step = Math.max(-1, Math.min(1, score / information));
        psi[i * c + j] += step;
        for (let k = 0; k < K; k++) m[(k * r + i) * c + j] *= Math.exp(phi[k] * step);
      }
    let change = 0;
    for (let cell = 0; cell < m.length; cell++) change = Math.max(change, Math.abs(m[cell] - previous[cell]) / Math.max(1, m[cell]));
    if (change < 1e-12) {
      state.converged = true;
      return;
    }
  }
}

/** A root of f between a and b (f(a), f(b) of opposite signs) by the Illinois method (Dowell & Jarratt 1971, BIT 11, 168–174). */
function illinoisRoot(f: (v: number) => number, a: number, b: number): number {
  let fa = f(a);
  let fb = f(b);
  if (fa === 0) return a;
  if (fb === 0) return b;
  let side = 0;
  let last = Number.NaN;
  for (let iteration = 0; iteration < 200; iteration++) {
    const next = (a * fb - b * fa) / (fb - fa);
    if (Math.abs(next - last) <= 1e-15 * Math.abs(next)) return next;
    last = next;
    const fNext = f(next);
    if (fNext === 0 || Number.isNaN(fNext)) return Number.isNaN(fNext) ? Number.NaN : next;
    if (Math.sign(fNext) === Math.sign(fb)) {
      b = next;
      fb = fNext;
      if (side === -1) fa /= 2;
      side = -1;
    } else {
      a = next;
      fa = fNext;
      if (side === 1) fb /= 2;
      side = 1;
    }
    if (Math.abs(b - a) <= 1e-13 * Math.max(Math.abs(a), Math.abs(b))) return (a + b) / 2;
  }
  return (a + b) / 2;
}
