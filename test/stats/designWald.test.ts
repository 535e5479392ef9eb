import { describe, expect, it } from 'vitest';
import { linearizedCovariance, type DesignEstimate } from '../../src/stats/designCovariance.js';
import { DesignTally } from '../../src/stats/designTally.js';
import { independentWaldTest, logOddsRatios, marginShares } from '../../src/stats/designWald.js';
import { expectClose, readReferenceFixture } from '../helpers.js';
import { readSurveyData } from './surveyFixtures.js';

// Reference: fixtures/reference/survey-commands.json, recorded by scripts/record_survey_commands.R with the
// survey package for R (Debian r-cran-survey 4.1-1-1): each half of the NHANES 2009–2010 extract (strata ≤ 82
// against the rest) as an independent sample, its cell proportions and covariance from svyby(covmat = TRUE),
// the log odds ratios checked against svycontrast, and the Wald statistics written out in the script.
interface WaldReference {
  statistic: number;
  numDf: number;
  denDf: number;
  pValue: number;
  wald: number;
  waldPValue: number;
}
const { compare } = readReferenceFixture<{
  compare: { split: { column: string; atMost: number }; rowVariable: string; colVariable: string; rowLevels: string[]; colLevels: string[]; degreesOfFreedom: number[]; proportions: { a: number[]; b: number[] }; change: WaldReference; rowShift: WaldReference; colShift: WaldReference };
}>('survey-commands.json');

/** One half of NHANES as its own sample (its strata and PSUs only), cells in the given level order. */
function half(which: 'a' | 'b', rowLevels: string[], colLevels: string[]): DesignEstimate {
  const data = readSurveyData('nhanes.csv');
  const tally = new DesignTally({ clustered: true });
  data.SDMVSTRA.forEach((stratum, k) => {
    if ((Number(stratum) <= compare.split.atMost ? 'a' : 'b') !== which) return;
    const i = rowLevels.indexOf(data[compare.rowVariable][k]);
    const j = colLevels.indexOf(data[compare.colVariable][k]);
    tally.add({ cell: i < 0 || j < 0 ? -1 : i * colLevels.length + j, weight: Number(data.WTMEC2YR[k]), stratum, cluster: data.SDMVPSU[k], line: k + 2 });
  });
  return linearizedCovariance(tally.totals, { layout: { size: rowLevels.length * colLevels.length } });
}

function expectWald(ours: ReturnType<typeof independentWaldTest>, ref: WaldReference): void {
  expect(ours).not.toBeNull();
  expectClose(ours!.wald, ref.wald, 1e-10);
  expectClose(ours!.waldPValue, ref.waldPValue, 1e-9);
  expectClose(ours!.statistic, ref.statistic, 1e-10);
  expect(ours!.numDf).toBe(ref.numDf);
  expect(ours!.denDf).toBe(ref.denDf);
  expectClose(ours!.pValue, ref.pValue, 1e-9);
}

describe('design-based Wald tests for two independent samples agree with survey for R (r-cran-survey 4.1-1-1; recorded)', () => {
  const { rowLevels, colLevels } = compare;
  const r = rowLevels.length;
  const c = colLevels.length;
  const a = half('a', rowLevels, colLevels);
  const b = half('b', rowLevels, colLevels);

  it('each half is its own design: its proportions and design df are the recorded ones', () => {
    expect([a.degreesOfFreedom, b.degreesOfFreedom]).toEqual(compare.degreesOfFreedom);
    compare.proportions.a.forEach((p, j) => expectClose(a.proportions[j], p, 1e-12));
    compare.proportions.b.forEach((p, j) => expectClose(b.proportions[j], p, 1e-12));
  });

  it('a change in the 9 log odds ratios of agecat × race: W, its χ² p-value, and the F form on 9 and 8 df', () => {
    expectWald(independentWaldTest({ ...logOddsRatios(a.proportions, r, c)!, estimate: a }, { ...logOddsRatios(b.proportions, r, c)!, estimate: b }), compare.change);
  });

  it('a shift of the row and of the column margins', () => {
    expectWald(independentWaldTest({ ...marginShares(a.proportions, r, c, 'row'), estimate: a }, { ...marginShares(b.proportions, r, c, 'row'), estimate: b }), compare.rowShift);
    expectWald(independentWaldTest({ ...marginShares(a.proportions, r, c, 'col'), estimate: a }, { ...marginShares(b.proportions, r, c, 'col'), estimate: b }), compare.colShift);
  });

  it('W does not depend on which levels the log odds ratios are taken against (levels reversed: another basis of the interaction)', () => {
    const rows = [...rowLevels].reverse();
    const cols = [...colLevels].reverse();
    const ra = half('a', rows, cols);
    const rb = half('b', rows, cols);
    const test = independentWaldTest({ ...logOddsRatios(ra.proportions, r, c)!, estimate: ra }, { ...logOddsRatios(rb.proportions, r, c)!, estimate: rb });
    expectClose(test!.wald, compare.change.wald, 1e-10);
  });

  it('an empty cell leaves the log odds ratios undefined; too few design df leave the F form null (W on χ² remains)', () => {
    expect(logOddsRatios([0.5, 0, 0.25, 0.25], 2, 2)).toBeNull();
    const few = independentWaldTest({ ...logOddsRatios(a.proportions, r, c)!, estimate: { ...a, degreesOfFreedom: 2 } }, { ...logOddsRatios(b.proportions, r, c)!, estimate: { ...b, degreesOfFreedom: 3 } });
    expect(few!.statistic).toBeNull();
    expect(few!.pValue).toBeNull();
    expectClose(few!.wald, compare.change.wald, 1e-10);
  });
});
