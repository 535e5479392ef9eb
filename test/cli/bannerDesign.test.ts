// banner with a survey design, against values recorded from the survey
// package for R (Debian r-cran-survey 4.1-1-1) on public design data:
// fixtures/reference/banner-design-reference.json, recorded by
// scripts/record_banner_design_reference.R. Each check names the library's
// route: svyby(..., svymean, covmat = TRUE) for a column's share or mean
// and its standard error, svycontrast for the difference of two columns
// (p from Student's t on tabsight's design df), svychisq for the overall F.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { describe, expect, it } from 'vitest';
import { expectCloseLabelled as close, readReferenceFixture, ROOT } from '../helpers.js';
import { run, runJson, tempFile } from './cliHelpers.js';

const DATA = join(ROOT, 'fixtures', 'reference', 'survey-data');

interface Share {
  question: string;
  level: string;
  break?: string;
  column: string;
  estimate: number;
  standardError: number;
}
interface Mean {
  question: string;
  break?: string;
  column: string;
  estimate: number;
  standardError: number;
}
interface Difference {
  question: string;
  level?: string;
  break: string;
  first: string;
  second: string;
  difference: number;
  standardError: number;
  t: number;
  pValue: number;
}
interface Overall {
  question: string;
  break: string;
  F: number;
  ndf: number;
  ddf: number;
  pValue: number;
}
interface Case {
  name: string;
  data: string;
  args: string[];
  designDf: number;
  questions: string[];
  breaks: string[];
  means: string[];
  shares: Share[];
  differences: Difference[];
  domainMeans: Mean[];
  meanDifferences: Difference[];
  overall: Overall[];
}

const fixture = readReferenceFixture<{ cases: Case[] }>('banner-design-reference.json');
const LIBRARY = 'survey for R (r-cran-survey 4.1-1-1)';

/** A standard error: relative closeness, or both at rounding level where a share is 0 or 1 (the library's 1e-15 is our 0). */
function closeError(label: string, actual: number | null, expected: number, tolerance: number): void {
  if (Math.abs(expected) < 1e-10) expect(Math.abs(actual as number), label).toBeLessThan(1e-10);
  else close(label, actual, expected, tolerance);
}

/** The banner of a case as JSON: its questions (or its numeric questions by their means) against its breaks. */
async function banner(c: Case, numeric: boolean): Promise<any> {
  const questions = numeric ? ['--means', c.means.join(',')] : ['--questions', c.questions.join(',')];
  return runJson(['banner', join(DATA, c.data), '--break', c.breaks.join(','), ...questions, ...c.args, '--format', 'json']);
}

/** Index of a report column by break and level (the Total when break is absent). */
function columnOf(report: any, breakName: string | undefined, level: string): number {
  const j = report.columns.findIndex((col: any) => (breakName === undefined ? col.break === null : col.break === breakName && col.level === level));
  expect(j, `column ${breakName}: ${level}`).toBeGreaterThanOrEqual(0);
  return j;
}

describe(`banner with a survey design against ${LIBRARY}`, () => {
  for (const c of fixture.cases) {
    describe(c.name, () => {
      if (c.questions.length > 0) {
        it('column shares and their standard errors: svyby(~I(q == level), ~break, svymean); the Total: svymean on the question\'s rows', async () => {
          const report = await banner(c, false);
          expect(report.design.degreesOfFreedom).toBe(c.designDf);
          expect(report.settings.columnTest).toBe('design-t');
          for (const s of c.shares) {
            const q = report.questions.find((x: any) => x.name === s.question);
            const row = q.rows.find((r: any) => r.label === s.level && r.kind === 'level');
            const cell = row.cells[columnOf(report, s.break, s.column)];
            const label = `${c.name}: ${s.question}=${s.level} in ${s.break ?? 'Total'} ${s.column}`;
            close(`${label} share`, cell.columnPercent, 100 * s.estimate, 1e-10);
            closeError(`${label} standard error`, cell.standardError, 100 * s.standardError, 1e-8);
          }
        });

        it('the difference of two columns: t and p of svycontrast on svyby(..., covmat = TRUE), Student t on the design df', async () => {
          const report = await banner(c, false);
          let checked = 0;
          for (const d of c.differences) {
            const q = report.questions.find((x: any) => x.name === d.question);
            const row = q.rows.find((r: any) => r.label === d.level && r.kind === 'level');
            const first = columnOf(report, d.break, d.first);
            const second = columnOf(report, d.break, d.second);
            const comparison = row.comparisons.find((x: any) => x.first === first && x.second === second);
            const label = `${c.name}: ${d.question}=${d.level}, ${d.break} ${d.first} − ${d.second}`;
            // Columns below the minimum base (30) are not tested.
            if (q.bases[first].small || q.bases[second].small) {
              expect(comparison, label).toBeUndefined();
              continue;
            }
            close(`${label} t`, comparison.statistic, d.t, 1e-8);
            expect(comparison.df).toBe(c.designDf);
            close(`${label} p`, comparison.pValue, d.pValue, 1e-7);
            checked++;
          }
          expect(checked).toBeGreaterThan(0);
        });

        it('the overall test of each question × break: the design-based F of svychisq (Rao–Scott, second order), p on the design df', async () => {
          const report = await banner(c, false);
          for (const o of c.overall) {
            const q = report.questions.find((x: any) => x.name === o.question);
            const t = q.tests.find((x: any) => x.break === o.break);
            const label = `${c.name}: ${o.question} × ${o.break}`;
            expect(t.association.verdict.test, label).toBe('designF');
            close(`${label} F`, t.association.statistic, o.F, 1e-8);
            close(`${label} numerator df`, t.association.df, o.ndf, 1e-8);
            close(`${label} denominator df`, t.association.denominatorDf, o.ddf, 1e-8);
            close(`${label} p`, t.association.pValue, o.pValue, 1e-6);
          }
        });
      }

      if (c.means.length > 0) {
        it('means and their standard errors: svyby(~x, ~break, svymean); differences: svycontrast, Student t on the design df', async () => {
          const report = await banner(c, true);
          expect(report.settings.meanTest).toBe('design-t');
          for (const m of c.domainMeans) {
            const q = report.questions.find((x: any) => x.name === m.question);
            const cell = q.means[columnOf(report, m.break, m.column)];
            const label = `${c.name}: mean of ${m.question} in ${m.break ?? 'Total'} ${m.column}`;
            close(`${label}`, cell.mean, m.estimate, 1e-10);
            closeError(`${label} standard error`, cell.standardError, m.standardError, 1e-8);
          }
          let checked = 0;
          for (const d of c.meanDifferences) {
            const q = report.questions.find((x: any) => x.name === d.question);
            const first = columnOf(report, d.break, d.first);
            const second = columnOf(report, d.break, d.second);
            const comparison = q.meanComparisons.find((x: any) => x.first === first && x.second === second);
            const label = `${c.name}: mean of ${d.question}, ${d.break} ${d.first} − ${d.second}`;
            if (q.bases[first].small || q.bases[second].small) {
              expect(comparison, label).toBeUndefined();
              continue;
            }
            close(`${label} t`, comparison.statistic, d.t, 1e-8);
            close(`${label} p`, comparison.pValue, d.pValue, 1e-7);
            checked++;
          }
          expect(checked).toBeGreaterThan(0);
        });
      }
    });
  }
});

describe('banner with a survey design: the overall test is the pair record', () => {
  const nhanes = join(DATA, 'nhanes.csv');
  const design = ['--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--cluster', 'SDMVPSU'];
  it('HI_CHOL × race (NHANES 2009–2010, domain rows): the same verdict and design fields as pair --strata --cluster', async () => {
    const report = await runJson(['banner', nhanes, '--break', 'race', '--questions', 'HI_CHOL', ...design, '--format', 'json']);
    const pair = await runJson(['pair', nhanes, '--rows', 'HI_CHOL', '--cols', 'race', ...design, '--format', 'json']);
    const association = report.questions[0].tests[0].association;
    expect(association.verdict).toEqual(pair.verdict);
    expect(association.statistic).toBe(pair.tests.designF.statistic);
    expect(association.denominatorDf).toBe(pair.tests.designF.denDf);
    expect(association.pValue).toBe(pair.tests.designF.pValue);
    const { designEffects: _e, n: _n, effectiveSampleSize: _s, uncorrected: _u, droppedReplicates: _d, ...shared } = pair.design;
    expect(report.design).toEqual(shared);
  });

  it('the design line in every text format, and the weights-only sentence without a design', async () => {
    for (const format of ['text', 'csv', 'tsv', 'markdown', 'html']) {
      const withDesign = await run(['banner', nhanes, '--break', 'race', '--questions', 'agecat', ...design, '--format', format, '--no-color']);
      expect(withDesign.status, format).toBe(0);
      expect(withDesign.stdout, format).toMatch(/Survey design: 15 strata, 31 PSUs, 16 degrees of freedom/);
      const weightsOnly = await run(['banner', nhanes, '--break', 'race', '--questions', 'agecat', '--weight', 'WTMEC2YR', '--format', format, '--no-color']);
      expect(weightsOnly.stdout.replace(/\s+/g, ' '), format).toMatch(/which does not account for clustering or stratification/);
      expect(weightsOnly.stdout, format).not.toMatch(/Survey design:/);
    }
  });

  it('a multiple-response answer is the domain share of a 0/1 question: the same shares, standard errors and t tests (NHANES, HI_CHOL as a one-column set)', async () => {
    // Each answer of a set is a row variable of its own, chosen or not among the respondents in the base; a set
    // of the one column HI_CHOL has the base of HI_CHOL and its answer is HI_CHOL = 1.
    const lines = readFileSync(nhanes, 'utf8').trimEnd().split('\n');
    const header = lines[0].split(',');
    const at = header.indexOf('HI_CHOL');
    const file = tempFile('nhanes-multi.csv', [...lines.map((l, k) => `${l},${k === 0 ? 'chol' : l.split(',')[at]}`)].join('\n') + '\n');
    const single = await runJson(['banner', file, '--break', 'race', '--questions', 'HI_CHOL', ...design, '--format', 'json']);
    const multiple = await runJson(['banner', file, '--break', 'race', '--questions', 'HI_CHOL', '--multi', 'set:chol', ...design, '--format', 'json']);
    const level = single.questions[0].rows.find((r: any) => r.label === '1');
    const answer = multiple.questions.find((q: any) => q.name === 'set').rows[0];
    answer.cells.forEach((cell: any, j: number) => {
      close(`share of column ${j}`, cell.columnPercent, level.cells[j].columnPercent, 1e-12);
      close(`standard error of column ${j}`, cell.standardError, level.cells[j].standardError, 1e-10);
    });
    expect(answer.comparisons.length).toBe(level.comparisons.length);
    answer.comparisons.forEach((c: any, k: number) => close(`t of comparison ${k}`, c.statistic, level.comparisons[k].statistic, 1e-10));
    const set = multiple.questions.find((q: any) => q.name === 'set');
    expect(set.tests[0].association).toBeNull();
    expect(set.tests[0].reason).toMatch(/no design-based test of multiple marginal independence/);
  });

  it('the spreadsheet: the standard errors (--cells col,se), the base lines with the design effect, the mean\'s standard error, and the design on the Notes sheet, as the JSON gives them', async () => {
    const apistrat = join(DATA, 'apistrat-banner.csv');
    const args = ['banner', apistrat, '--break', 'awards', '--questions', 'meals3', '--means', 'api00', '--weight', 'pw', '--strata', 'stype', '--fpc', 'fpc', '--cells', 'col,se'];
    const file = tempFile('design.xlsx', '');
    expect((await run([...args, '--output', file])).status).toBe(0);
    const report = await runJson([...args, '--format', 'json']);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.readFile(file);
    const sheet = workbook.getWorksheet('Banner')!;
    const rowOf = (label: string, after = 1) => {
      for (let k = after; k <= sheet.rowCount; k++) if (sheet.getRow(k).getCell(1).value === label) return sheet.getRow(k);
      throw new Error(`no row "${label}"`);
    };
    const meals = report.questions.find((q: any) => q.name === 'meals3');
    const low = rowOf('low');
    const lowSe = sheet.getRow(Number(low.number) + 1);
    meals.rows.find((r: any) => r.label === 'low').cells.forEach((cell: any, j: number) => {
      expect(lowSe.getCell(2 + 2 * j).value).toBe(cell.standardError / 100);
      expect(lowSe.getCell(2 + 2 * j).numFmt).toBe('0.0%');
    });
    const effect = rowOf('design effect');
    meals.bases.forEach((b: any, j: number) => expect(effect.getCell(2 + 2 * j).value).toBe(b.designEffect));
    const api = report.questions.find((q: any) => q.name === 'api00');
    const se = rowOf('standard error of the mean');
    api.means.forEach((m: any, j: number) => expect(se.getCell(2 + 2 * j).value).toBe(m.standardError));
    const notes = workbook.getWorksheet('Notes')!;
    const design = notes.getRows(1, notes.rowCount)!.find((r) => r.getCell(1).value === 'design')!;
    expect(design.getCell(2).value).toBe(report.designNote);
    expect(report.designNote).toMatch(/^Survey design: 3 strata, 200 PSUs, 197 degrees of freedom/);
  });

  it('a stratum with a single PSU stops the banner with the one-line message (exit 1), as pair does', async () => {
    const result = await run(['banner', join(DATA, 'nhanes-lonely.csv'), '--break', 'race', '--questions', 'agecat', '--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--cluster', 'SDMVPSU']);
    expect(result.status).toBe(1);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
    expect(result.stderr).toMatch(/stratum "89" has only one PSU/);
  });

  it('replicate weights with --strata is a usage error (exit 2)', async () => {
    const result = await run(['banner', join(DATA, 'apiclus1-banner.csv'), '--break', 'stype', '--weight', 'pw', '--replicate-weights', 'repw*', '--replicate-method', 'jk1', '--strata', 'stype']);
    expect(result.status).toBe(2);
  });
});
