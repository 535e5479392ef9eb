import { describe, expect, it } from 'vitest';
import { likelihoodRatioChiSquare, pearsonChiSquare, yatesChiSquare } from '../../src/stats/chiSquareTests.js';
import { degreesOfFreedom, expectedCounts } from '../../src/stats/contingency.js';
import { expectedCountRule } from '../../src/stats/expectedCountRule.js';
import { adjustedResiduals, pearsonResiduals } from '../../src/stats/residuals.js';
import { edges, expectClose, expectMatrixClose, reference } from '../helpers.js';

const party = [
  [762, 327, 468],
  [484, 239, 477],
];

describe('party identification by gender (a General Social Survey table; references recorded from the definitions)', () => {
  const recorded = edges.tables.find((t) => t.name.startsWith('party identification by gender'))!;

  it('X², G² and their p-values equal the exact rational / 80-digit values (scripts/record_edges.py), and X² ≈ 30.07 on df 2', () => {
    const x2 = pearsonChiSquare(party);
    const g2 = likelihoodRatioChiSquare(party);
    expect(x2.df).toBe(2);
    const pearson = recorded.pearson as { statistic: number; pValue: number };
    const lr = recorded.likelihoodRatio as { statistic: number; pValue: number };
    expectClose(x2.statistic, pearson.statistic, 1e-12);
    expectClose(x2.pValue, pearson.pValue, 1e-10);
    expectClose(g2.statistic, lr.statistic, 1e-12);
    expectClose(g2.pValue, lr.pValue, 1e-10);
    expect(x2.statistic).toBeCloseTo(30.07, 2);
  });

  it("adjusted residuals (Haberman 1973) equal the 80-digit values; the second row mirrors the first", () => {
    const r = adjustedResiduals(party);
    expectMatrixClose(r, recorded.residualsAdjusted as number[][], 1e-12);
    r[0].forEach((v, j) => expectClose(r[1][j], -(v as number), 1e-12));
  });
});

describe('against scipy.stats.chi2_contingency (recorded fixture)', () => {
  for (const table of reference.tables) {
    it(`${table.name}: expected counts, X², G², p-values, df`, () => {
      const expected = expectedCounts(table.counts);
      expectMatrixClose(expected, table.expected, 1e-12);
      const x2 = pearsonChiSquare(table.counts);
      expect(x2.df).toBe(table.pearson.df);
      expectClose(x2.statistic, table.pearson.statistic, 1e-10);
      expectClose(x2.pValue, table.pearson.pValueMpmath, 1e-9);
      if (table.pearson.pValue > 1e-290) expectClose(x2.pValue, table.pearson.pValue, 1e-8);
      const g2 = likelihoodRatioChiSquare(table.counts);
      expectClose(g2.statistic, table.likelihoodRatio.statistic, 1e-10);
      expectClose(g2.pValue, table.likelihoodRatio.pValue, 1e-8);
      if (table.yates) {
        const y = yatesChiSquare(table.counts);
        expectClose(y?.statistic, table.yates.statistic, 1e-10);
        expectClose(y?.pValue, table.yates.pValue, 1e-8);
      } else {
        expect(yatesChiSquare(table.counts)).toBeNull();
      }
    });
  }
});

describe('definitions', () => {
  it('a table with independence built in (outer product of margins) gives X² = 0 and G² = 0', () => {
    const rows = [10, 20, 30];
    const cols = [4, 6];
    const t = rows.map((r) => cols.map((c) => (r * c) / 10));
    expectClose(pearsonChiSquare(t).statistic, 0, 1e-12);
    expect(Math.abs(likelihoodRatioChiSquare(t).statistic)).toBeLessThan(1e-12);
    expect(pearsonChiSquare(t).pValue).toBe(1);
  });

  it('G² treats 0·log 0 as 0 (a zero cell adds nothing)', () => {
    const g = likelihoodRatioChiSquare([
      [0, 10],
      [10, 0],
    ]);
    expectClose(g.statistic, 2 * 20 * Math.log(2), 1e-12);
  });

  it('Yates correction is capped at |n − E| (scipy behaviour): a table at independence keeps X² = 0', () => {
    const y = yatesChiSquare([
      [5, 5],
      [5, 5],
    ]);
    expect(y?.statistic).toBe(0);
    expect(y?.pValue).toBe(1);
  });

  it('df = (r − 1)(c − 1)', () => {
    expect(degreesOfFreedom([[1, 2, 3], [4, 5, 6], [7, 8, 9], [1, 1, 1]])).toBe(6);
  });

  it('Pearson residuals square-sum to X²', () => {
    const sum = pearsonResiduals(party).flat().reduce((s, v) => s + v * v, 0);
    expectClose(sum, pearsonChiSquare(party).statistic, 1e-12);
  });
});

describe("expected-count rule (Cochran 1954)", () => {
  it('fails when any expected count is below 1', () => {
    const check = expectedCountRule([
      [0.5, 10, 10],
      [10, 10, 10],
      [10, 10, 10],
    ]);
    expect(check.passes).toBe(false);
    expect(check.cellsBelowOne).toBe(1);
    expect(check.smallestExpected).toBe(0.5);
  });
  it('fails when more than 20% of cells are below 5, passes at exactly 20%', () => {
    const five = [
      [4, 10, 10, 10, 10],
      [10, 10, 10, 10, 10],
    ]; // 1 of 10 = 10%
    expect(expectedCountRule(five).passes).toBe(true);
    const twenty = [
      [4, 4, 10, 10, 10],
      [10, 10, 10, 10, 10],
    ]; // 2 of 10 = 20%
    expect(expectedCountRule(twenty).passes).toBe(true);
    const thirty = [
      [4, 4, 4, 10, 10],
      [10, 10, 10, 10, 10],
    ];
    expect(expectedCountRule(thirty).passes).toBe(false);
  });
  it('for a 2×2 table, any expected count below 5 fails (common practice)', () => {
    expect(expectedCountRule([[4.9, 10], [10, 10]]).passes).toBe(false);
    expect(expectedCountRule([[5, 10], [10, 10]]).passes).toBe(true);
  });
});
