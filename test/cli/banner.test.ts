// tabsight banner through the command: the column tests, the Welch tests,
// the multiple-response test and the bases against values recorded with
// statsmodels, scipy and numpy (scripts/record_banner_reference.py) on the
// API schools data of the R survey package; hand-worked examples; the
// small-base rule; nets counted once; the same verdict as pair; the
// spreadsheet read back equal to the JSON.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import ExcelJS from 'exceljs';
import { restoreFormula } from '../../src/escape/spreadsheet.js';
import { describe, expect, it } from 'vitest';
import { expectClose, ROOT } from '../helpers.js';
import { run, runJson, tempFile } from './cliHelpers.js';

const API = join(ROOT, 'fixtures', 'reference', 'banner-api.csv');
const reference = JSON.parse(readFileSync(join(ROOT, 'fixtures', 'reference', 'banner-api.json'), 'utf8'));

type Report = any;

function breakColumns(report: Report, name: string): number[] {
  const b = report.breaks.find((x: any) => x.name === name);
  return Array.from({ length: b.count }, (_v, k) => b.first + k);
}

function question(report: Report, name: string) {
  const q = report.questions.find((x: any) => x.name === name);
  if (!q) throw new Error(`no question ${name}`);
  return q;
}

describe('banner column-proportion tests against statsmodels proportions_ztest (API schools, recorded)', () => {
  for (const item of reference.columnTests) {
    const weighted = item.weight !== null;
    it(`${item.question} = ${item.answer} by ${item.break}${weighted ? ', pupil-weighted on Kish effective bases' : ''}: bases, shares, z, p and marks`, async () => {
      const report = await runJson(['banner', API, '--break', item.break, '--questions', item.question, ...(weighted ? ['--weight', item.weight] : [])]);
      const q = question(report, item.question);
      const row = q.rows.find((r: any) => r.label === item.answer);
      const columns = breakColumns(report, item.break);
      item.columns.forEach((ref: any, k: number) => {
        const j = columns[k];
        expect(report.columns[j].level).toBe(ref.level);
        expect(q.bases[j].unweighted).toBe(ref.unweightedBase);
        expectClose(q.bases[j].weighted, ref.base, 1e-12);
        expectClose(q.bases[j].effective, ref.effectiveBase, 1e-12);
        expectClose(row.cells[j].count, ref.count, 1e-12);
        expectClose(row.cells[j].columnPercent, 100 * ref.share, 1e-12);
      });
      expect(row.comparisons).toHaveLength(item.pairs.length);
      item.pairs.forEach((pair: any, x: number) => {
        const c = row.comparisons[x];
        expect([c.first, c.second]).toEqual([columns[pair.a], columns[pair.b]]);
        expectClose(c.statistic, pair.z, 1e-10);
        expectClose(c.pValue, pair.pValue, 1e-10);
        // the mark: the higher column carries the key of the lower one when p < 0.05 (95 % confidence, no adjustment)
        const [high, low] = pair.z > 0 ? [columns[pair.a], columns[pair.b]] : [columns[pair.b], columns[pair.a]];
        const marked = row.cells[high].higherThan.some((m: any) => m.column === low);
        expect(marked).toBe(pair.pValue < 0.05);
      });
    });
  }

  it('hand-worked: 45 of 100 against 30 of 100 gives z = 0.15/√(0.375·0.625·0.02) = 2.1909, p = 0.0285: A is marked higher than B', async () => {
    const rows = ['group,answer'];
    for (let i = 0; i < 100; i++) rows.push(`first,${i < 45 ? 'yes' : 'no'}`);
    for (let i = 0; i < 100; i++) rows.push(`second,${i < 30 ? 'yes' : 'no'}`);
    const report = await runJson(['banner', '-', '--break', 'group'], rows.join('\n') + '\n');
    const yes = question(report, 'answer').rows.find((r: any) => r.label === 'yes');
    expectClose(yes.comparisons[0].statistic, 0.15 / Math.sqrt(0.375 * 0.625 * 0.02), 1e-13);
    expect(yes.cells[1].marks).toBe('B');
    expect(yes.cells[2].marks).toBe('');
    expect(yes.cells[0].marks).toBe(''); // the Total is never tested against its own columns
  });

  it('two confidence levels: 42 of 100 against 30 of 100 (p = 0.0771) is marked in lower case at 90 %, not at 95 % (statsmodels proportions_ztest)', async () => {
    const rows = ['group,answer'];
    for (let i = 0; i < 100; i++) rows.push(`first,${i < 42 ? 'yes' : 'no'}`);
    for (let i = 0; i < 100; i++) rows.push(`second,${i < 30 ? 'yes' : 'no'}`);
    const data = rows.join('\n') + '\n';
    const two = await runJson(['banner', '-', '--break', 'group', '--mark-levels', '95,90'], data);
    expect(question(two, 'answer').rows.find((r: any) => r.label === 'yes').cells[1].marks).toBe('b');
    const one = await runJson(['banner', '-', '--break', 'group'], data);
    expect(question(one, 'answer').rows.find((r: any) => r.label === 'yes').cells[1].marks).toBe('');
  });

  it('Bonferroni and Holm within the row: the adjusted p-values are the row family adjusted together (Holm 1979)', async () => {
    const report = await runJson(['banner', API, '--break', 'stype', '--questions', 'sch_wide', '--column-adjust', 'holm']);
    const row = question(report, 'sch_wide').rows.find((r: any) => r.label === 'Yes');
    const ref = reference.columnTests.find((c: any) => c.question === 'sch_wide' && c.break === 'stype' && c.weight === null);
    const ps = ref.pairs.map((p: any) => p.pValue);
    const order = ps.map((_p: number, i: number) => i).sort((a: number, b: number) => ps[a] - ps[b]);
    const holm = new Array(ps.length);
    let running = 0;
    order.forEach((i: number, rank: number) => {
      running = Math.max(running, Math.min(1, (ps.length - rank) * ps[i]));
      holm[i] = running;
    });
    row.comparisons.forEach((c: any, x: number) => expectClose(c.adjustedPValue, holm[x], 1e-10));
    expect(report.settings.adjustment).toBe('holm');
  });
});

describe('banner: the small-base rule (common practice: fewer than 30 respondents shown, not tested)', () => {
  it('a column of 29 is flagged, carries no mark and is marked by no other column; --min-base moves the line', async () => {
    const rows = ['group,answer'];
    for (let i = 0; i < 29; i++) rows.push(`tiny,${i < 28 ? 'yes' : 'no'}`);
    for (let i = 0; i < 100; i++) rows.push(`large,${i < 20 ? 'yes' : 'no'}`);
    const data = rows.join('\n') + '\n';
    const report = await runJson(['banner', '-', '--break', 'group'], data);
    const q = question(report, 'answer');
    const tiny = report.columns.findIndex((c: any) => c.level === 'tiny');
    expect(q.bases[tiny].small).toBe(true);
    expect(q.tests[0].untested).toEqual([report.columns[tiny].key]);
    for (const row of q.rows) {
      expect(row.comparisons).toEqual([]);
      expect(row.cells.every((c: any) => c.marks === '')).toBe(true);
    }
    const lowered = await runJson(['banner', '-', '--break', 'group', '--min-base', '20'], data);
    const yes = question(lowered, 'answer').rows.find((r: any) => r.label === 'yes');
    expect(yes.cells[tiny].marks).not.toBe('');
    const text = await run(['banner', '-', '--break', 'group'], data);
    expect(text.stdout).toMatch(/29 !/);
  });
});

describe("banner means: Welch's t against scipy ttest_ind_from_stats(equal_var=False) (API 2000 score by school type, recorded)", () => {
  for (const item of reference.welch) {
    const weighted = item.weight !== null;
    it(`api00 by ${item.break}${weighted ? ', pupil-weighted (weighted mean and SD, Kish effective base)' : ''}`, async () => {
      const report = await runJson(['banner', API, '--break', item.break, '--means', 'api00', ...(weighted ? ['--weight', item.weight] : [])]);
      const q = question(report, 'api00');
      expect(q.kind).toBe('numeric');
      const columns = breakColumns(report, item.break);
      item.groups.forEach((g: any, k: number) => {
        const m = q.means[columns[k]];
        expectClose(m.mean, g.mean, 1e-12);
        expectClose(m.sd, g.sd, 1e-11);
        expectClose(m.effective, g.n, 1e-12);
      });
      item.pairs.forEach((pair: any, x: number) => {
        const c = q.meanComparisons[x];
        expect([c.first, c.second]).toEqual([columns[pair.a], columns[pair.b]]);
        expectClose(c.statistic, pair.t, 1e-10);
        expectClose(c.pValue, pair.pValue, 1e-10);
      });
    });
  }
});

describe('banner multiple-response questions: Bilder, Loughin & Nettleton (2000) against a numpy evaluation of Appendix A (recorded)', () => {
  for (const item of reference.multiple) {
    // With the pupil weight: the rule tabsight states (each respondent counts w·n_eff/Σw), evaluated by numpy's
    // weighted average and covariance; the rule is common practice, not a published test (README, banner).
    const weight = item.weight ? ['--weight', item.weight] : [];
    it(`four yes/no programmes by ${item.break}${item.weight ? `, weighted by ${item.weight}` : ''}: the set of columns and the ';'-separated column give the recorded X²_S and both referrals`, async () => {
      const report = await runJson(['banner', API, '--break', item.break, '--multi', 'programmes_set:sch_wide,comp_imp,awards,yr_rnd', '--multi-split', 'programmes:;', '--questions', 'programmes', ...weight]);
      for (const name of ['programmes_set', 'programmes']) {
        const q = question(report, name);
        expect(q.kind).toBe('multiple');
        expect(q.bases[0].unweighted).toBe(200); // bases are respondents, a school with no programme included
        const a = q.tests[0].association;
        expect(a.kind).toBe('multiple-response');
        expectClose(a.statistic, item.statistic, 1e-12);
        expect(a.df).toBe(item.df);
        expectClose(a.multipleResponse.firstOrder.statistic, item.firstOrder.statistic, 1e-10);
        expectClose(a.multipleResponse.firstOrder.pValue, item.firstOrder.pValue, 1e-9);
        expectClose(a.multipleResponse.secondOrder.statistic, item.secondOrder.statistic, 1e-10);
        expectClose(a.multipleResponse.secondOrder.df, item.secondOrder.df, 1e-10);
        expectClose(a.multipleResponse.secondOrder.pValue, item.secondOrder.pValue, 1e-9);
        expect(a.multipleResponse.referral).toBe('second-order');
        expect(a.pValue).toBe(a.multipleResponse.secondOrder.pValue);
      }
      const first = await runJson(['banner', API, '--break', item.break, '--multi-split', 'programmes:;', '--questions', 'programmes', '--multi-test', 'first-order', ...weight]);
      expectClose(question(first, 'programmes').tests[0].association.pValue, item.firstOrder.pValue, 1e-9);
    });
  }

  it('percentages of respondents: each answer over the respondents who answered, so answers add to more than 100% (hand count)', async () => {
    const data = 'region,svc_bus,svc_train,svc_bike\nnorth,1,1,0\nnorth,1,0,0\nnorth,0,0,0\nsouth,1,1,1\nsouth,,,\n';
    const report = await runJson(['banner', '-', '--break', 'region', '--multi', 'services:svc_*'], data);
    const q = question(report, 'services');
    expect(q.bases.map((b: any) => b.unweighted)).toEqual([4, 3, 1]); // the south respondent with no answer at all is outside the base
    expect(q.rows.map((r: any) => r.cells[0].count)).toEqual([3, 2, 1]);
    expect(q.rows[0].cells[0].columnPercent).toBe(75);
  });
});

describe('banner bases with weights (numpy sums of the pupil weight, Kish 1965 §11.7 effective base)', () => {
  for (const brk of ['stype', 'size_band']) {
    it(`bases of ${brk}: unweighted, Σw and (Σw)²/Σw² per column, and the Total`, async () => {
      const report = await runJson(['banner', API, '--break', brk, '--questions', 'awards', '--weight', 'pupil_weight']);
      const q = question(report, 'awards');
      const columns = breakColumns(report, brk);
      reference.bases[brk].forEach((ref: any, k: number) => {
        const b = q.bases[columns[k]];
        expect(b.unweighted).toBe(ref.unweighted);
        expectClose(b.weighted, ref.weighted, 1e-12);
        expectClose(b.effective, ref.effective, 1e-12);
      });
      const total = reference.bases[brk].reduce((s: number, r: any) => s + r.weighted, 0);
      expectClose(q.bases[0].weighted, total, 1e-12);
      expect(q.bases[0].unweighted).toBe(200);
    });
  }
});

describe('banner nets count each respondent once (common practice)', () => {
  it('a codebook net of two answers of a multiple-response column counts respondents who chose either, not the sum of the answers', async () => {
    const book = tempFile(
      'programmes-book.json',
      JSON.stringify({ codebook: 1, columns: [{ name: 'programmes', values: [{ code: 'sch_wide', label: 'school-wide target' }, { code: 'comp_imp', label: 'comparable improvement' }, { code: 'awards', label: 'awards' }, { code: 'yr_rnd', label: 'year-round' }], nets: [{ name: 'any target met', codes: ['sch_wide', 'comp_imp'] }] }] }),
    );
    const report = await runJson(['banner', API, '--break', 'stype', '--multi-split', 'programmes:;', '--questions', 'programmes', '--codebook', book]);
    const q = question(report, 'programmes');
    const net = q.rows.find((r: any) => r.kind === 'net');
    expect(net.label).toBe('any target met');
    const lines = readFileSync(API, 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
    const either = lines.filter((f) => f[3] === 'Yes' || f[4] === 'Yes').length;
    const sum = lines.filter((f) => f[3] === 'Yes').length + lines.filter((f) => f[4] === 'Yes').length;
    expect(net.cells[0].count).toBe(either);
    expect(either).toBeLessThan(sum);
    expect(q.rows.map((r: any) => r.label)).toEqual(['school-wide target', 'comparable improvement', 'awards', 'year-round', 'any target met']);
  });

  it('a rating scale (codebook: ordered, numeric codes): levels, top-2 net, mean by the codes, missing code out of the base', async () => {
    const book = tempFile(
      'rating-book.json',
      JSON.stringify({
        codebook: 1,
        columns: [{ name: 'rating', ordered: true, values: [...[1, 2, 3, 4, 5].map((c) => ({ code: String(c), label: `${c}${c === 5 ? ' (best)' : ''}` })), { code: '9', missing: "don't know" }], nets: [{ name: 'top 2', codes: ['4', '5'] }] }],
      }),
    );
    const data = 'group,rating\na,5\na,4\na,9\na,1\nb,2\nb,4\nb,4\n';
    const report = await runJson(['banner', '-', '--break', 'group', '--codebook', book, '--min-base', '1'], data);
    const q = question(report, 'rating');
    expect(q.kind).toBe('numeric');
    const top = q.rows.find((r: any) => r.label === 'top 2');
    expect(top.cells.map((c: any) => c.count)).toEqual([4, 2, 2]);
    expect(q.bases.map((b: any) => b.unweighted)).toEqual([6, 3, 3]);
    expectClose(q.means[1].mean, (5 + 4 + 1) / 3, 1e-15);
    expectClose(q.means[1].sd, Math.sqrt(((5 - 10 / 3) ** 2 + (4 - 10 / 3) ** 2 + (1 - 10 / 3) ** 2) / 2), 1e-14);
  });
});

describe('banner: the overall test of question × break is the pair record', () => {
  for (const item of reference.chiSquare) {
    it(`${item.question} × ${item.break}: Pearson X² equals scipy chi2_contingency (recorded) and the verdict equals tabsight pair's`, async () => {
      const report = await runJson(['banner', API, '--break', item.break, '--questions', item.question]);
      const a = question(report, item.question).tests[0].association;
      expectClose(a.statistic, item.statistic, 1e-10);
      expect(a.df).toBe(item.df);
      const pair = await runJson(['pair', API, '--rows', item.question, '--cols', item.break]);
      expect(a.verdict).toEqual(pair.verdict);
      expect(a.pValue).toBe(pair.verdict.pValue);
    });
  }

  it('with a codebook (labels, order, a missing code): the same levels and verdict as pair --codebook', async () => {
    const book = tempFile('api-book.json', JSON.stringify({ codebook: 1, columns: [{ name: 'stype', question: 'School type', values: [{ code: 'E', label: 'elementary' }, { code: 'M', label: 'middle' }, { code: 'H', missing: 'not asked' }] }] }));
    const report = await runJson(['banner', API, '--break', 'stype', '--questions', 'awards', '--codebook', book]);
    const pair = await runJson(['pair', API, '--rows', 'awards', '--cols', 'stype', '--codebook', book]);
    expect(report.columns.slice(1).map((c: any) => c.level)).toEqual(pair.cols.levels);
    expect(report.breaks[0].title).toBe('School type');
    expect(question(report, 'awards').tests[0].association.verdict).toEqual(pair.verdict);
  });

  it('weighted: the same verdict as pair --weight', async () => {
    const report = await runJson(['banner', API, '--break', 'stype', '--questions', 'awards', '--weight', 'pupil_weight']);
    const pair = await runJson(['pair', API, '--rows', 'awards', '--cols', 'stype', '--weight', 'pupil_weight']);
    expect(question(report, 'awards').tests[0].association.verdict).toEqual(pair.verdict);
  });
});

describe('banner spreadsheet (exceljs read back)', () => {
  it('the Banner sheet holds the numbers of the JSON (percentages as numbers formatted %, bases, means), keys in their own cells, frozen headers; a Notes sheet', async () => {
    const file = tempFile('banner.xlsx', '');
    const args = ['banner', API, '--break', 'stype,size_band', '--questions', 'sch_wide,awards', '--means', 'api00', '--multi-split', 'programmes:;', '--weight', 'pupil_weight', '--cells', 'col,count'];
    const written = await run([...args, '--output', file]);
    expect(written.status).toBe(0);
    const report = await runJson(args);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.readFile(file);
    expect(workbook.worksheets.map((s) => s.name)).toEqual(['Banner', 'Notes']);
    const banner = workbook.getWorksheet('Banner')!;
    expect(banner.views[0]).toMatchObject({ state: 'frozen', xSplit: 1, ySplit: 3 });
    expect(banner.getRow(3).getCell(4).value).toBe('(A)');
    // Walk the sheet as the record lays it out: heading, rows (column % then count), means, base, weighted base, tests.
    let line = 4;
    const value = (col: number) => banner.getRow(line).getCell(col);
    for (const q of report.questions) {
      expect(String(value(1).value)).toContain(q.name);
      line++;
      for (const row of q.rows) {
        expect(value(1).value).toBe(row.kind === 'net' ? `net: ${row.label}` : row.label);
        row.cells.forEach((cell: any, j: number) => {
          expect(value(2 + 2 * j).value).toBe(cell.columnPercent / 100);
          expect(value(2 + 2 * j).numFmt).toBe('0%');
          expect(value(3 + 2 * j).value ?? '').toBe(cell.marks);
        });
        line++;
        row.cells.forEach((cell: any, j: number) => expect(value(2 + 2 * j).value).toBe(cell.count));
        line++;
      }
      if (q.means) {
        q.means.forEach((m: any, j: number) => {
          expect(value(2 + 2 * j).value).toBe(m.mean);
          expect(value(3 + 2 * j).value ?? '').toBe(m.marks);
        });
        line++;
        q.means.forEach((m: any, j: number) => expect(value(2 + 2 * j).value).toBe(m.sd));
        line++;
      }
      expect(value(1).value).toMatch(/^base/);
      q.bases.forEach((b: any, j: number) => expect(value(2 + 2 * j).value).toBe(b.unweighted));
      line++;
      q.bases.forEach((b: any, j: number) => expect(value(2 + 2 * j).value).toBe(b.weighted));
      line += 1 + q.tests.length + 1;
    }
    const notes = workbook.getWorksheet('Notes')!;
    const noteText = notes.getSheetValues().map((v: any) => (v ? v.slice(1).join(' ') : '')).join('\n');
    expect(noteText).toContain('input file');
    expect(noteText).toContain(API);
    expect(noteText).toMatch(/Kish/);
  });

  it('a level that looks like a formula stays text (never a formula cell)', async () => {
    const file = tempFile('formula.xlsx', '');
    const rows = ['group,answer'];
    for (let i = 0; i < 40; i++) rows.push(`${i % 2 ? '"=HYPERLINK(""http://x"")"' : 'plain'},${i % 3 ? '+1+2' : '@SUM(A1)'}`);
    const status = await run(['banner', '-', '--break', 'group', '--output', file], rows.join('\n') + '\n');
    expect(status.status).toBe(0);
    const workbook = new ExcelJS.Workbook();
    await workbook.xlsx.readFile(file);
    let cells = 0;
    for (const sheet of workbook.worksheets)
      sheet.eachRow((r) =>
        r.eachCell((c) => {
          cells++;
          expect(c.type).not.toBe(ExcelJS.ValueType.Formula);
          expect(c.formula).toBeUndefined();
        }),
      );
    expect(cells).toBeGreaterThan(20);
    // neutralised as the CSV output is (OWASP CSV injection advice: a leading apostrophe), and restored exactly
    const banner = workbook.getWorksheet('Banner')!;
    const levels = (banner.getRow(2).values as any[]).filter((v) => typeof v === 'string');
    expect(levels).toContain('\'=HYPERLINK("http://x")');
    expect(levels.map(restoreFormula)).toContain('=HYPERLINK("http://x")');
  });
});

describe('banner: usage and data errors are one line', () => {
  it('an unknown break column names the closest', async () => {
    const r = await run(['banner', API, '--break', 'stipe']);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/--break "stipe"/);
  });
  it('a multiple-response column with a value that is neither chosen nor not chosen', async () => {
    const r = await run(['banner', '-', '--break', 'g', '--multi', 's:s_*'], 'g,s_a,s_b\nx,1,maybe\n');
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/s_b.*"maybe"/);
  });
  it('--mark-levels takes one or two levels', async () => {
    const r = await run(['banner', API, '--break', 'stype', '--mark-levels', '95,90,80']);
    expect(r.status).toBe(2);
  });
});

describe('pair with a multiple-response --rows', () => {
  it('pair --rows SET --multi … gives the banner of that set by --cols: the same Bilder–Loughin test as banner (recorded numpy value)', async () => {
    const item = reference.multiple.find((m: any) => m.break === 'stype');
    const report = await runJson(['pair', API, '--rows', 'prog', '--cols', 'stype', '--multi', 'prog:sch_wide,comp_imp,awards,yr_rnd']);
    expect(report.command).toBe('banner');
    expect(report.questions).toHaveLength(1);
    const a = report.questions[0].tests[0].association;
    expectClose(a.statistic, item.statistic, 1e-12);
    expectClose(a.pValue, item.secondOrder.pValue, 1e-9);
    const exit = await run(['pair', API, '--rows', 'prog', '--cols', 'stype', '--multi', 'prog:sch_wide,comp_imp,awards,yr_rnd', '--exit-status']);
    expect(exit.status).toBe(0);
  });

  it('--rows that names no set given is a usage error', async () => {
    const r = await run(['pair', API, '--rows', 'stype', '--cols', 'size_band', '--multi', 'prog:sch_wide,awards']);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/not a multiple-response set/);
  });
});
