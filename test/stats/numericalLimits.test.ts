import { describe, expect, it } from 'vitest';
import { likelihoodRatioChiSquare, pearsonChiSquare } from '../../src/stats/chiSquareTests.js';
import { differenceOfProducts, twoProduct } from '../../src/numerics/errorFree.js';
import { expectClose, reference } from '../helpers.js';

describe('numerical limits against exact rational arithmetic and 60-digit mpmath (recorded)', () => {
  for (const item of reference.numericalLimits) {
    const shape = `${item.counts.length}×${item.counts[0].length}`;
    const largest = Math.max(...item.counts.flat());
    it(`${shape} table with counts up to ${largest.toExponential(1)}: X², G² and their p-values to 1e-10`, () => {
      const x2 = pearsonChiSquare(item.counts);
      const g2 = likelihoodRatioChiSquare(item.counts);
      expect(x2.df).toBe(item.df);
      expectClose(x2.statistic, item.pearson, 1e-10);
      expectClose(g2.statistic, item.likelihoodRatio, 1e-10);
      expectClose(x2.pValue, item.pearsonP, 1e-10);
      expectClose(g2.pValue, item.likelihoodRatioP, 1e-10);
    });
  }
});

describe('error-free transformations (Dekker 1971)', () => {
  it('twoProduct recovers the rounding error of a product exactly', () => {
    const [p, e] = twoProduct(1e12 + 3, 1e12 + 7);
    // (1e12+3)(1e12+7) = 1e24 + 1e13 + 21, exactly p + e
    expect(BigInt(p) + BigInt(e)).toBe(10n ** 24n + 10n ** 13n + 21n);
  });
  it('differenceOfProducts survives total cancellation', () => {
    expect(differenceOfProducts(2e12 + 1, 2e12 - 1, 2e12, 2e12)).toBe(-1);
  });
});
