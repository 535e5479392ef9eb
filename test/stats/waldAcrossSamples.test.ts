// Wald tests across independent samples (src/stats/waldAcrossSamples.ts): the
// identities the method rests on (Grizzle, Starmer & Koch 1969, Biometrics 25;
// Koch, Freeman & Freeman 1975, Int. Stat. Rev. 43). Values against the survey
// package for R are in test/cli/designWaves.test.ts.
import { describe, expect, it } from 'vitest';
import { expectClose } from '../helpers.js';
import { adjustedWald, commonValue, departuresFromOthers, inverseSymmetric, layerEffectWald, linearTrend, precisions, SampleEstimate, waldHomogeneity } from '../../src/stats/waldAcrossSamples.js';
import { SeededRandom } from '../../src/stats/random.js';

const seeded = (seed: number) => {
  const generator = new SeededRandom(seed);
  return () => generator.nextDouble();
};

/** A random sample estimate of q quantities with a positive-definite covariance B B' + 0.1 I. */
function sample(q: number, random: () => number, df = 10): SampleEstimate {
  const B = Array.from({ length: q }, () => Array.from({ length: q }, () => random() - 0.5));
  const covariance = B.map((row, a) => B.map((other, b) => row.reduce((s, v, m) => s + v * other[m], 0) + (a === b ? 0.1 : 0)));
  return { values: Array.from({ length: q }, () => 2 * random() - 1), covariance, degreesOfFreedom: df };
}

function glsResidual(samples: SampleEstimate[]): number {
  const A = precisions(samples)!;
  const common = commonValue(samples, A)!;
  return samples.reduce((s, x, k) => {
    const d = x.values.map((v, a) => v - common.values[a]);
    return s + d.reduce((t, v, a) => t + v * A[k][a].reduce((u, w, b) => u + w * d[b], 0), 0);
  }, 0);
}

describe('Wald homogeneity across K independent samples', () => {
  it('the contrast form D′S⁻¹D equals the GLS residual Σ (θ_k − θ̄)′Σ_k⁻¹(θ_k − θ̄) (Grizzle, Starmer & Koch 1969)', () => {
    const random = seeded(18);
    for (const [K, q] of [
      [2, 1],
      [3, 3],
      [6, 2],
      [12, 4],
    ]) {
      const samples = Array.from({ length: K }, () => sample(q, random));
      const test = waldHomogeneity(samples)!;
      expectClose(test.wald, glsResidual(samples), 1e-9);
      expect(test.numDf).toBe((K - 1) * q);
      expect(test.designDegreesOfFreedom).toBe(10 * K);
    }
  });

  it('K = 2 is the two-sample statistic d′(Σ_1 + Σ_2)⁻¹d, and the F form is (ν − d + 1)W/(νd) (Korn & Graubard 1990)', () => {
    const a: SampleEstimate = { values: [0.3], covariance: [[0.04]], degreesOfFreedom: 8 };
    const b: SampleEstimate = { values: [0.9], covariance: [[0.05]], degreesOfFreedom: 9 };
    const test = waldHomogeneity([a, b])!;
    expectClose(test.wald, 0.36 / 0.09, 1e-12);
    expectClose(test.statistic!, ((17 - 1 + 1) / 17) * test.wald, 1e-12);
    expect(test.denDf).toBe(17);
    expect(adjustedWald(5, 20, 10).statistic).toBeNull();
  });

  it('a difference that is 0 with variance 0 leaves the test with its df, and one that is not 0 makes it undefined', () => {
    const zero = (v: number): SampleEstimate => ({ values: [v, 0], covariance: [[0.01, 0], [0, 0]], degreesOfFreedom: 5 });
    const present: SampleEstimate = { values: [0.2, 0.3], covariance: [[0.01, 0], [0, 0.02]], degreesOfFreedom: 5 };
    const test = waldHomogeneity([zero(0.1), zero(0.3), present])!;
    expect(test.numDf).toBe(3);
    expect(waldHomogeneity([zero(0.1), { ...zero(0.3), values: [0.3, 0.1] }])).toBeNull();
  });
});

describe('departures, trends', () => {
  it('each departure is the drop in the homogeneity W when that sample is freed', () => {
    const random = seeded(7);
    const samples = Array.from({ length: 5 }, () => sample(2, random));
    const all = waldHomogeneity(samples)!.wald;
    departuresFromOthers(samples, precisions(samples)!).forEach((d, k) => {
      const others = waldHomogeneity(samples.filter((_s, j) => j !== k))!.wald;
      expectClose(d!.test.wald, all - others, 1e-9);
    });
  });

  it('a linear trend in one quantity: W of the slope plus the scatter about the line is the homogeneity W (weighted least squares)', () => {
    const random = seeded(3);
    const samples = Array.from({ length: 6 }, () => sample(1, random));
    const trend = linearTrend(samples, [0, 1, 2, 3, 4, 5])!;
    expectClose(trend.test.wald + trend.scatter!.statistic, waldHomogeneity(samples)!.wald, 1e-10);
  });

  it('the layer-effect trend: β = 0 gives back the homogeneity W, the drop is at least 0, and a pure scaling is recovered exactly', () => {
    const random = seeded(11);
    const samples = Array.from({ length: 5 }, () => sample(3, random));
    const fit = layerEffectWald(samples, [0, 1, 2, 3, 4])!;
    expectClose(fit.homogeneousQ, waldHomogeneity(samples)!.wald, 1e-9);
    expect(fit.trendQ).toBeLessThanOrEqual(fit.homogeneousQ + 1e-12);
    // θ_k = exp(0.2 (k − 2)) ψ exactly: Q(β̂) = 0 at β̂ = 0.2
    const psi = [0.5, -0.3, 0.8];
    const exact = samples.map((s, k) => ({ ...s, values: psi.map((v) => v * Math.exp(0.2 * (k - 2))) }));
    const recovered = layerEffectWald(exact, [0, 1, 2, 3, 4])!;
    expectClose(recovered.slope, 0.2, 1e-8);
    expect(recovered.trendQ).toBeLessThan(1e-12);
    recovered.pattern.forEach((v, a) => expectClose(v, psi[a], 1e-7));
  });

  it('the inverse of a symmetric positive-definite matrix, and null for a singular one', () => {
    const inverse = inverseSymmetric([
      [4, 2],
      [2, 3],
    ])!;
    expectClose(inverse[0][0], 3 / 8, 1e-14);
    expectClose(inverse[0][1], -2 / 8, 1e-14);
    expect(
      inverseSymmetric([
        [1, 1],
        [1, 1],
      ]),
    ).toBeNull();
  });
});
