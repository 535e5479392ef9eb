import { describe, expect, it } from 'vitest';
import { adjustPValues, benjaminiHochberg, bonferroni, holm } from '../../src/stats/multipleTesting.js';
import { expectClose, reference } from '../helpers.js';

describe('multiple-testing adjustment', () => {
  for (const [k, item] of reference.multipleTesting.entries()) {
    it(`case ${k + 1}: BH, Holm and Bonferroni equal statsmodels multipletests (recorded)`, () => {
      benjaminiHochberg(item.p).forEach((v, i) => expectClose(v, item.bh[i], 1e-14));
      holm(item.p).forEach((v, i) => expectClose(v, item.holm[i], 1e-14));
      bonferroni(item.p).forEach((v, i) => expectClose(v, item.bonferroni[i], 1e-14));
    });
  }

  it('Holm (1979) step-down by its definition: p_(i) times (m − i + 1), made monotone', () => {
    expect(holm([0.01, 0.02, 0.03])).toEqual([0.03, 0.04, 0.04]);
  });

  it('Benjamini & Hochberg (1995) step-up by its definition: m p_(i) / i, made monotone from the top', () => {
    const adjusted = benjaminiHochberg([0.01, 0.04, 0.03, 0.2]);
    expectClose(adjusted[0], 0.04, 1e-15);
    expectClose(adjusted[1], 0.04 * 4 / 3, 1e-15);
    expectClose(adjusted[2], 0.04 * 4 / 3, 1e-15);
    expectClose(adjusted[3], 0.2, 1e-15);
  });

  it('"none" returns the p-values unchanged; NaN stays NaN and is not counted', () => {
    expect(adjustPValues([0.1, 0.2], 'none')).toEqual([0.1, 0.2]);
    const withNaN = bonferroni([0.1, Number.NaN, 0.2]);
    expect(withNaN[0]).toBeCloseTo(0.2, 15);
    expect(withNaN[1]).toBeNaN();
  });
});
