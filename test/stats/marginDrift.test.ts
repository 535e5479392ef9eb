import { describe, expect, it } from 'vitest';
import { marginDrift } from '../../src/stats/marginDrift.js';
import { expectClose } from '../helpers.js';
import { wavesReference } from './wavesReference.js';

describe('margin drift over waves: chi-square of margin × wave', () => {
  for (const item of wavesReference.marginDrift) {
    it(`${item.name}: X², G² and df equal scipy.stats.chi2_contingency (recorded)`, () => {
      const drift = marginDrift(item.layers);
      for (const key of ['rows', 'columns'] as const) {
        const test = drift[key]!;
        expect(test.pearson.df).toBe(item[key].pearson.df);
        expectClose(test.pearson.statistic, item[key].pearson.statistic, 1e-10);
        expectClose(test.pearson.pValue, item[key].pearson.pValue, 1e-9);
        expectClose(test.likelihoodRatio.statistic, item[key].likelihoodRatio.statistic, 1e-10);
        expectClose(test.likelihoodRatio.pValue, item[key].likelihoodRatio.pValue, 1e-9);
      }
    });
  }

  it('hand-worked: an unchanged margin gives X² = 0; a 30/70 to 70/30 swing over two waves of 100 gives X² = 32', () => {
    const drift = marginDrift([[[15, 35], [15, 35]], [[35, 15], [35, 15]]]);
    expect(drift.rows!.pearson.statistic).toBeCloseTo(0, 12);
    // columns × waves: [[30, 70], [70, 30]]; E = 50 everywhere; X² = 4 · 20²/50 = 32
    expectClose(drift.columns!.pearson.statistic, 32, 1e-14);
    expect(drift.columns!.pearson.df).toBe(1);
  });

  it('a level never seen and an empty wave are left out and listed', () => {
    const drift = marginDrift([[[5, 0], [7, 0], [0, 0]], [[0, 0], [0, 0], [0, 0]], [[3, 0], [9, 0], [0, 0]]]);
    expect(drift.rows!.levelsLeftOut).toEqual([2]);
    expect(drift.rows!.wavesLeftOut).toEqual([1]);
    expect(drift.rows!.table).toEqual([[5, 3], [7, 9]]);
    expect(drift.columns).toBeNull();
  });
});
