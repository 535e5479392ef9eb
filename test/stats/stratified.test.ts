import { describe, expect, it } from 'vitest';
import { breslowDay, cochranMantelHaenszel, expectedCellUnderOddsRatio, mantelHaenszelOddsRatio } from '../../src/stats/stratified.js';
import { expectClose, reference } from '../helpers.js';

const admissions = reference.stratified2x2;

describe(`stratified 2×2×K: ${admissions.name}`, () => {
  it('Cochran–Mantel–Haenszel statistic equals statsmodels StratifiedTable.test_null_odds (recorded)', () => {
    const cmh = cochranMantelHaenszel(admissions.strata);
    expect(cmh?.df).toBe(1);
    expectClose(cmh?.statistic, admissions.cmh.statistic, 1e-10);
    expectClose(cmh?.pValue, admissions.cmh.pValue, 1e-9);
  });

  it('Mantel–Haenszel common odds ratio and its Robins–Breslow–Greenland interval equal statsmodels (recorded)', () => {
    const or = mantelHaenszelOddsRatio(admissions.strata);
    expectClose(or?.estimate, admissions.commonOddsRatio.estimate, 1e-12);
    expectClose(or?.lower, admissions.commonOddsRatio.lower, 1e-9);
    expectClose(or?.upper, admissions.commonOddsRatio.upper, 1e-9);
  });

  it('Breslow–Day test of homogeneous odds ratios equals statsmodels test_equal_odds(adjust=False) (recorded)', () => {
    const or = mantelHaenszelOddsRatio(admissions.strata)!;
    const bd = breslowDay(admissions.strata, or.estimate);
    expect(bd?.df).toBe(5);
    expectClose(bd?.statistic, admissions.breslowDay.statistic, 1e-9);
    expectClose(bd?.pValue, admissions.breslowDay.pValue, 1e-8);
  });

  it('the expected cell under a given odds ratio reproduces that odds ratio', () => {
    const A = expectedCellUnderOddsRatio(40, 55, 120, 2.5);
    const odds = (A * (120 - 40 - 55 + A)) / ((40 - A) * (55 - A));
    expectClose(odds, 2.5, 1e-12);
    expectClose(expectedCellUnderOddsRatio(40, 55, 120, 1), (40 * 55) / 120, 1e-14);
  });
});

describe('generalized CMH (Landis, Heyman & Koch 1978)', () => {
  for (const [k, item] of reference.generalizedCmh.entries()) {
    it(`case ${k + 1} (${item.strata.length} strata of ${item.strata[0].length}×${item.strata[0][0].length}) equals the published formula evaluated with numpy (recorded)`, () => {
      const q = cochranMantelHaenszel(item.strata);
      expect(q?.df).toBe(item.df);
      expectClose(q?.statistic, item.statistic, 1e-10);
      expectClose(q?.pValue, item.pValue, 1e-8);
    });
  }

  it('is zero when every stratum is at independence', () => {
    const t = [[10, 20, 30], [20, 40, 60]];
    const q = cochranMantelHaenszel([t, t.map((row) => row.map((v) => v * 2))]);
    expect(q?.statistic).toBeCloseTo(0, 12);
  });
});
