import { describe, expect, it } from 'vitest';
import { breslowDay, breslowDayResiduals, breslowDayTarone, breslowDayTrend, cochranMantelHaenszel, expectedCellUnderOddsRatio, mantelHaenszelOddsRatio } from '../../src/stats/stratified.js';
import { edges, expectClose, reference } from '../helpers.js';
import { wavesReference } from './wavesReference.js';

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

describe('equal odds ratios across K strata on real data (recorded by scripts/record_waves_reference.py)', () => {
  for (const item of wavesReference.equalOdds) {
    it(`${item.name}: Breslow–Day with and without Tarone's correction equal statsmodels StratifiedTable.test_equal_odds(adjust=False/True)`, () => {
      const common = mantelHaenszelOddsRatio(item.strata)!;
      expectClose(common.estimate, item.commonOddsRatio, 1e-12);
      const plain = breslowDay(item.strata, common.estimate)!;
      const tarone = breslowDayTarone(item.strata, common.estimate)!;
      expect(plain.df).toBe(item.strata.length - 1);
      expect(tarone.df).toBe(item.strata.length - 1);
      expectClose(plain.statistic, item.breslowDay.statistic, 1e-9);
      expectClose(plain.pValue, item.breslowDay.pValue, 1e-8);
      expectClose(tarone.statistic, item.tarone.statistic, 1e-9);
      expectClose(tarone.pValue, item.tarone.pValue, 1e-8);
      expectClose(tarone.uncorrected, plain.statistic, 1e-14);
    });
  }

  it('Breslow & Day (1980, §4.4): the Ille-et-Vilaine homogeneity statistic is 9.32 on 5 df, as published', () => {
    const item = wavesReference.equalOdds.find((x) => x.name.includes('Ille-et-Vilaine'))!;
    const bd = breslowDay(item.strata, mantelHaenszelOddsRatio(item.strata)!.estimate)!;
    expect(bd.statistic.toFixed(2)).toBe('9.32');
    expect(bd.df).toBe(5);
  });
});

describe('trend in the odds ratio over ordered strata (Breslow & Day 1980, §4.4)', () => {
  for (const item of wavesReference.oddsRatioTrend) {
    it(`${item.name}: the score test and each stratum's residual equal the published formula evaluated with numpy (recorded)`, () => {
      const theta = mantelHaenszelOddsRatio(item.strata)!.estimate;
      const trend = breslowDayTrend(item.strata, item.scores, theta)!;
      expect(trend.df).toBe(1);
      expectClose(trend.statistic, item.breslowDayTrend.statistic, 1e-9);
      expectClose(trend.pValue, item.breslowDayTrend.pValue, 1e-8);
      breslowDayResiduals(item.strata, theta).forEach((r, k) => {
        const expected = item.breslowDayTrend.residuals[k];
        if (expected === null) expect(r).toBeNull();
        else expectClose(r, expected, 1e-9);
      });
    });
  }

  it('the squared residuals add up to the Breslow–Day statistic, and the trend test ignores a shift of the scores', () => {
    const item = wavesReference.oddsRatioTrend[1];
    const theta = mantelHaenszelOddsRatio(item.strata)!.estimate;
    const residuals = breslowDayResiduals(item.strata, theta) as number[];
    expectClose(residuals.reduce((s, r) => s + r * r, 0), breslowDay(item.strata, theta)!.statistic, 1e-12);
    const years = breslowDayTrend(item.strata, item.scores, theta)!;
    const fromZero = breslowDayTrend(item.strata, item.scores.map((x) => x - 1974), theta)!;
    expectClose(years.statistic, fromZero.statistic, 1e-9);
    expect(years.direction).toBe(fromZero.direction);
  });

  it('hand-worked: odds ratios rising over the strata give a positive direction; a stratum above the common odds ratio has a positive residual', () => {
    const strata = [[[20, 20], [20, 20]], [[30, 20], [20, 30]], [[40, 20], [20, 40]]];
    const theta = mantelHaenszelOddsRatio(strata)!.estimate;
    expect(breslowDayTrend(strata, [1, 2, 3], theta)!.direction).toBe(1);
    const residuals = breslowDayResiduals(strata, theta) as number[];
    expect(residuals[0]).toBeLessThan(0);
    expect(residuals[2]).toBeGreaterThan(0);
  });
});

describe('layered tests at the numerical edges, against exact rational arithmetic (scripts/record_edges.py)', () => {
  for (const item of edges.layered) {
    it(`${item.name}: the generalized CMH statistic and p-value to 1e-10${item.commonOddsRatio === undefined ? '' : ', the common odds ratio to 1e-12 and Breslow–Day to 1e-10'}`, () => {
      const q = cochranMantelHaenszel(item.strata);
      expect(q?.df).toBe(item.df);
      expectClose(q?.statistic, item.statistic, 1e-10);
      expectClose(q?.pValue, item.pValue, 1e-10);
      if (item.commonOddsRatio !== undefined) expectClose(mantelHaenszelOddsRatio(item.strata)?.estimate, item.commonOddsRatio, 1e-12);
      if (item.breslowDay !== undefined) {
        // Breslow–Day at 80 digits with the exact common odds ratio
        const bd = breslowDay(item.strata, mantelHaenszelOddsRatio(item.strata)!.estimate);
        expect(bd?.df).toBe(item.breslowDay.df);
        expectClose(bd?.statistic, item.breslowDay.statistic, 1e-10);
        expectClose(bd?.pValue, item.breslowDay.pValue, 1e-10);
      }
    });
  }
});
