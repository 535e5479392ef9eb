import { describe, expect, it } from 'vitest';
import { welchTTest } from '../../src/stats/welch.js';
import { expectClose } from '../helpers.js';
import { wavesReference } from './wavesReference.js';

describe("Welch's t from summary statistics", () => {
  for (const item of wavesReference.welch) {
    for (const pair of item.pairs) {
      const [a, b] = [item.groups[pair.a], item.groups[pair.b]];
      it(`${item.name}, ${a.label} against ${b.label}: t and p equal scipy.stats.ttest_ind_from_stats(equal_var=False) (recorded)`, () => {
        const test = welchTTest(a, b)!;
        expectClose(test.t, pair.t, 1e-12);
        expectClose(test.df, pair.df, 1e-12);
        expectClose(test.pValue, pair.pValue, 1e-10);
      });
    }
  }

  it('hand-worked: 20.1 (SD 4.2, n 30) against 17.6 (SD 6.3, n 25)', () => {
    // v₁ = 4.2²/30 = 0.588, v₂ = 6.3²/25 = 1.5876; t = 2.5/√2.1756; df = 2.1756²/(0.588²/29 + 1.5876²/24)
    const test = welchTTest({ mean: 20.1, sd: 4.2, n: 30 }, { mean: 17.6, sd: 6.3, n: 25 })!;
    expectClose(test.t, 2.5 / Math.sqrt(2.1756), 1e-13);
    expectClose(test.df, 2.1756 ** 2 / (0.588 ** 2 / 29 + 1.5876 ** 2 / 24), 1e-13);
  });

  it('a group of one, or two constant groups, give no test', () => {
    expect(welchTTest({ mean: 1, sd: 0, n: 1 }, { mean: 2, sd: 1, n: 10 })).toBeNull();
    expect(welchTTest({ mean: 1, sd: 0, n: 5 }, { mean: 2, sd: 0, n: 10 })).toBeNull();
  });
});
