import { describe, expect, it } from 'vitest';
import { layerEffectTrend } from '../../src/stats/layerEffectTrend.js';
import { noThreeWayInteraction } from '../../src/stats/threeWay.js';
import { expectClose } from '../helpers.js';
import { wavesReference } from './wavesReference.js';

describe('trend in the association over ordered waves: layer-effect model with a log-linear trend (Xie 1992)', () => {
  for (const item of wavesReference.layerTrend) {
    it(`${item.name}: β, the LR test and the profile interval equal statsmodels GLM Poisson profiled by scipy (recorded)`, () => {
      const trend = layerEffectTrend(item.layers, item.scores)!;
      expect(trend.converged).toBe(true);
      expectClose(trend.homogeneousDeviance, item.homogeneousDeviance, 1e-9);
      expectClose(trend.trendDeviance, item.trendDeviance, 1e-9);
      expectClose(trend.test.statistic, item.statistic, 1e-10);
      expectClose(trend.test.pValue, item.pValue, 1e-9);
      // the reference optimiser (bounded Brent on the deviance) locates β to about 1e-8; the deviance is flat at β̂
      expectClose(trend.slope, item.beta, 1e-6);
      expectClose(trend.lower, item.lower, 1e-9);
      expectClose(trend.upper, item.upper, 1e-9);
    });
  }

  it('β = 0 is the model of no three-way interaction: the homogeneous deviance is its G²', () => {
    const item = wavesReference.layerTrend[0];
    expectClose(layerEffectTrend(item.layers, item.scores)!.homogeneousDeviance, noThreeWayInteraction(item.layers)!.statistic, 1e-9);
  });

  it('hand-worked: layers whose log odds ratios are 0.5·(1, 2, 4) (a doubling per wave) give β = log 2 and fit exactly', () => {
    // 2×2 layers [[e^{ψφ}, 1], [1, 1]]·1000 with ψφ = 0.5, 1, 2: log OR_k = 0.5·2^k, so φ_k ∝ 2^k
    const layers = [0.5, 1, 2].map((v) => [[1000 * Math.exp(v), 1000], [1000, 1000]]);
    const trend = layerEffectTrend(layers, [0, 1, 2])!;
    expectClose(trend.slope, Math.log(2), 1e-9);
    expect(trend.trendDeviance).toBeLessThan(1e-12);
    expectClose(trend.layerStrength[2] / trend.layerStrength[0], 4, 1e-9);
  });

  it('shifting the scores changes neither β nor the test', () => {
    const item = wavesReference.layerTrend[1];
    const a = layerEffectTrend(item.layers, item.scores)!;
    const b = layerEffectTrend(item.layers, item.scores.map((s) => s + 1980))!;
    expectClose(a.slope, b.slope, 1e-9);
    expectClose(a.test.statistic, b.test.statistic, 1e-9);
  });
});
