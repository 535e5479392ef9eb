import { describe, expect, it } from 'vitest';
import { columnProportionTests, pooledTwoProportionZ } from '../../src/stats/columnProportions.js';
import { holm } from '../../src/stats/multipleTesting.js';
import { expectClose } from '../helpers.js';
import { wavesReference } from './wavesReference.js';

describe('column-proportion tests within a break variable', () => {
  for (const item of wavesReference.columnProportions) {
    it(`${item.name}: z and p equal statsmodels proportions_ztest on the (effective) bases (recorded)`, () => {
      const result = columnProportionTests(item.columns);
      expect(result.comparisons).toHaveLength(item.pairs.length);
      item.pairs.forEach((pair, x) => {
        const c = result.comparisons[x];
        expect([c.first, c.second]).toEqual([pair.a, pair.b]);
        expectClose(c.z, pair.z, 1e-12);
        expectClose(c.pValue, pair.pValue, 1e-10);
      });
    });
  }

  it('hand-worked: 45 of 100 against 30 of 100', () => {
    // p̂ = 75/200 = 0.375; SE = √(0.375 · 0.625 · (1/100 + 1/100)) = √0.0046875; z = 0.15/SE
    expectClose(pooledTwoProportionZ(0.45, 100, 0.3, 100), 0.15 / Math.sqrt(0.0046875), 1e-14);
    const result = columnProportionTests([{ count: 45, base: 100 }, { count: 30, base: 100 }], { confidenceLevels: [0.95, 0.99] });
    expect(result.higherThan).toEqual([[{ column: 1, level: 0.95 }], []]);
  });

  it('two confidence levels: a difference met at 90 % but not at 95 % is marked at 90 %', () => {
    // 42 of 100 against 30 of 100: z = 1.7678, p = 0.0771 (statsmodels proportions_ztest): at 90 % only
    const result = columnProportionTests([{ count: 30, base: 100 }, { count: 42, base: 100 }], { confidenceLevels: [0.9, 0.95] });
    expect(result.higherThan).toEqual([[], [{ column: 0, level: 0.9 }]]);
    expect(result.confidenceLevels).toEqual([0.95, 0.9]);
  });

  it('the small-base rule (common practice): a column under 30 respondents is shown but not tested', () => {
    const result = columnProportionTests([{ count: 5, base: 29 }, { count: 40, base: 50 }, { count: 10, base: 50 }]);
    expect(result.tested).toEqual([false, true, true]);
    expect(result.comparisons.map((c) => [c.first, c.second])).toEqual([[1, 2]]);
    expect(result.proportions[0]).toBeCloseTo(5 / 29, 15);
    const weighted = columnProportionTests([{ count: 500, base: 2900, effectiveBase: 25, unweightedBase: 31 }, { count: 40, base: 50 }]);
    expect(weighted.tested).toEqual([true, true]);
  });

  it('Bonferroni and Holm adjust over the row’s comparisons only (Holm 1979)', () => {
    const columns = [{ count: 60, base: 100 }, { count: 45, base: 100 }, { count: 40, base: 100 }, { count: 30, base: 100 }];
    const none = columnProportionTests(columns);
    const holmResult = columnProportionTests(columns, { adjustment: 'holm' });
    const bonferroni = columnProportionTests(columns, { adjustment: 'bonferroni' });
    expect(holmResult.familySize).toBe(6);
    const raw = none.comparisons.map((c) => c.pValue as number);
    expect(holmResult.comparisons.map((c) => c.adjustedPValue)).toEqual(holm(raw));
    bonferroni.comparisons.forEach((c, x) => expectClose(c.adjustedPValue, Math.min(1, 6 * raw[x]), 1e-15));
    // fewer marks after adjustment, never more
    const marks = (r: typeof none) => r.higherThan.flat().length;
    expect(marks(bonferroni)).toBeLessThanOrEqual(marks(holmResult));
    expect(marks(holmResult)).toBeLessThanOrEqual(marks(none));
  });

  it('columns that are all 0 % or all 100 % cannot differ: no z, no mark', () => {
    const result = columnProportionTests([{ count: 0, base: 40 }, { count: 0, base: 60 }]);
    expect(result.comparisons[0].z).toBeNull();
    expect(result.higherThan).toEqual([[], []]);
  });
});
