import { describe, expect, it } from 'vitest';
import { designRank, layerDepartures, noThreeWayInteraction } from '../../src/stats/threeWay.js';
import { expectClose, reference } from '../helpers.js';
import { wavesReference } from './wavesReference.js';

describe('no three-way interaction by iterative proportional fitting (Bishop, Fienberg & Holland 1975)', () => {
  for (const [k, item] of reference.noThreeWay.entries()) {
    it(`case ${k + 1} (${item.layers[0].length}×${item.layers[0][0].length}×2): G² equals an independent numpy IPF (recorded)`, () => {
      const fit = noThreeWayInteraction(item.layers);
      expect(fit?.df).toBe(item.df);
      expectClose(fit?.statistic, item.statistic, 1e-9);
      expectClose(fit?.pValue, item.pValue, 1e-8);
    });
  }

  it('hand-worked: two periods with the same table, or one table twice the other, have G² = 0', () => {
    const t = [[30, 10, 5], [12, 25, 9]];
    expect(noThreeWayInteraction([t, t])?.statistic).toBeCloseTo(0, 10);
    expect(noThreeWayInteraction([t, t.map((r) => r.map((v) => 2 * v))])?.statistic).toBeCloseTo(0, 10);
  });

  it('hand-worked: the fit keeps all three two-way margins of the observed table', () => {
    const layers = [[[30, 10], [12, 25]], [[22, 18], [15, 20]]];
    const fit = noThreeWayInteraction(layers)!;
    for (let k = 0; k < 2; k++) for (let i = 0; i < 2; i++) expect(fit.fitted[k][i][0] + fit.fitted[k][i][1]).toBeCloseTo(layers[k][i][0] + layers[k][i][1], 9);
    for (let i = 0; i < 2; i++) for (let j = 0; j < 2; j++) expect(fit.fitted[0][i][j] + fit.fitted[1][i][j]).toBeCloseTo(layers[0][i][j] + layers[1][i][j], 9);
    // with a 2×2×2 table the fitted odds ratios are equal in both layers
    const or = (t: number[][]) => (t[0][0] * t[1][1]) / (t[0][1] * t[1][0]);
    expect(or(fit.fitted[0])).toBeCloseTo(or(fit.fitted[1]), 8);
  });
});

describe('no three-way interaction across K waves, on real data (recorded by scripts/record_waves_reference.py)', () => {
  for (const item of wavesReference.noThreeWay) {
    it(`${item.name}: G², X² and df equal statsmodels GLM Poisson of [ij][ik][jk]; G² equals a numpy IPF`, () => {
      const fit = noThreeWayInteraction(item.layers, { structuralZeros: item.structuralZeros ?? undefined })!;
      expect(fit.converged).toBe(true);
      expect(fit.df).toBe(item.df);
      expect(fit.nominalDf).toBe(item.nominalDf);
      expect(fit.dfAdjusted).toBe(item.df !== item.nominalDf);
      expectClose(fit.statistic, item.statistic, 1e-9);
      expectClose(fit.statistic, item.ipfStatistic, 1e-9);
      expectClose(fit.pValue, item.pValue, 1e-8);
      expectClose(fit.pearson.statistic, item.pearson, 1e-9);
    });

    it(`${item.name}: each wave's departure (G² all − G² without it) equals the same GLM fits`, () => {
      const departures = layerDepartures(item.layers, { structuralZeros: item.structuralZeros ?? undefined })!;
      departures.forEach((d, k) => {
        expect(d?.df).toBe(item.departures[k].df);
        expectClose(d?.statistic, item.departures[k].statistic, 1e-7);
      });
    });
  }

  it('a level absent from one wave: its fitted cells are zero and the df drop by c − 1 per missing row (Bishop, Fienberg & Holland 1975, §3.8)', () => {
    const item = wavesReference.noThreeWay.find((x) => x.name.includes('absent'))!;
    const fit = noThreeWayInteraction(item.layers)!;
    expect(fit.zeroFittedCells).toBe(3);
    expect(fit.fitted[0][3]).toEqual([0, 0, 0]);
    expect(fit.nominalDf - fit.df).toBe(2);
  });

  it('with no zero margin the design rank gives back (K−1)(r−1)(c−1)', () => {
    for (const [K, r, c] of [[2, 2, 2], [3, 4, 2], [22, 4, 3], [6, 2, 4]]) {
      const positive = new Uint8Array(K * r * c).fill(1);
      expect(K * r * c - designRank(positive, K, r, c)).toBe((K - 1) * (r - 1) * (c - 1));
    }
  });

  it('a fit that cannot settle within the sweep bound says so', () => {
    const item = wavesReference.noThreeWay[0];
    const fit = noThreeWayInteraction(item.layers, { maxIterations: 1 })!;
    expect(fit.iterations).toBe(1);
    expect(fit.converged).toBe(false);
  });

  it('K = 2 keeps the two-period behaviour: positional tolerance and sweep bound still accepted', () => {
    const layers = [[[30, 10], [12, 25]], [[22, 18], [15, 20]]];
    const a = noThreeWayInteraction(layers, 1e-12, 10_000)!;
    const b = noThreeWayInteraction(layers)!;
    expect(a.statistic).toBe(b.statistic);
    expect(a.df).toBe(1);
  });

  it('a count in a cell declared structurally zero is a caller error', () => {
    const layers = [[[1, 2], [3, 4]], [[5, 6], [7, 8]]];
    const zeros = [[[true, false], [false, false]], [[false, false], [false, false]]];
    expect(() => noThreeWayInteraction(layers, { structuralZeros: zeros })).toThrow(/structural zero/);
  });
});
