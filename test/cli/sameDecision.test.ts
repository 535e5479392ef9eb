// One decision per analysis, shown the same in every format (issue 13):
// each case renders one record in text, JSON, CSV, Markdown and HTML
// (test/cli/sameDecision.ts) and checks that every format carries the
// record's leading p-value, test, alpha, pass or fail, strength, sentences,
// warnings and levels, and that --exit-status follows the same decision.
// Data: the American National Election Study 1996 extract shipped by
// statsmodels (fixtures/anes96, public domain), published tables recorded in
// fixtures/reference/reference.json (each case names its source), and the
// California Academic Performance Index and NHANES survey extracts of
// fixtures/reference/survey-data (as recorded with the survey package for R).
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { reference, ROOT } from '../helpers.js';
import { expandTable, tempFile } from './cliHelpers.js';
import { expectSameBannerDecision, expectSameCompareDecision, expectSamePairDecision, expectSameScanDecision, expectSameWavesDecision } from './sameDecision.js';
import { wavesReference } from '../stats/wavesReference.js';

const ANES = join(ROOT, 'fixtures', 'anes96', 'anes96.csv');
const CODEBOOK = join(ROOT, 'fixtures', 'anes96', 'codebook.json');
const SURVEY = join(ROOT, 'fixtures', 'reference', 'survey-data');
const anes = (...args: string[]) => ['pair', ANES, '--codebook', CODEBOOK, ...args];

/** A published table of the reference fixture, one row per observation. */
function published(name: string, rowLevels: string[], colLevels: string[]): string {
  const table = reference.tables.find((t) => t.name.startsWith(name))!;
  return tempFile(`${name.replace(/\W+/g, '-')}.csv`, expandTable('a', 'b', rowLevels, colLevels, table.counts));
}

describe('pair: one decision in text, JSON, CSV, Markdown, HTML and --exit-status', () => {
  it('large counts, the chi-square test leads (ANES 1996: party identification × vote)', async () => {
    const r = await expectSamePairDecision(anes('--rows', 'PID', '--cols', 'vote'));
    expect(r.json.verdict).toMatchObject({ test: 'pearson', passes: true });
  });

  it('a p-value between 0.01 and 0.10 judged at α 0.10 and 0.01 (ANES 1996: education × vote, Pearson p 0.080)', async () => {
    const at10 = await expectSamePairDecision(anes('--rows', 'educ', '--cols', 'vote', '--alpha', '0.10'));
    expect(at10.json.verdict).toMatchObject({ alpha: 0.1, passes: true });
    const at01 = await expectSamePairDecision(anes('--rows', 'educ', '--cols', 'vote', '--alpha', '0.01'));
    expect(at01.json.verdict).toMatchObject({ alpha: 0.01, passes: false });
  });

  it('the expected-count rule fails and a simulated p-value leads (ANES 1996: self-placement × income)', async () => {
    const r = await expectSamePairDecision(anes('--rows', 'selfLR', '--cols', 'DoleLR', '--alpha', '0.01'));
    expect(r.json.verdict.test).toBe('monteCarlo');
  });

  it('sparse cells, the exact p-value leads, ordinal measures (Agresti: job satisfaction by income)', async () => {
    const file = published('job satisfaction by income', ['<5000', '5000-15000', '15000-25000', '>25000'], ['very dissatisfied', 'a little dissatisfied', 'moderately satisfied', 'very satisfied']);
    const r = await expectSamePairDecision(['pair', file, '--rows', 'a', '--cols', 'b', '--row-order', '<5000,5000-15000,15000-25000,>25000', '--col-order', 'very dissatisfied,a little dissatisfied,moderately satisfied,very satisfied', '--ordinal']);
    expect(r.json.verdict.test).toBe('fisher');
    expect(r.json.ordinal).not.toBeNull();
  });

  it('an ordinal pair in alphabetical order warns in every format (ANES 1996: education × vote, levels by code)', async () => {
    await expectSamePairDecision(['pair', ANES, '--rows', 'educ', '--cols', 'vote', '--ordinal']);
  });

  it('2×2 with the odds ratio and relative risk (Physicians\' Health Study: aspirin and myocardial infarction)', async () => {
    const file = published('aspirin', ['placebo', 'aspirin'], ['infarction', 'none']);
    const r = await expectSamePairDecision(['pair', file, '--rows', 'a', '--cols', 'b', '--row-order', 'placebo,aspirin']);
    expect(r.json.measures.oddsRatio).not.toBeNull();
  });

  it('2×2 with a zero cell: Fisher leads, half added for the odds ratio, α 0.01 (reference fixture: sparse 2×2)', async () => {
    const file = published('sparse 2x2', ['x', 'y'], ['u', 'v']);
    const r = await expectSamePairDecision(['pair', file, '--rows', 'a', '--cols', 'b', '--alpha', '0.01']);
    expect(r.json.measures.zeroCellCorrection).toBe(true);
  });

  it('Fisher\'s tea tasting at α 0.10: the exact p-value decides (Fisher 1935)', async () => {
    const file = published('tea tasting', ['milk first', 'tea first'], ['milk first', 'tea first']);
    const r = await expectSamePairDecision(['pair', file, '--rows', 'a', '--cols', 'b', '--alpha', '0.10']);
    expect(r.json.verdict).toMatchObject({ test: 'fisher', passes: false });
  });

  it('a huge sample with a trivial effect carries the large-sample caution (reference fixture: huge n, trivial effect)', async () => {
    const table = reference.tables.find((t) => t.name.startsWith('huge n'))!;
    const lines = ['a,b,n'];
    table.counts.forEach((row, i) => row.forEach((n, j) => lines.push(`r${i},c${j},${n}`)));
    const r = await expectSamePairDecision(['pair', tempFile('huge.csv', lines.join('\n')), '--rows', 'a', '--cols', 'b', '--freq', 'n']);
    expect(r.json.warnings.map((w: any) => w.code)).toContain('large-sample');
  });

  it('--by: the layered test decides (Bickel, Hammel & O\'Connell 1975: admissions by department)', async () => {
    const departments = ['A', 'B', 'C', 'D', 'E', 'F'];
    const lines = ['gender,decision,department,n'];
    reference.stratified2x2.strata.forEach((t, k) => {
      lines.push(`male,admitted,${departments[k]},${t[0][0]}`, `male,rejected,${departments[k]},${t[0][1]}`, `female,admitted,${departments[k]},${t[1][0]}`, `female,rejected,${departments[k]},${t[1][1]}`);
    });
    const file = tempFile('admissions-same-decision.csv', lines.join('\n'));
    const r = await expectSamePairDecision(['pair', file, '--rows', 'gender', '--cols', 'decision', '--row-order', 'male,female', '--by', 'department', '--freq', 'n']);
    expect(r.json.verdict.test).toBe('cmh');
  });

  it('--by on survey answers (ANES 1996: party identification × vote within education)', async () => {
    await expectSamePairDecision(anes('--rows', 'selfLR', '--cols', 'vote', '--by', 'educ'));
  });

  it('sampling weights without a design (California API, stratified sample: school type × awards, weight pw)', async () => {
    const r = await expectSamePairDecision(['pair', join(SURVEY, 'apistrat.csv'), '--rows', 'stype', '--cols', 'awards', '--weight', 'pw']);
    expect(r.json.weighted).toBe(true);
  });

  it('a survey design with strata and clusters (NHANES: high cholesterol × race, SDMVSTRA/SDMVPSU)', async () => {
    const r = await expectSamePairDecision(['pair', join(SURVEY, 'nhanes.csv'), '--rows', 'race', '--cols', 'HI_CHOL', '--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--cluster', 'SDMVPSU']);
    expect(r.json.verdict.test).toBe('designF');
  });

  it('a stratified design with its fpc (California API, stratified sample: school-wide target × awards)', async () => {
    const r = await expectSamePairDecision(['pair', join(SURVEY, 'apistrat.csv'), '--rows', 'sch.wide', '--cols', 'awards', '--weight', 'pw', '--strata', 'stype', '--fpc', 'fpc', '--alpha', '0.01']);
    expect(r.json.verdict.test).toBe('designF');
  });
});

describe('scan: one decision per pair in text, JSON, CSV, Markdown, HTML and --exit-status', () => {
  const columns = ['--columns', 'PID,vote,educ,TVnews,selfLR'];
  for (const adjust of ['bh', 'holm', 'bonferroni', 'none']) {
    it(`--adjust ${adjust}: exact and simulated p-values lead where counts are sparse (ANES 1996, five questions)`, async () => {
      const r = await expectSameScanDecision(['scan', ANES, '--codebook', CODEBOOK, ...columns, '--adjust', adjust]);
      expect(r.json.adjustment).toBe(adjust);
    });
  }

  it('α 0.10 and 0.01 (ANES 1996, five questions)', async () => {
    for (const alpha of ['0.10', '0.01']) await expectSameScanDecision(['scan', ANES, '--codebook', CODEBOOK, ...columns, '--alpha', alpha]);
  });

  it('no pair passes: --exit-status 3 (ANES 1996: TV news, education and vote)', async () => {
    const r = await expectSameScanDecision(['scan', ANES, '--columns', 'TVnews,educ,vote', '--adjust', 'bonferroni']);
    expect(r.json.pairsPassing).toBe(0);
  });

  it('--top and --by (ANES 1996, held fixed by vote)', async () => {
    await expectSameScanDecision(['scan', ANES, '--codebook', CODEBOOK, '--columns', 'PID,educ,TVnews,selfLR', '--by', 'vote', '--top', '3']);
  });

  it('sampling weights without a design, and columns left out (California API, stratified sample, weight pw)', async () => {
    const r = await expectSameScanDecision(['scan', join(SURVEY, 'apistrat.csv'), '--weight', 'pw']);
    expect(r.json.weighting).toBe('weight');
  });

  it('a survey design with strata and clusters (NHANES, SDMVSTRA/SDMVPSU)', async () => {
    const r = await expectSameScanDecision(['scan', join(SURVEY, 'nhanes.csv'), '--columns', 'HI_CHOL,race,agecat,RIAGENDR', '--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--cluster', 'SDMVPSU']);
    expect(r.json.design).not.toBeNull();
  });
});

describe('compare: one decision in text, JSON, CSV, Markdown, HTML and --exit-status', () => {
  const departments = ['A', 'B', 'C', 'D', 'E', 'F'];
  const lines = ['gender,decision,department,n'];
  reference.stratified2x2.strata.forEach((t, k) => {
    lines.push(`male,admitted,${departments[k]},${t[0][0]}`, `male,rejected,${departments[k]},${t[0][1]}`, `female,admitted,${departments[k]},${t[1][0]}`, `female,rejected,${departments[k]},${t[1][1]}`);
  });
  const admissions = tempFile('admissions-compare.csv', lines.join('\n'));
  const departmentsAB = ['compare', admissions, '--period', 'department', '--levels', 'A,B', '--rows', 'gender', '--cols', 'decision', '--freq', 'n'];

  it('no change at α 0.05, a change at α 0.10: Breslow–Day p 0.098 (Bickel, Hammel & O\'Connell 1975: departments A and B)', async () => {
    const at05 = await expectSameCompareDecision(departmentsAB);
    expect(at05.json.verdict).toMatchObject({ test: 'breslow-day', changed: false });
    const at10 = await expectSameCompareDecision([...departmentsAB, '--alpha', '0.10']);
    expect(at10.json.verdict).toMatchObject({ changed: true, alpha: 0.1 });
  });

  it('α 0.01 decides once (Bickel et al. 1975: departments A and C)', async () => {
    await expectSameCompareDecision(['compare', admissions, '--period', 'department', '--levels', 'A,C', '--rows', 'gender', '--cols', 'decision', '--freq', 'n', '--alpha', '0.01']);
  });

  it('r×c with sparse cells, exact p-values within each period (ANES 1996: education × TV news, Clinton against Dole voters)', async () => {
    await expectSameCompareDecision(['compare', ANES, '--codebook', CODEBOOK, '--period', 'vote', '--rows', 'educ', '--cols', 'selfLR', '--simulations', '2000']);
  });

  it('sampling weights without a design; no change test where a cell is empty in both periods, and a warning says why (California API, stratified sample: school-wide target × awards, year-round against not)', async () => {
    const r = await expectSameCompareDecision(['compare', join(SURVEY, 'apistrat.csv'), '--period', 'yr.rnd', '--rows', 'sch.wide', '--cols', 'awards', '--weight', 'pw']);
    expect(r.json.weighted).toBe(true);
    expect(r.json.verdict).toBeNull();
    expect(r.json.warnings.map((w: any) => w.code)).toContain('change-untestable');
  });

  it('sampling weights without a design, a change test (California API, stratified sample: school type × awards, year-round against not)', async () => {
    await expectSameCompareDecision(['compare', join(SURVEY, 'apistrat.csv'), '--period', 'yr.rnd', '--rows', 'meals3', '--cols', 'awards', '--weight', 'pw']);
  });

  it('a survey design with strata and clusters (NHANES: high cholesterol × age group, women against men)', async () => {
    const r = await expectSameCompareDecision(['compare', join(SURVEY, 'nhanes.csv'), '--period', 'RIAGENDR', '--rows', 'agecat', '--cols', 'HI_CHOL', '--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--cluster', 'SDMVPSU']);
    expect(r.json.designed).toBe(true);
  });
});

describe('waves: one decision in text, JSON, CSV, Markdown, HTML and --exit-status', () => {
  /** Counted cells of K waves as one CSV with a period column (read back with --freq count). */
  function cellsWithPeriod(name: string, waves: string[], layers: number[][][], rows: string[], cols: string[]): string {
    const lines = ['wave,r,c,count'];
    layers.forEach((t, k) => t.forEach((row, i) => row.forEach((n, j) => lines.push(`${waves[k]},${rows[i]},${cols[j]},${n}`))));
    return tempFile(name, lines.join('\n') + '\n');
  }
  const PAIR = ['--rows', 'r', '--cols', 'c', '--freq', 'count'];
  const years = wavesReference.oddsRatioTrend[1].scores.map(String);

  it(`a fading association, r×c: ${wavesReference.noThreeWay[0].name}`, async () => {
    const file = cellsWithPeriod('vocab-same-decision.csv', years, wavesReference.noThreeWay[0].layers, ['<12', '12', '13-15', '16+'], ['0-4', '5-6', '7-10']);
    const r = await expectSameWavesDecision(['waves', file, '--period', 'wave', ...PAIR]);
    expect(r.json.verdict.moved).toBe(true);
  });

  it(`a fading odds ratio, 2×2, at α 0.01: ${wavesReference.oddsRatioTrend[1].name}`, async () => {
    const item = wavesReference.oddsRatioTrend[1];
    const file = cellsWithPeriod('college-same-decision.csv', item.scores.map(String), item.strata, ['yes', 'no'], ['yes', 'no']);
    await expectSameWavesDecision(['waves', file, '--period', 'wave', ...PAIR, '--row-order', 'yes,no', '--col-order', 'yes,no', '--alpha', '0.01']);
  });

  it(`a stable association, 2×2, at α 0.10: ${wavesReference.equalOdds[0].name}`, async () => {
    const item = wavesReference.equalOdds[0];
    const levels = item.strata.map((_t, k) => String(k + 1));
    const file = cellsWithPeriod('smoking-same-decision.csv', levels, item.strata, ['exposed', 'unexposed'], ['case', 'control']);
    const r = await expectSameWavesDecision(['waves', file, '--period', 'wave', ...PAIR, '--row-order', 'exposed,unexposed', '--col-order', 'case,control', '--alpha', '0.10']);
    expect(r.json.verdict.moved).toBe(false);
  });

  it(`sparse waves, exact p-values: ${wavesReference.noThreeWay[1].name}`, async () => {
    const item = wavesReference.noThreeWay[1];
    const file = cellsWithPeriod('esoph-same-decision.csv', item.layers.map((_t, k) => String(k + 1)), item.layers, item.layers[0].map((_r, i) => `row ${i + 1}`), item.layers[0][0].map((_c, j) => `col ${j + 1}`));
    await expectSameWavesDecision(['waves', file, '--period', 'wave', ...PAIR]);
  });
});

describe('banner: one decision per question × break variable in text, JSON, CSV, Markdown, HTML, xlsx and --exit-status', () => {
  it('large counts and a simulated p-value that does not pass (ANES 1996: party identification and self-placement by vote and education)', async () => {
    const r = await expectSameBannerDecision(['banner', ANES, '--codebook', CODEBOOK, '--break', 'vote,educ', '--questions', 'PID,selfLR', '--simulations', '2000'], tempFile('anes-banner.xlsx', ''));
    expect(r.json.questions[0].tests.map((t: any) => t.association.verdict.test)).toEqual(['pearson', 'monteCarlo']);
  });

  it('α 0.01, no question passes: --exit-status 3 (ANES 1996: TV news by education)', async () => {
    await expectSameBannerDecision(['banner', ANES, '--break', 'educ', '--questions', 'TVnews', '--alpha', '0.01'], tempFile('anes-banner-none.xlsx', ''));
  });

  it('sampling weights (California API, stratified sample: school-wide target and awards by school type, weight pw)', async () => {
    await expectSameBannerDecision(['banner', join(SURVEY, 'apistrat.csv'), '--break', 'stype', '--questions', 'sch.wide,awards,meals3', '--weight', 'pw', '--alpha', '0.10'], tempFile('api-banner.xlsx', ''));
  });
});
