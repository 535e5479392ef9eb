import { describe, expect, it } from 'vitest';
import { GroupAnswerPattern, groupMultipleResponseTest, PairedAnswerPattern, pairedMultipleResponseTest } from '../../src/stats/multipleResponse.js';
import { pearsonChiSquare } from '../../src/stats/chiSquareTests.js';
import { expectClose } from '../helpers.js';
import { wavesReference } from './wavesReference.js';

/** Respondent rows counted into answer patterns, as a reader would. */
function groupPatterns(groups: number[], items: number[][]): GroupAnswerPattern[] {
  const map = new Map<string, GroupAnswerPattern>();
  groups.forEach((g, s) => {
    const key = `${g}|${items[s].join('')}`;
    const found = map.get(key);
    if (found) found.count++;
    else map.set(key, { group: g, answers: items[s], count: 1 });
  });
  return [...map.values()];
}

function pairedPatterns(W: number[][], Y: number[][]): PairedAnswerPattern[] {
  const map = new Map<string, PairedAnswerPattern>();
  W.forEach((w, s) => {
    const key = `${w.join('')}|${Y[s].join('')}`;
    const found = map.get(key);
    if (found) found.count++;
    else map.set(key, { first: w, second: Y[s], count: 1 });
  });
  return [...map.values()];
}

describe('multiple-response independence, Rao–Scott-type adjustments (Bilder, Loughin & Nettleton 2000; Bilder & Loughin 2004)', () => {
  const groups = wavesReference.multipleResponse.groups;
  it(`${groups.name}: X²_S, each answer's X², Σλ, Σλ², first- and second-order tests equal a numpy evaluation of Appendix A (recorded)`, () => {
    const test = groupMultipleResponseTest(groupPatterns(groups.groups, groups.items))!;
    expect(test.df).toBe(groups.df);
    expectClose(test.statistic, groups.statistic, 1e-12);
    test.answerStatistics.forEach((t, j) => {
      expectClose(t!.statistic, groups.itemStatistics[j], 1e-12);
      expectClose(t!.statistic, groups.itemStatisticsScipy[j], 1e-12);
    });
    expectClose(test.sumEigenvalues, groups.sumEigenvalues, 1e-12);
    expectClose(test.sumSquaredEigenvalues, groups.sumSquaredEigenvalues, 1e-12);
    expectClose(test.firstOrder.statistic, groups.firstOrder.statistic, 1e-12);
    expectClose(test.firstOrder.pValue, groups.firstOrder.pValue, 1e-9);
    expectClose(test.secondOrder.statistic, groups.secondOrder.statistic, 1e-12);
    expectClose(test.secondOrder.df, groups.secondOrder.df, 1e-12);
    expectClose(test.secondOrder.pValue, groups.secondOrder.pValue, 1e-9);
  });

  const pairs = wavesReference.multipleResponse.pairs;
  it(`${pairs.name}: X²_S, each pair's X², Σλ, Σλ², first- and second-order tests equal a numpy evaluation of Appendix A (recorded)`, () => {
    const test = pairedMultipleResponseTest(pairedPatterns(pairs.W, pairs.Y))!;
    expect(test.df).toBe(pairs.df);
    expectClose(test.statistic, pairs.statistic, 1e-12);
    test.pairStatistics.forEach((row, i) => row.forEach((t, j) => expectClose(t!.statistic, pairs.pairStatistics[i][j], 1e-12)));
    expectClose(test.sumEigenvalues, pairs.sumEigenvalues, 1e-12);
    expectClose(test.sumSquaredEigenvalues, pairs.sumSquaredEigenvalues, 1e-12);
    expectClose(test.firstOrder.statistic, pairs.firstOrder.statistic, 1e-12);
    expectClose(test.secondOrder.statistic, pairs.secondOrder.statistic, 1e-12);
    expectClose(test.secondOrder.df, pairs.secondOrder.df, 1e-12);
    expectClose(test.secondOrder.pValue, pairs.secondOrder.pValue, 1e-9);
  });

  it('each pair X²_ij is the Pearson X² of its 2 × 2 table (Pearson 1900)', () => {
    const test = pairedMultipleResponseTest(pairedPatterns(pairs.W, pairs.Y))!;
    const table = [[0, 0], [0, 0]];
    pairs.W.forEach((w, s) => table[1 - w[0]][1 - pairs.Y[s][1]]++);
    expectClose(test.pairStatistics[0][1]!.statistic, pearsonChiSquare(table).statistic, 1e-12);
  });

  it('with one answer X²_S is the r × 2 chi-square, and Σλ = r − 1 when every group chooses it at the same rate', () => {
    // one answer: X²_S is the Pearson X² of group × chosen; the eigenvalues of D⁻¹Σ are 1 − a_i (sum r − 1) under a common rate
    const patterns: GroupAnswerPattern[] = [
      { group: 0, answers: [1], count: 30 }, { group: 0, answers: [0], count: 70 },
      { group: 1, answers: [1], count: 60 }, { group: 1, answers: [0], count: 140 },
    ];
    const test = groupMultipleResponseTest(patterns)!;
    expect(test.df).toBe(1);
    expect(test.statistic).toBeCloseTo(0, 12);
    expectClose(test.sumEigenvalues, 1, 1e-12);
  });

  it('an answer nobody chose and an empty group are left out and listed', () => {
    const patterns: GroupAnswerPattern[] = [
      { group: 0, answers: [1, 0, 1], count: 20 }, { group: 0, answers: [0, 0, 1], count: 15 },
      { group: 2, answers: [1, 0, 0], count: 25 }, { group: 2, answers: [0, 0, 1], count: 10 },
    ];
    const test = groupMultipleResponseTest(patterns)!;
    expect(test.answersLeftOut).toEqual([1]);
    expect(test.groupsLeftOut).toEqual([1]);
    expect(test.df).toBe(2);
    expect(test.answerStatistics[1]).toBeNull();
  });
});
