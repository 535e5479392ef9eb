import { describe, expect, it } from 'vitest';
import { noThreeWayInteraction } from '../../src/stats/threeWay.js';
import { expectClose, reference } from '../helpers.js';

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
