import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers.js';
import { run, runJson, tempFile } from './cliHelpers.js';

const ANES = join(ROOT, 'fixtures', 'anes96');
const DATA = join(ANES, 'anes96.csv');
const PUBLISHED = join(ANES, 'codebook.json');
const reference = JSON.parse(readFileSync(join(ANES, 'reference.json'), 'utf8')) as {
  tables: { rows: string; cols: string; rowLevels: string[]; colLevels: string[]; counts: number[][]; pearson: { statistic: number; df: number; pValue: number } }[];
};
const q = (name: string) => `'${name}'`;

describe('a real coded export, the 1996 ANES extract (statsmodels anes96), with a codebook made by profile from the published labels', async () => {
  // profile → codebook, with no hand editing of the data file or of the codebook
  const made = await run(['profile', DATA, '--codebook', PUBLISHED, '--format', 'codebook']);
  const codebook = tempFile('anes-codebook.json', made.stdout);
  it('profile writes the codebook (status 0)', () => {
    expect(made.status).toBe(0);
    expect(JSON.parse(made.stdout).codebook).toBe(1);
  });
  it('pair: labelled, ordered tables equal to pandas crosstab of the published labels, Pearson chi-square as scipy (fixtures/anes96/reference.json)', async () => {
    for (const table of reference.tables) {
      const out = await runJson(['pair', DATA, '--rows', q(table.rows), '--cols', q(table.cols), '--codebook', codebook]);
      expect(out.rows.levels).toEqual(table.rowLevels);
      expect(out.cols.levels).toEqual(table.colLevels);
      expect(out.counts).toEqual(table.counts);
      expect(out.tests.pearson.statistic).toBeCloseTo(table.pearson.statistic, 9);
      expect(out.tests.pearson.df).toBe(table.pearson.df);
      expect(out.tests.pearson.pValue / table.pearson.pValue).toBeCloseTo(1, 9);
    }
  });
  it('pair keeps question, codes and order in JSON, and two ordered columns get the ordinal measures without --ordinal', async () => {
    const out = await runJson(['pair', DATA, '--rows', q('PID'), '--cols', q('educ'), '--codebook', codebook]);
    expect(out.rows.question).toBe('Party identification of respondent.');
    expect(out.rows.ordered).toBe(true);
    expect(out.rows.codes).toEqual([['0'], ['1'], ['2'], ['3'], ['4'], ['5'], ['6']]);
    expect(out.settings.ordinal).toBe(true);
    expect(out.ordinal.gamma.estimate).not.toBeNull();
    const text = await run(['pair', DATA, '--rows', q('PID'), '--cols', q('vote'), '--codebook', codebook]);
    expect(text.stdout).toContain("'PID': Party identification of respondent.");
    expect(text.stdout).toContain('Strong Democrat');
  });
  it('pair cuts age at the cut points profile chose (rounded quintile edges), labels in natural order', async () => {
    const out = await runJson(['pair', DATA, '--rows', q('age'), '--cols', q('vote'), '--codebook', codebook]);
    const cuts = JSON.parse(made.stdout).columns.find((c: { name: string }) => c.name === q('age')).cuts as number[];
    expect(out.rows.levels).toEqual([`<${cuts[0]}`, ...cuts.slice(1).map((c, k) => `${cuts[k]}–${c - 1}`), `${cuts[cuts.length - 1]}+`]);
    expect(out.n).toBe(944);
  });
  it('scan scores every column (none skipped), labelled and in codebook order', async () => {
    const out = await runJson(['scan', DATA, '--codebook', codebook]);
    expect(out.skipped).toEqual([]);
    const pid = out.pairs.find((p: { rows: { name: string }; cols: { name: string } }) => p.rows.name === q('PID') && p.cols.name === q('vote'));
    expect(pid.rows.levels).toEqual(reference.tables[0].rowLevels);
    expect(pid.tests.pearson.statistic).toBeCloseTo(reference.tables[0].pearson.statistic, 9);
  });
  it('compare, the two expected votes as periods, labelled', async () => {
    const out = await runJson(['compare', DATA, '--period', q('vote'), '--rows', q('PID'), '--cols', q('educ'), '--codebook', codebook]);
    expect(out.before.label).toContain('Clinton');
    expect(out.after.label).toContain('Dole');
    expect(out.rows.levels[0]).toBe('Strong Democrat');
  });
});

describe('codebook round trip: profile → codebook → pair equals a manual recode (rule of docs/codebook.md)', () => {
  it('the starter codebook labels each code by itself, so pair with it equals pair on the raw file', async () => {
    const starter = tempFile('starter.json', (await run(['profile', DATA, '--format', 'codebook'])).stdout);
    const withBook = await runJson(['pair', DATA, '--rows', q('PID'), '--cols', q('educ'), '--codebook', starter, '--ordinal']);
    const raw = await runJson(['pair', DATA, '--rows', q('PID'), '--cols', q('educ'), '--ordinal']);
    expect(withBook.counts).toEqual(raw.counts);
    expect(withBook.rows.levels).toEqual(raw.rows.levels);
  });
  it('a label edited into the codebook gives the output of the same recode', async () => {
    const book = tempFile('vote.json', JSON.stringify({ codebook: 1, columns: [{ name: q('vote'), values: [{ code: 0, label: 'Clinton' }, { code: 1, label: 'Dole' }] }] }));
    const labelled = await runJson(['pair', DATA, '--rows', q('PID'), '--cols', q('vote'), '--codebook', book]);
    const recoded = await runJson(['pair', DATA, '--rows', q('PID'), '--cols', q('vote'), '--recode', `${q('vote')}:0=Clinton,1=Dole`]);
    expect(labelled.counts).toEqual(recoded.counts);
    expect(labelled.cols.levels).toEqual(recoded.cols.levels);
    expect(labelled.cols.codes).toEqual([['0'], ['1']]);
  });
});

describe('missing codes with their reasons (docs/codebook.md), checked against an independent count of the file (csv-parse)', () => {
  const csv = 'q,a\n1,x\n2,y\n9,x\n,y\n1,y\n2,x\n8,x\n1,x\n2,y\n9,y\n1,x\n2,x\n';
  const data = tempFile('coded.csv', csv);
  const book = tempFile('coded.json', JSON.stringify({ codebook: 1, columns: [{ name: 'q', question: 'Do you agree?', values: [{ code: 1, label: 'yes' }, { code: 2, label: 'no' }, { code: 3, label: 'maybe' }, { code: 8, missing: "don't know" }, { code: 9, missing: 'refused', label: 'refused to say' }] }] }));
  const rows = parse(csv, { columns: true }) as { q: string; a: string }[];
  const count = (value: string) => rows.filter((r) => r.q === value).length;
  it('are left out and counted by reason; unseen codes are a warning', async () => {
    const out = await runJson(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', book]);
    expect(out.excluded).toBe(count('9') + count('8') + count(''));
    expect(out.excludedBy).toEqual([
      { column: 'q', reason: 'refused', rows: count('9') },
      { column: 'q', reason: 'empty', rows: count('') },
      { column: 'q', reason: "don't know", rows: count('8') },
    ]);
    expect(out.warnings.map((w: { code: string }) => w.code)).toContain('code-not-seen');
  });
  it('--keep-missing keeps them as levels, after the answers, under their labels', async () => {
    const out = await runJson(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', book, '--keep-missing']);
    expect(out.rows.levels).toEqual(['yes', 'no', "don't know", 'refused to say', '(missing)']);
    expect(out.excluded).toBe(0);
    expect(out.rowTotals).toEqual([count('1'), count('2'), count('8'), count('9'), count('')]);
  });
  it('show in every format: the question and the labels', async () => {
    for (const format of ['text', 'markdown', 'html', 'csv']) {
      const out = await run(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', book, '--format', format]);
      expect(out.status, format).toBe(0);
      expect(out.stdout, format).toContain('yes');
      if (format !== 'csv') expect(out.stdout, format).toContain('Do you agree?');
    }
  });
  it('a codebook column the file lacks is a usage error naming the entry', async () => {
    const wrong = tempFile('wrong.json', JSON.stringify({ codebook: 1, columns: [{ name: 'qq', values: [{ code: 1, label: 'yes' }] }] }));
    const out = await run(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', wrong]);
    expect(out.status).toBe(2);
    expect(out.stderr).toMatch(/wrong\.json at \/columns\/0: column "qq" is not in .*coded\.csv; did you mean "q"\?/);
  });
});

describe('range recodes and cut points in pair (rules of src/table/rangeRecode.ts and bins.ts)', () => {
  const ages = [17, 18, 30, 64, 65, 80, 12, 40, 70, 25];
  const data = tempFile('ages.csv', 'age,g\n' + ages.map((a, i) => `${a},${i % 2 ? 'x' : 'y'}`).join('\n') + '\n');
  it('--recode with ranges gives the labels in range order', async () => {
    const out = await runJson(['pair', data, '--rows', 'age', '--cols', 'g', '--recode', 'age:<18=minor,18-64=adult,>=65=senior']);
    expect(out.rows.levels).toEqual(['minor', 'adult', 'senior']);
    expect(out.rowTotals).toEqual([ages.filter((a) => a < 18).length, ages.filter((a) => a >= 18 && a <= 64).length, ages.filter((a) => a >= 65).length]);
  });
  it('--cuts cuts at the edges, closed on the left', async () => {
    const out = await runJson(['pair', data, '--rows', 'age', '--cols', 'g', '--cuts', 'age:18,65']);
    expect(out.rows.levels).toEqual(['<18', '18–64', '65+']);
    expect(out.rowTotals).toEqual([2, 5, 3]);
  });
});

describe('tabsight profile on the command line', () => {
  it('text, json, markdown and both codebook forms', async () => {
    for (const format of ['text', 'json', 'markdown', 'codebook', 'codebook-csv']) {
      const out = await run(['profile', DATA, '--format', format]);
      expect(out.status, format).toBe(0);
      expect(out.stdout, format).toContain('PID');
    }
    const json = await runJson(['profile', DATA]);
    expect(json.command).toBe('profile');
    expect(json.columns).toHaveLength(10);
  });
});

describe('the missing-token note (list and sources in src/io/missingTokens.ts)', () => {
  const data = tempFile('na.csv', 'age,g\n34,x\nNA,y\n51,x\n.,y\n40,x\n61,y\n');
  it('pair names the column, the tokens and the option, once, on standard error; the tokens stay levels', async () => {
    const out = await run(['pair', data, '--rows', 'age', '--cols', 'g', '--format', 'json']);
    expect(out.status).toBe(0);
    expect(out.stderr).toBe(`tabsight: note: column "age" holds "NA", ".", values that commonly mean missing; counted as levels unless you pass --missing NA,.\n`);
    expect(JSON.parse(out.stdout).rows.levels).toContain('NA');
  });
  it('no note once the option is given, and scan notes the same column', async () => {
    const quiet = await run(['pair', data, '--rows', 'age', '--cols', 'g', '--missing', 'NA,.', '--format', 'json']);
    expect(quiet.stderr).toBe('');
    const scan = await run(['scan', data, '--format', 'json']);
    expect(scan.stderr).toContain('column "age" holds "NA", "."');
  });
});

describe('scan: derived pairs and --bins', () => {
  // The ANES extract with one more column, a grouping of educ (1–2 no diploma, 3 high school, 4–7 college).
  const lines = readFileSync(DATA, 'utf8').trimEnd().split('\n');
  const educAt = lines[0].split('\t').indexOf(q('educ'));
  const group = (code: string) => (Number(code) <= 2 ? 'no diploma' : Number(code) === 3 ? 'high school' : 'college');
  const withGroup = tempFile('anes-grouped.tsv', [lines[0] + '\teducGroup', ...lines.slice(1).map((l) => `${l}\t${group(l.split('\t')[educAt])}`)].join('\n') + '\n');
  it('a column that is a recoding of another is listed apart, out of the ranking and the family (Cramér 1946: V = 1 by construction)', async () => {
    const out = await runJson(['scan', withGroup, '--columns', `${q('educ')},educGroup,${q('vote')}`]);
    expect(out.derived).toEqual([{ rows: q('educ'), cols: 'educGroup', reason: `each level of "${q('educ')}" occurs with one level of "educGroup"`, rowLevels: 7, colLevels: 3 }]);
    expect(out.pairsTested).toBe(2);
    expect(out.pairs.map((p: { cols: { name: string } }) => p.cols.name)).toEqual([q('vote'), q('vote')]);
    const kept = await runJson(['scan', withGroup, '--columns', `${q('educ')},educGroup,${q('vote')}`, '--keep-derived']);
    expect(kept.pairsTested).toBe(3);
    expect(kept.pairs[0].measures.cramersV).toBeCloseTo(1, 12);
  });
  it('pair --bins gives the same equal-frequency bins and counts as scan --bins', async () => {
    for (const [column, k] of [[q('TVnews'), 5], [q('age'), 4], [q('popul'), 6]] as const) {
      const scan = await runJson(['scan', DATA, '--bins', String(k), '--columns', `${column},${q('vote')}`, '--full', '--max-levels', '5']);
      expect(scan.skipped).toEqual([]);
      const pair = await runJson(['pair', DATA, '--rows', column, '--cols', q('vote'), '--bins', String(k)]);
      expect(pair.rows.levels).toEqual(scan.pairs[0].rows.levels);
      expect(pair.counts).toEqual(scan.pairs[0].counts);
    }
  });
});

describe('count | merge | pair --freq keeps the rows left out (issue rule: the same excluded as the direct run)', () => {
  const csv = 'q,a\n1,x\n2,y\n9,x\n,y\n1,y\n2,x\n8,x\n1,x\n2,y\n9,y\n1,x\n2,\n';
  const data = tempFile('coded-count.csv', csv);
  const book = tempFile('coded-count.json', JSON.stringify({ codebook: 1, columns: [{ name: 'q', values: [{ code: 1, label: 'yes' }, { code: 2, label: 'no' }, { code: 8, missing: "don't know" }, { code: 9, missing: 'refused' }] }] }));
  it('with empty fields and codebook missing codes, through a count file and a merge of two', async () => {
    const direct = await runJson(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', book]);
    const counts = await run(['count', data, '--rows', 'q', '--cols', 'a', '--codebook', book]);
    expect(counts.status).toBe(0);
    const once = await runJson(['pair', tempFile('counts.csv', counts.stdout), '--rows', 'q', '--cols', 'a', '--freq', 'count', '--codebook', book]);
    expect(once.excluded).toBe(direct.excluded);
    const byReason = (list: { column: string; reason: string; rows: number }[]) => [...list].sort((x, y) => `${x.column} ${x.reason}`.localeCompare(`${y.column} ${y.reason}`));
    expect(byReason(once.excludedBy)).toEqual(byReason(direct.excludedBy));
    expect(once.counts).toEqual(direct.counts);
    const merged = await run(['merge', tempFile('c1.csv', counts.stdout), tempFile('c2.csv', counts.stdout)]);
    const twice = await runJson(['pair', tempFile('merged.csv', merged.stdout), '--rows', 'q', '--cols', 'a', '--freq', 'count', '--codebook', book]);
    expect(twice.excluded).toBe(2 * direct.excluded);
    expect(twice.n).toBe(2 * direct.n);
  });
});

describe('--other is applied before the level cap (issue rule), counts checked against pandas value_counts of the ANES ages', () => {
  it('a column with 71 ages (more than --max-levels 50) is rescued by --other 8', async () => {
    const ages = JSON.parse(readFileSync(join(ANES, 'reference.json'), 'utf8')).columns.age.counts as Record<string, number>;
    const ranked = Object.entries(ages).sort((x, y) => y[1] - x[1] || Number(x[0]) - Number(y[0]));
    const kept = ranked.slice(0, 8).map(([age]) => age).sort((x, y) => Number(x) - Number(y));
    const out = await runJson(['pair', DATA, '--rows', q('age'), '--cols', q('vote'), '--other', '8']);
    expect(out.rows.levels).toEqual([...kept, 'other']);
    expect(out.rowTotals).toEqual([...kept.map((age) => ages[age]), ranked.slice(8).reduce((s, [, c]) => s + c, 0)]);
    const refused = await run(['pair', DATA, '--rows', q('age'), '--cols', q('vote')]);
    expect(refused.status).toBe(1);
    expect(refused.stderr).toContain('--other k');
  });
});
