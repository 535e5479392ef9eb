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
      const out = await runJson(['pair', DATA, '--rows', table.rows, '--cols', table.cols, '--codebook', codebook]);
      expect(out.rows.levels).toEqual(table.rowLevels);
      expect(out.cols.levels).toEqual(table.colLevels);
      expect(out.counts).toEqual(table.counts);
      expect(out.tests.pearson.statistic).toBeCloseTo(table.pearson.statistic, 9);
      expect(out.tests.pearson.df).toBe(table.pearson.df);
      expect(out.tests.pearson.pValue / table.pearson.pValue).toBeCloseTo(1, 9);
    }
  });
  it('pair keeps question, codes and order in JSON, and two ordered columns get the ordinal measures without --ordinal', async () => {
    const out = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'educ', '--codebook', codebook]);
    expect(out.rows.question).toBe('Party identification of respondent.');
    expect(out.rows.ordered).toBe(true);
    expect(out.rows.codes).toEqual([['0'], ['1'], ['2'], ['3'], ['4'], ['5'], ['6']]);
    expect(out.settings.ordinal).toBe(true);
    expect(out.ordinal.gamma.estimate).not.toBeNull();
    const text = await run(['pair', DATA, '--rows', 'PID', '--cols', 'vote', '--codebook', codebook]);
    expect(text.stdout).toContain('PID: Party identification of respondent.');
    expect(text.stdout).toContain('Strong Democrat');
  });
  it('pair cuts age at the cut points profile chose (rounded quintile edges), labels in natural order', async () => {
    const out = await runJson(['pair', DATA, '--rows', 'age', '--cols', 'vote', '--codebook', codebook]);
    const cuts = JSON.parse(made.stdout).columns.find((c: { name: string }) => c.name === 'age').cuts as number[];
    expect(out.rows.levels).toEqual([`<${cuts[0]}`, ...cuts.slice(1).map((c, k) => `${cuts[k]}–${c - 1}`), `${cuts[cuts.length - 1]}+`]);
    expect(out.n).toBe(944);
  });
  it('scan scores every column (none skipped), labelled and in codebook order', async () => {
    const out = await runJson(['scan', DATA, '--codebook', codebook]);
    expect(out.skipped).toEqual([]);
    const pid = out.pairs.find((p: { rows: { name: string }; cols: { name: string } }) => p.rows.name === 'PID' && p.cols.name === 'vote');
    expect(pid.rows.levels).toEqual(reference.tables[0].rowLevels);
    expect(pid.tests.pearson.statistic).toBeCloseTo(reference.tables[0].pearson.statistic, 9);
  });
  it('compare, the two expected votes as periods, labelled', async () => {
    const out = await runJson(['compare', DATA, '--period', 'vote', '--rows', 'PID', '--cols', 'educ', '--codebook', codebook]);
    expect(out.before.label).toContain('Clinton');
    expect(out.after.label).toContain('Dole');
    expect(out.rows.levels[0]).toBe('Strong Democrat');
  });
});

describe('codebook round trip: profile → codebook → pair equals a manual recode (rule of docs/codebook.md)', () => {
  it('the starter codebook labels each code by itself, so pair with it equals pair on the raw file', async () => {
    const starter = tempFile('starter.json', (await run(['profile', DATA, '--format', 'codebook'])).stdout);
    const withBook = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'educ', '--codebook', starter, '--ordinal']);
    const raw = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'educ', '--ordinal']);
    expect(withBook.counts).toEqual(raw.counts);
    expect(withBook.rows.levels).toEqual(raw.rows.levels);
  });
  it('a label edited into the codebook gives the output of the same recode', async () => {
    const book = tempFile('vote.json', JSON.stringify({ codebook: 1, columns: [{ name: 'vote', values: [{ code: 0, label: 'Clinton' }, { code: 1, label: 'Dole' }] }] }));
    const labelled = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'vote', '--codebook', book]);
    const recoded = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'vote', '--recode', `vote:0=Clinton,1=Dole`]);
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
  // In codebook order, empty fields last (docs/json.md).
  const byReason = () => [
    { column: 'q', reason: "don't know", rows: count('8') },
    { column: 'q', reason: 'refused', rows: count('9') },
    { column: 'q', reason: 'empty', rows: count('') },
  ];
  it('are left out and counted by reason; unseen codes are a warning', async () => {
    const out = await runJson(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', book]);
    expect(out.excluded).toBe(count('9') + count('8') + count(''));
    expect(out.excludedBy).toEqual(byReason());
    expect(out.warnings.map((w: { code: string }) => w.code)).toContain('code-not-seen');
  });
  it('scan gives each pair the same excludedBy as pair, and each column\'s rows left out once (issue rule: as in pair)', async () => {
    const out = await runJson(['scan', data, '--codebook', book]);
    expect(out.pairs[0].excluded).toBe(count('9') + count('8') + count(''));
    expect(out.pairs[0].excludedBy).toEqual(byReason());
    expect(out.excludedBy).toEqual(byReason());
    for (const format of ['text', 'markdown', 'html', 'csv']) {
      const shown = await run(['scan', data, '--codebook', book, '--format', format]);
      expect(shown.stdout, format).toMatch(/q: 1\sdon(’|'|&#39;)t know, 2\srefused, 1\sempty/);
    }
  });
  it('compare gives each period its excludedBy, counted within the period (--period column and two files alike)', async () => {
    const periods = tempFile('coded-periods.csv', 'q,a,wave\n' + rows.map((r, i) => `${r.q},${r.a},${i < 6 ? 'w1' : 'w2'}`).join('\n') + '\n');
    const within = (from: number, to: number) => {
      const part = rows.slice(from, to);
      const n = (value: string) => part.filter((r) => r.q === value).length;
      return [
        { column: 'q', reason: "don't know", rows: n('8') },
        { column: 'q', reason: 'refused', rows: n('9') },
        { column: 'q', reason: 'empty', rows: n('') },
      ].filter((e) => e.rows > 0);
    };
    const out = await runJson(['compare', periods, '--period', 'wave', '--rows', 'q', '--cols', 'a', '--codebook', book]);
    expect(out.before.excludedBy).toEqual(within(0, 6));
    expect(out.after.excludedBy).toEqual(within(6, rows.length));
    const first = tempFile('coded-w1.csv', 'q,a\n' + rows.slice(0, 6).map((r) => `${r.q},${r.a}`).join('\n') + '\n');
    const second = tempFile('coded-w2.csv', 'q,a\n' + rows.slice(6).map((r) => `${r.q},${r.a}`).join('\n') + '\n');
    const files = await runJson(['compare', first, second, '--rows', 'q', '--cols', 'a', '--codebook', book]);
    expect(files.before.excludedBy).toEqual(within(0, 6));
    expect(files.after.excludedBy).toEqual(within(6, rows.length));
    const text = await run(['compare', periods, '--period', 'wave', '--rows', 'q', '--cols', 'a', '--codebook', book]);
    expect(text.stdout).toMatch(/q: refused +\d+ +\d+/);
  });
  it('pair shows the reasons in every format: the summary line, and one CSV line per reason', async () => {
    for (const format of ['text', 'markdown', 'html']) {
      const out = await run(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', book, '--format', format]);
      expect(out.stdout, format).toMatch(/4 left out\sfor a missing value \(q:\s+1\sdon(’|'|&#39;)t know, 2\srefused, 1\sempty\)/);
    }
    const csvOut = await run(['pair', data, '--rows', 'q', '--cols', 'a', '--codebook', book, '--format', 'csv']);
    expect(csvOut.stdout).toContain(`sample,excluded_by_rows,,,${count('9')},,,,refused\n`);
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
    expect(scan.stderr).toContain('column "age" holds "NA" (1 row), "." (1 row)');
  });
});

describe('scan: derived pairs and --bins', () => {
  // The ANES extract with one more column, a grouping of educ (1–2 no diploma, 3 high school, 4–7 college).
  const lines = readFileSync(DATA, 'utf8').trimEnd().split('\n');
  const educAt = lines[0].split('\t').indexOf("'educ'");
  const group = (code: string) => (Number(code) <= 2 ? 'no diploma' : Number(code) === 3 ? 'high school' : 'college');
  const withGroup = tempFile('anes-grouped.tsv', [lines[0] + "\t'educGroup'", ...lines.slice(1).map((l) => `${l}\t${group(l.split('\t')[educAt])}`)].join('\n') + '\n');
  it('a column that is a recoding of another is listed apart, out of the ranking and the family (Cramér 1946: V = 1 by construction)', async () => {
    const out = await runJson(['scan', withGroup, '--columns', `educ,educGroup,vote`]);
    expect(out.derived).toEqual([{ rows: 'educ', cols: 'educGroup', reason: `each level of "educ" occurs with one level of "educGroup"`, rowLevels: 7, colLevels: 3 }]);
    expect(out.pairsTested).toBe(2);
    expect(out.pairs.map((p: { cols: { name: string } }) => p.cols.name)).toEqual(['vote', 'vote']);
    const kept = await runJson(['scan', withGroup, '--columns', `educ,educGroup,vote`, '--keep-derived']);
    expect(kept.pairsTested).toBe(3);
    expect(kept.pairs[0].measures.cramersV).toBeCloseTo(1, 12);
  });
  it('pair --bins gives the same equal-frequency bins and counts as scan --bins', async () => {
    for (const [column, k] of [['TVnews', 5], ['age', 4], ['popul', 6], ['income', 3]] as const) {
      const scan = await runJson(['scan', DATA, '--bins', String(k), '--columns', `${column},vote`, '--full']);
      expect(scan.skipped).toEqual([]);
      const pair = await runJson(['pair', DATA, '--rows', column, '--cols', 'vote', '--bins', String(k)]);
      expect(pair.rows.levels).toEqual(scan.pairs[0].rows.levels);
      expect(pair.counts).toEqual(scan.pairs[0].counts);
    }
  });
  it('scan --bins k cuts every numeric column with more than k values, within --max-levels or not (distinct values: pandas nunique, fixtures/anes96/reference.json)', async () => {
    const distinct = JSON.parse(readFileSync(join(ANES, 'reference.json'), 'utf8')).columns as Record<string, { distinct: number }>;
    const plain = await runJson(['scan', DATA]);
    const tv = plain.pairs.find((p: { rows: { name: string } }) => p.rows.name === 'TVnews');
    // Without --bins, the 8 answers of TVnews are 8 nominal levels.
    expect(tv.rows.levels).toHaveLength(distinct.TVnews.distinct);
    const out = await runJson(['scan', DATA, '--bins', '5']);
    expect(out.skipped).toEqual([]);
    const levelsOf = new Map<string, string[]>();
    for (const p of out.pairs) for (const side of [p.rows, p.cols]) levelsOf.set(side.name, side.levels);
    for (const [name, { distinct: n }] of Object.entries(distinct)) {
      const levels = levelsOf.get(name) as string[];
      if (n > 5) {
        expect(levels.length, name).toBeLessThanOrEqual(5);
        expect(levels.every((l) => /^-?[\d.]+(–-?[\d.]+)?$/.test(l)), name).toBe(true);
      } else expect(levels, name).toHaveLength(n);
    }
  });
  it('a codebook\'s bins cut a column in pair, scan and compare as --bins does, without --bins (docs/codebook.md)', async () => {
    const book = tempFile('age-bins.json', JSON.stringify({ codebook: 1, columns: [{ name: 'age', bins: 4 }] }));
    const byOption = await runJson(['pair', DATA, '--rows', 'age', '--cols', 'vote', '--bins', '4']);
    const byBook = await runJson(['pair', DATA, '--rows', 'age', '--cols', 'vote', '--codebook', book]);
    expect(byBook.rows.levels).toEqual(byOption.rows.levels);
    expect(byBook.counts).toEqual(byOption.counts);
    expect(byBook.rows.ordered).toBe(true);
    const scan = await runJson(['scan', DATA, '--columns', `age,vote`, '--codebook', book, '--full']);
    expect(scan.pairs[0].rows.levels).toEqual(byOption.rows.levels);
    expect(scan.pairs[0].counts).toEqual(byOption.counts);
    const compare = await runJson(['compare', DATA, '--period', 'vote', '--rows', 'age', '--cols', 'PID', '--codebook', book]);
    expect(compare.rows.levels).toEqual(byOption.rows.levels);
  });
});

describe('a numeric column whose only non-numbers are missing-looking values (issue rule; tokens: src/table/missingLooking.ts)', () => {
  // Ages with "NA" in some rows and 99 meaning "refused" (a codebook missing code), counted independently with csv-parse below.
  const csv = 'age,g\n' + Array.from({ length: 60 }, (_v, i) => `${i % 9 === 0 ? 'NA' : i % 13 === 0 ? '99' : 18 + ((i * 17) % 63)},${i % 3 === 0 ? 'x' : 'y'}`).join('\n') + '\n';
  const data = tempFile('ages-na.csv', csv);
  const book = tempFile('ages-na.json', JSON.stringify({ codebook: 1, columns: [{ name: 'age', values: [{ code: 99, missing: 'refused' }] }] }));
  const rows = parse(csv, { columns: true }) as { age: string; g: string }[];
  const count = (value: string) => rows.filter((r) => r.age === value).length;
  it('is binned by pair and scan alike, the token kept as its own level after the bins, and the note says so', async () => {
    const pair = await run(['pair', data, '--rows', 'age', '--cols', 'g', '--bins', '4', '--codebook', book, '--format', 'json']);
    expect(pair.status).toBe(0);
    const table = JSON.parse(pair.stdout);
    expect(table.rows.levels).toHaveLength(5);
    expect(table.rows.levels[4]).toBe('NA');
    expect(table.rowTotals[4]).toBe(count('NA'));
    expect(table.excludedBy).toEqual([{ column: 'age', reason: 'refused', rows: count('99') }]);
    expect(pair.stderr).toContain(`column "age" holds "NA", a value that commonly means missing; the column's other values are numbers, cut into bins, and it is counted as a level beside the bins unless you pass --missing NA`);
    const scan = await run(['scan', data, '--bins', '4', '--codebook', book, '--format', 'json', '--full']);
    const scanned = JSON.parse(scan.stdout).pairs[0];
    expect(scanned.rows.levels).toEqual(table.rows.levels);
    expect(scanned.counts).toEqual(table.counts);
    expect(scan.stderr).toContain(`column "age" holds "NA" (${count('NA')} rows), a value that commonly means missing; the column's other values are numbers, cut into bins`);
  });
  it('without --bins scan reads it as numeric, left out with the suggestion, and the note says the column is read as numeric', async () => {
    const scan = await run(['scan', data, '--codebook', book, '--max-levels', '10', '--format', 'json']);
    const skipped = JSON.parse(scan.stdout).skipped;
    expect(skipped).toEqual([{ column: 'age', code: 'numeric', reason: expect.stringContaining('--bins 5') }]);
    expect(scan.stderr).toContain('so it is read as numeric; --missing NA treats it as missing');
  });
  it('--keep-missing keeps the refused as a level beside the bins too, after "NA"', async () => {
    const out = await runJson(['pair', data, '--rows', 'age', '--cols', 'g', '--bins', '4', '--codebook', book, '--keep-missing']);
    expect(out.rows.levels.slice(4)).toEqual(['NA', 'refused']);
    expect(out.rowTotals.slice(4)).toEqual([count('NA'), count('99')]);
    expect(out.excluded).toBe(0);
    const scan = await runJson(['scan', data, '--bins', '4', '--codebook', book, '--keep-missing', '--full']);
    expect(scan.pairs[0].rows.levels).toEqual(out.rows.levels);
    expect(scan.pairs[0].counts).toEqual(out.counts);
  });
  it('--missing NA makes the token missing: the bins are those of the numbers alone', async () => {
    const out = await runJson(['pair', data, '--rows', 'age', '--cols', 'g', '--bins', '4', '--codebook', book, '--missing', 'NA']);
    expect(out.rows.levels).toHaveLength(4);
    expect(out.excluded).toBe(count('NA') + count('99'));
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
    const out = await runJson(['pair', DATA, '--rows', 'age', '--cols', 'vote', '--other', '8']);
    expect(out.rows.levels).toEqual([...kept, 'other']);
    expect(out.rowTotals).toEqual([...kept.map((age) => ages[age]), ranked.slice(8).reduce((s, [, c]) => s + c, 0)]);
    const refused = await run(['pair', DATA, '--rows', 'age', '--cols', 'vote']);
    expect(refused.status).toBe(1);
    expect(refused.stderr).toContain('--other k');
  });
  it('scan: --other 8 rescues the same column (its levels and totals as pair\'s), where without it the column is left out', async () => {
    const ages = JSON.parse(readFileSync(join(ANES, 'reference.json'), 'utf8')).columns.age.counts as Record<string, number>;
    const ranked = Object.entries(ages).sort((x, y) => y[1] - x[1] || Number(x[0]) - Number(y[0]));
    const kept = ranked.slice(0, 8).map(([age]) => age).sort((x, y) => Number(x) - Number(y));
    const without = await runJson(['scan', DATA, '--columns', `age,vote,educ`]);
    expect(without.skipped.map((s: { column: string }) => s.column)).toEqual(['age']);
    const out = await runJson(['scan', DATA, '--columns', `age,vote,educ`, '--other', '8', '--full']);
    expect(out.skipped).toEqual([]);
    const pair = out.pairs.find((p: { rows: { name: string }; cols: { name: string } }) => p.rows.name === 'age' && p.cols.name === 'vote');
    expect(pair.rows.levels).toEqual([...kept, 'other']);
    expect(pair.rowTotals).toEqual([...kept.map((age) => ages[age]), ranked.slice(8).reduce((s, [, c]) => s + c, 0)]);
    // --other 60 would keep 61 levels, more than --max-levels 50: the column stays out, and the reason says why.
    const tooMany = await runJson(['scan', DATA, '--columns', `age,vote,educ`, '--other', '60', '--recode', `age:19=nineteen`]);
    expect(tooMany.skipped).toEqual([{ column: 'age', code: 'too-many-levels', reason: '71 distinct values, more than --max-levels 50, and --other 60 keeps 61' }]);
  });
});

describe('bins over several files (compare with two files, waves): each file would be cut at its own quantiles, so they are refused (rule of src/cli/options.ts)', () => {
  const lines = readFileSync(DATA, 'utf8').trimEnd().split('\n');
  const first = tempFile('anes-first.tsv', [lines[0], ...lines.slice(1, 400)].join('\n') + '\n');
  const second = tempFile('anes-second.tsv', [lines[0], ...lines.slice(400)].join('\n') + '\n');
  it('--bins, or a codebook\'s bins, is a usage error naming --cuts and --period; one file with --period bins both periods alike', async () => {
    const byOption = await run(['compare', first, second, '--rows', 'age', '--cols', 'vote', '--bins', '4']);
    expect(byOption.status).toBe(2);
    expect(byOption.stderr).toMatch(/^tabsight: --bins 4 would cut the two files each at its own quantiles, .*--cuts .*--period\n$/);
    const book = tempFile('age-bins-waves.json', JSON.stringify({ codebook: 1, columns: [{ name: 'age', bins: 4 }] }));
    const byBook = await run(['waves', first, second, '--rows', 'age', '--cols', 'vote', '--codebook', book]);
    expect(byBook.status).toBe(2);
    expect(byBook.stderr).toContain(`the codebook's bins for "age" would cut the wave files`);
    const together = await runJson(['compare', DATA, '--period', 'vote', '--rows', 'age', '--cols', 'PID', '--bins', '4']);
    expect(together.rows.levels).toHaveLength(4);
  });
});
