import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import Ajv2020 from 'ajv/dist/2020.js';
import { profileFile, ProfileOptions, roundCut, DEFAULT_PROFILE_OPTIONS } from '../../src/analysis/profile.js';
import type { InputSummary } from '../../src/analysis/report.js';
import { parseCodebook, readCodebook } from '../../src/io/codebookFile.js';
import { profileColumns } from '../../src/io/profileColumns.js';
import { inputSource } from '../../src/io/source.js';
import { codebookToCsv, codebookToJson } from '../../src/render/codebookFormat.js';
import { compareNatural } from '../../src/table/naturalOrder.js';
import { tempFile } from '../cli/cliHelpers.js';
import { ROOT } from '../helpers.js';

const ANES = join(ROOT, 'fixtures', 'anes96');
const reference = JSON.parse(readFileSync(join(ANES, 'reference.json'), 'utf8')) as { rows: number; columns: Record<string, { distinct: number; counts: Record<string, number> }> };
const validate = new Ajv2020().compile(JSON.parse(readFileSync(join(ROOT, 'docs', 'codebook.schema.json'), 'utf8')));

async function profile(path: string, options: Partial<ProfileOptions> = {}) {
  const source = inputSource(path);
  const options2 = { ...DEFAULT_PROFILE_OPTIONS, ...options };
  const tallied = await profileColumns(source, { missing: [...options2.missing], skipBadRows: false, header: true });
  return profileFile(tallied, { file: source.label } as InputSummary, options2);
}
const text = (name: string, content: string) => tempFile(name, content);

describe('profile of the 1996 ANES extract (statsmodels anes96; counts checked against pandas value_counts in fixtures/anes96/reference.json)', async () => {
  const { report, starter } = await profile(join(ANES, 'anes96.csv'), { top: 3 });
  const byName = (name: string) => report.columns.find((c) => c.name === name)!;
  it('distinct values, most frequent values and numeric summaries agree with pandas', () => {
    expect(report.rows).toBe(reference.rows);
    for (const [name, ref] of Object.entries(reference.columns)) {
      const column = byName(name);
      expect(column.distinct, name).toBe(ref.distinct);
      expect(column.distinctExact).toBe(true);
      const entries = Object.entries(ref.counts).sort((a, b) => b[1] - a[1] || compareNatural(a[0], b[0]));
      expect(column.top.map((t) => [t.value, t.rows]), name).toEqual(entries.slice(0, 3));
      const n = entries.reduce((s, [, c]) => s + c, 0);
      const values = Object.entries(ref.counts).map(([v, c]) => [Number(v), c]).sort((a, b) => a[0] - b[0]);
      const mean = values.reduce((s, [v, c]) => s + v * c, 0) / n;
      // Quartiles as order statistics at ⌈q·n⌉ (the rule of the equal-frequency bins).
      const at = (rank: number) => {
        let seen = 0;
        for (const [v, c] of values) if ((seen += c) >= rank) return v;
        return NaN;
      };
      expect(column.numeric).toEqual({ integer: true, min: values[0][0], max: values[values.length - 1][0], mean: expect.closeTo(mean, 12), quartiles: [at(Math.ceil(n / 4)), at(Math.ceil(n / 2)), at(Math.ceil((3 * n) / 4))] });
    }
  });
  it('kinds by the stated rules: whole numbers 0/1…k with none skipped look ordered; more than 11 other numbers are a measurement; two codes are categorical', () => {
    for (const name of ['PID', 'educ', 'selfLR', 'ClinLR', 'DoleLR', 'income', 'TVnews']) expect(byName(name).kind, name).toBe('ordered');
    expect(byName('age').kind).toBe('numeric');
    expect(byName('popul').kind).toBe('numeric');
    expect(byName('vote').kind).toBe('categorical');
    expect(byName('PID').order).toEqual(['0', '1', '2', '3', '4', '5', '6']);
  });
  it('the starter codebook: cut points at the rounded quintile edges of the numeric columns, codes of the coded ones, valid and read back unchanged', () => {
    const age = Object.entries(reference.columns.age.counts).map(([v, c]) => [Number(v), c]).sort((a, b) => a[0] - b[0]);
    const n = reference.rows;
    const at = (rank: number) => {
      let seen = 0;
      for (const [v, c] of age) if ((seen += c) >= rank) return v;
      return NaN;
    };
    const edges = [1, 2, 3, 4].map((i) => roundCut(at(Math.ceil((i * n) / 5) + 1)));
    const ageEntry = starter.columns.find((c) => c.name === "age")!;
    expect(ageEntry.cuts).toEqual([...new Set(edges)]);
    const pid = starter.columns.find((c) => c.name === "PID")!;
    expect(pid.ordered).toBe(true);
    expect(pid.values.map((v) => v.code)).toEqual(['0', '1', '2', '3', '4', '5', '6']);
    const json = codebookToJson(starter);
    expect(validate(JSON.parse(json))).toBe(true);
    const strip = (book: typeof starter) => book.columns.map(({ at: _a, values, missing, nets, ...rest }) => ({ ...rest, values: values.map((v) => [v.code, v.label]), missing: missing.map((m) => [m.code, m.reason]), nets }));
    expect(strip(parseCodebook(json, 'starter.json'))).toEqual(strip(starter));
    expect(strip(parseCodebook(codebookToCsv(starter), 'starter.csv'))).toEqual(strip(starter));
  });
  it('with the codebook from the published labels: labels in the profile, and a starter that keeps every published entry and adds cuts where the codebook has none', async () => {
    const published = readCodebook(join(ANES, 'codebook.json'));
    const labelled = await profile(join(ANES, 'anes96.csv'), { codebook: published, top: 2 });
    const pid = labelled.report.columns.find((c) => c.name === "PID")!;
    expect(pid.question).toBe('Party identification of respondent.');
    expect(pid.top).toEqual([
      { value: '0', label: 'Strong Democrat', rows: reference.columns.PID.counts['0'] },
      { value: '1', label: 'Weak Democrat', rows: reference.columns.PID.counts['1'] },
    ]);
    expect(pid.order).toEqual(published.columns.find((c) => c.name === "PID")!.values.map((v) => v.label));
    expect(labelled.report.warnings).toEqual([]);
    for (const entry of published.columns) {
      const kept = labelled.starter.columns.find((c) => c.name === entry.name)!;
      if (entry.values.length > 0) expect(kept.values).toEqual(entry.values);
      expect([kept.question, kept.ordered || !entry.ordered]).toEqual([entry.question, true]);
    }
    // TVnews, described by its question only, gets its codes 0–7, marked ordered (a run of whole numbers).
    const tv = labelled.starter.columns.find((c) => c.name === "TVnews")!;
    expect([tv.ordered, tv.values.map((v) => v.code)]).toEqual([true, ['0', '1', '2', '3', '4', '5', '6', '7']]);
    expect(labelled.starter.columns.find((c) => c.name === "age")!.cuts).toEqual(starter.columns.find((c) => c.name === "age")!.cuts);
  });
});

describe('profile rules on small files (the rules as stated in src/analysis/profile.ts; common practice)', () => {
  it('an identifier: distinct values in at least 90% of more than 10 rows (the rule of scan\'s screening)', async () => {
    const ids = Array.from({ length: 20 }, (_v, i) => `R${1000 + i},${i % 2 ? 'a' : 'b'}`);
    const { report } = await profile(text('ids.csv', `id,g\n${ids.join('\n')}\n`));
    expect(report.columns[0].kind).toBe('identifier');
    expect(report.columns[0].suggestions).toEqual(['looks like an identifier: --exclude id']);
  });
  it('free text: more distinct texts than the level cap, long or of several words', async () => {
    const rows = Array.from({ length: 80 }, (_v, i) => `"I liked visit number ${i} a lot",${i % 3}`);
    const { report } = await profile(text('text.csv', `comment,score\n${rows.join('\n')}\n`));
    expect(report.columns[0].kind).toBe('free-text');
  });
  it('constant and empty columns', async () => {
    const { report } = await profile(text('flat.csv', 'a,b,c\nx,,p\nx,,q\nx, ,r\n'));
    expect(report.columns.map((c) => c.kind)).toEqual(['constant', 'empty', 'categorical']);
    expect(report.columns[1].empty).toBe(3);
  });
  it('a numeric column with "NA" and "." is still numeric; the tokens are counted and the option named', async () => {
    const rows = Array.from({ length: 200 }, (_v, i) => (i % 50 === 0 ? 'NA' : i % 97 === 1 ? '.' : String(18 + ((i * 7) % 60))));
    const { report } = await profile(text('ages.csv', `age\n${rows.join('\n')}\n`));
    const age = report.columns[0];
    expect(age.kind).toBe('numeric');
    expect(age.missingLooking).toEqual([{ token: 'NA', rows: 4 }, { token: '.', rows: 3 }]);
    expect(age.suggestions[0]).toBe(`--missing NA,. treats "NA", "." as missing`);
    expect(report.notes).toEqual([`column "age" holds "NA" (4 rows), "." (3 rows), values that commonly mean missing; the column's other values are numbers, so it is read as numeric; --missing NA,. treats them as missing`]);
    const declared = await profile(text('ages2.csv', `age\n${rows.join('\n')}\n`), { missing: ['NA'] });
    expect(declared.report.columns[0].declaredMissing).toEqual([{ token: 'NA', rows: 4 }]);
    expect(declared.report.columns[0].missingLooking).toEqual([{ token: '.', rows: 3 }]);
  });
  it('range-like labels and the answers of a known scale look ordered, in their order (Vagias 2006 anchors)', async () => {
    const rows = ['65+,agree', '<18,disagree', '18-24,strongly agree', '25-64,neither agree nor disagree', '18-24,strongly disagree', '65+,agree'];
    const { report, starter } = await profile(text('scales.csv', `age,answer\n${rows.join('\n')}\n`));
    expect(report.columns.map((c) => [c.kind, c.order])).toEqual([
      ['ordered', ['<18', '18-24', '25-64', '65+']],
      ['ordered', ['strongly disagree', 'disagree', 'neither agree nor disagree', 'agree', 'strongly agree']],
    ]);
    expect(starter.columns[1].ordered).toBe(true);
    expect(starter.columns[1].values.map((v) => v.code)).toEqual(['strongly disagree', 'disagree', 'neither agree nor disagree', 'agree', 'strongly agree']);
  });
  it('more levels than --max-levels: suggests --other', async () => {
    const rows = Array.from({ length: 300 }, (_v, i) => `city${i % 60}`);
    const { report } = await profile(text('cities.csv', `city\n${rows.join('\n')}\n`));
    expect(report.columns[0].kind).toBe('categorical');
    expect(report.columns[0].suggestions).toContain('60 levels, more than --max-levels 50: --other 10 keeps the 10 most frequent');
  });
  it('missing-looking tokens become missing codes of the starter codebook', async () => {
    const { starter } = await profile(text('q.csv', 'q\nyes\nno\nN/A\nyes\n'));
    expect(starter.columns[0].values.map((v) => v.code)).toEqual(['no', 'yes']);
    expect(starter.columns[0].missing.map((m) => [m.code, m.reason])).toEqual([['N/A', 'written as "N/A"']]);
  });
  it('a codebook code nobody chose is a warning, and coded missing values are counted by reason', async () => {
    const book = parseCodebook(JSON.stringify({ codebook: 1, columns: [{ name: 'q', values: [{ code: 1, label: 'yes' }, { code: 2, label: 'no' }, { code: 8, missing: "don't know" }, { code: 9, missing: 'refused' }] }] }), 'q.json');
    const { report } = await profile(text('coded.csv', 'q\n1\n2\n8\n1\n8\n'), { codebook: book });
    expect(report.columns[0].codedMissing).toEqual([{ code: '8', reason: "don't know", rows: 2 }]);
    expect(report.columns[0].present).toBe(3);
    expect(report.warnings.map((w) => w.code)).toEqual(['code-not-seen']);
  });
});
