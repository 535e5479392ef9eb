// Issue 15, "done when": a real coded export runs through pair, scan and
// compare (and waves and banner) with labelled, ordered output from a
// codebook made by `profile`, with no hand editing of the data file. The
// walk of the README's "A codebook for a coded export", step by step: profile
// writes the codebook's CSV form, the analyst types the labels and question
// texts of the published codebook into it (their job, docs/codebook.md), and
// every command reads it back.
//
// Sources: the 1996 ANES extract shipped by statsmodels (fixtures/anes96);
// its published codebook (fixtures/anes96/published.txt, the package's
// documentation of the data set); counts and Pearson chi-square recorded
// with pandas and scipy (fixtures/anes96/reference.json, by
// scripts/fetch_anes96.py).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers.js';
import { run, runJson, tempFile } from './cliHelpers.js';

const ANES = join(ROOT, 'fixtures', 'anes96');
const DATA = join(ANES, 'anes96.csv');
const published = readFileSync(join(ANES, 'published.txt'), 'utf8').split('\n');
const reference = JSON.parse(readFileSync(join(ANES, 'reference.json'), 'utf8')) as {
  columns: Record<string, { counts: Record<string, number> }>;
  tables: { rows: string; cols: string; rowLevels: string[]; colLevels: string[]; counts: number[][]; pearson: { statistic: number; df: number; pValue: number } }[];
};
const table = (rows: string, cols: string) => reference.tables.find((t) => t.rows === rows && t.cols === cols)!;

/** A variable of the published codebook: "PID - Party identification of respondent." and its "0 - Strong Democrat" lines. */
function publishedVariable(name: string): { question: string; labels: Map<string, string> } {
  const at = published.findIndex((l) => new RegExp(`^\\s+${name}\\s+-\\s`).test(l));
  const question = published[at].replace(/^\s+\S+\s+-\s+/, '').trim();
  const labels = new Map<string, string>();
  for (const line of published.slice(at + 1)) {
    const code = /^\s+(\d+)\s+-\s+(.+)$/.exec(line);
    if (!code) break;
    labels.set(code[1], code[2].trim());
  }
  return { question, labels };
}
const LABELLED = ['PID', 'educ', 'vote'];
const book = Object.fromEntries(LABELLED.map((name) => [name, publishedVariable(name)]));

/** The analyst's part: the published labels and question texts typed into the starter's label and question cells; nothing else changes. */
function typeInLabels(starter: string): string {
  const rows = parse(starter, { relaxColumnCount: false }) as string[][];
  const [head, ...body] = rows;
  const at = (heading: string) => head.indexOf(heading);
  for (const row of body) {
    const entry = book[row[at('column')]];
    if (!entry) continue;
    if (row[at('code')] === '') row[at('question')] = entry.question;
    else row[at('label')] = entry.labels.get(row[at('code')]) ?? row[at('label')];
  }
  // PID's nets, as the analyst groups the published labels.
  const nets: Record<string, string> = { '0': 'Democrat', '1': 'Democrat', '2': 'Independent', '3': 'Independent', '4': 'Independent', '5': 'Republican', '6': 'Republican' };
  for (const row of body) if (row[at('column')] === 'PID' && row[at('code')] !== '') row[at('nets')] = nets[row[at('code')]];
  const cell = (value: string) => (/[",\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value);
  return rows.map((row) => row.map(cell).join(',')).join('\r\n') + '\r\n';
}

describe('issue 15 walk on the 1996 ANES extract: profile → codebook (CSV form) → pair, scan, compare, waves, banner', async () => {
  const profiled = await run(['profile', DATA, '--format', 'codebook-csv']);
  const starter = profiled.stdout;
  const codebook = tempFile('anes-walk.csv', typeInLabels(starter));
  const educLabels = [...book.educ.labels.values()];

  it('profile writes a starter that names the columns bare (the file writes \'PID\'), marks the 0–6 and 1–7 scales ordered, and lists each code', () => {
    expect(profiled.status).toBe(0);
    const rows = parse(starter, { columns: true }) as Record<string, string>[];
    expect([...new Set(rows.map((r) => r.column))]).toEqual(Object.keys(reference.columns));
    for (const name of ['PID', 'educ', 'selfLR']) expect(rows.find((r) => r.column === name && r.code === '')?.ordered, name).toBe('yes');
    expect(rows.find((r) => r.column === 'vote' && r.code === '')?.ordered).toBe('');
    // Each code the file holds, once (pandas value_counts).
    for (const name of LABELLED) expect(rows.filter((r) => r.column === name && r.code !== '').map((r) => r.code), name).toEqual(Object.keys(reference.columns[name].counts));
  });

  it('the codebook CSV round-trips: profile reading it back writes it again unchanged', async () => {
    const again = await run(['profile', DATA, '--codebook', codebook, '--format', 'codebook-csv']);
    expect(again.stdout.replace(/\r\n/g, '\n')).toBe(readFileSync(codebook, 'utf8').replace(/\r\n/g, '\n'));
  });

  it('pair: the published labels in codebook order, counts as pandas crosstab, chi-square as scipy; the questions head the report', async () => {
    for (const [rows, cols] of [['PID', 'vote'], ['educ', 'vote'], ['educ', 'PID']]) {
      const expected = table(rows, cols);
      const out = await runJson(['pair', DATA, '--rows', rows, '--cols', cols, '--codebook', codebook]);
      expect(out.rows.levels).toEqual(expected.rowLevels);
      expect(out.cols.levels).toEqual(expected.colLevels);
      expect(out.counts).toEqual(expected.counts);
      expect(out.tests.pearson.statistic).toBeCloseTo(expected.pearson.statistic, 9);
      expect(out.rows.question).toBe(book[rows].question);
    }
    const text = await run(['pair', DATA, '--rows', 'PID', '--cols', 'vote', '--codebook', codebook]);
    expect(text.stdout).toContain(`PID: ${book.PID.question}\nvote: ${book.vote.question}\n`);
    expect(text.stderr).toBe('');
  });

  it('pair: two columns profile marked ordered get the ordinal measures without --ordinal', async () => {
    const out = await runJson(['pair', DATA, '--rows', 'educ', '--cols', 'PID', '--codebook', codebook]);
    expect(out.settings.ordinal).toBe(true);
    expect(out.ordinal.gamma.estimate).not.toBeNull();
    const nominal = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'vote', '--codebook', codebook]);
    expect(nominal.ordinal).toBeNull();
  });

  it('scan: every column scored, the labelled pairs as pair gives them', async () => {
    const out = await runJson(['scan', DATA, '--codebook', codebook, '--full']);
    expect(out.skipped).toEqual([]);
    const expected = table('PID', 'vote');
    const pid = out.pairs.find((p: { rows: { name: string }; cols: { name: string } }) => p.rows.name === 'PID' && p.cols.name === 'vote');
    expect(pid.rows.levels).toEqual(expected.rowLevels);
    expect(pid.cols.levels).toEqual(expected.colLevels);
    expect(pid.counts).toEqual(expected.counts);
  });

  it('compare, the two expected votes as periods: labelled, in codebook order, questions in JSON and text, ordinal measures for the ordered pair', async () => {
    const out = await runJson(['compare', DATA, '--period', 'vote', '--rows', 'PID', '--cols', 'educ', '--codebook', codebook]);
    const byVote = table('PID', 'vote');
    expect(out.before.label).toBe('vote Clinton');
    expect(out.after.label).toBe('vote Dole');
    expect(out.rows.levels).toEqual(byVote.rowLevels);
    expect(out.cols.levels).toEqual(educLabels);
    // The rows of each period are the published column of PID × vote.
    expect(out.before.rowTotals).toEqual(byVote.counts.map((r) => r[0]));
    expect(out.after.rowTotals).toEqual(byVote.counts.map((r) => r[1]));
    expect(out.rows.question).toBe(book.PID.question);
    expect(out.cols.codes).toEqual([...book.educ.labels.keys()].map((c) => [c]));
    expect(out.before.ordinal.gamma.estimate).not.toBeNull();
    expect(out.after.ordinal.gamma.estimate).not.toBeNull();
    const text = await run(['compare', DATA, '--period', 'vote', '--rows', 'PID', '--cols', 'educ', '--codebook', codebook]);
    expect(text.stdout).toContain(`PID: ${book.PID.question}\neduc: ${book.educ.question}\n`);
    expect(text.stdout).toMatch(/\ngamma +[+−-]\d/);
  });

  it('waves over the education levels: the waves in the codebook\'s order, each wave\'s n as pandas value_counts', async () => {
    const out = await runJson(['waves', DATA, '--period', 'educ', '--rows', 'PID', '--cols', 'vote', '--codebook', codebook]);
    expect(out.setup.orderedBy).toBe('codebook');
    expect(out.waves.map((w: { key: string }) => w.key)).toEqual(educLabels);
    expect(out.waves.map((w: { n: number }) => w.n)).toEqual(Object.values(reference.columns.educ.counts));
    expect(out.rows.question).toBe(book.PID.question);
    const text = await run(['waves', DATA, '--period', 'educ', '--rows', 'PID', '--cols', 'vote', '--codebook', codebook]);
    expect(text.stdout).toContain(`7 waves, ${educLabels[0]} to ${educLabels[6]}\nPID: ${book.PID.question}\n`);
  });

  it('banner: the nets beside the levels, their shares from the published counts', async () => {
    const out = await runJson(['banner', DATA, '--break', 'vote', '--questions', 'PID', '--codebook', codebook]);
    const pid = out.questions[0];
    expect(pid.title).toBe(book.PID.question);
    const counts = reference.columns.PID.counts;
    const net = (name: string) => pid.rows.find((r: { kind: string; label: string }) => r.kind === 'net' && r.label === name);
    expect(net('Democrat').cells[0].count).toBe(counts['0'] + counts['1']);
    expect(net('Republican').cells[0].count).toBe(counts['5'] + counts['6']);
    expect(net('Democrat').cells[0].columnPercent).toBeCloseTo((100 * (counts['0'] + counts['1'])) / 944, 10);
  });

  it('a code the codebook lists that no row holds is a warning naming the file and code, in pair, compare, waves and scan', async () => {
    const withRefused = tempFile('anes-walk-refused.csv', readFileSync(codebook, 'utf8') + 'vote,9,,refused,,,,,,\r\n');
    const pair = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'vote', '--codebook', withRefused]);
    const message = 'anes-walk-refused.csv: code "9" of "vote" does not occur in the data (no row gave that answer)';
    expect(pair.warnings.find((w: { code: string }) => w.code === 'code-not-seen').message).toContain(message);
    const compare = await runJson(['compare', DATA, '--period', 'educ', '--levels', 'PhD,Some college', '--rows', 'PID', '--cols', 'vote', '--codebook', withRefused]);
    expect(compare.warnings.find((w: { code: string }) => w.code === 'code-not-seen').message).toContain(message);
    const waves = await runJson(['waves', DATA, '--period', 'educ', '--rows', 'PID', '--cols', 'vote', '--codebook', withRefused]);
    expect(waves.warnings.find((w: { code: string }) => w.code === 'code-not-seen').message).toContain(message);
    const scan = await runJson(['scan', DATA, '--columns', 'PID,vote,educ', '--codebook', withRefused]);
    expect(scan.warnings).toEqual([{ code: 'code-not-seen', message: expect.stringContaining(message) }]);
    const scanText = await run(['scan', DATA, '--columns', 'PID,vote,educ', '--codebook', withRefused]);
    expect(scanText.stdout).toContain('Check before relying on it');
    expect(scanText.stdout).toMatch(/code\s+"9"\s+of\s+"vote"\s+does\s+not\s+occur\s+in\s+the\s+data/);
  });

  it('a value the codebook does not label stays a level under its code, with a warning; an unknown column is a one-line error naming the file and line', async () => {
    const lines = readFileSync(codebook, 'utf8').split('\r\n');
    const withoutDole = tempFile('anes-walk-nodole.csv', lines.filter((l) => !l.startsWith('vote,1,')).join('\r\n'));
    const out = await runJson(['pair', DATA, '--rows', 'PID', '--cols', 'vote', '--codebook', withoutDole]);
    expect(out.cols.levels).toEqual(['Clinton', '1']);
    expect(out.warnings.map((w: { code: string }) => w.code)).toContain('unlabelled-value');
    const renamed = lines.map((l) => l.replace(/^vote,/, 'votes,'));
    const wrong = tempFile('anes-walk-wrong.csv', renamed.join('\r\n'));
    const line = renamed.findIndex((l) => l.startsWith('votes,')) + 1;
    const failed = await run(['pair', DATA, '--rows', 'PID', '--cols', 'educ', '--codebook', wrong]);
    expect(failed.status).toBe(2);
    expect(failed.stderr).toMatch(new RegExp(`^tabsight: .*anes-walk-wrong\\.csv, line ${line}: column "votes" is not in .*anes96\\.csv; did you mean "vote"\\?\\n$`));
  });
});

describe('a numeric column with "NA" in it, through profile\'s starter codebook (issue 15: still numeric, the token left out and counted by reason)', async () => {
  // The ANES extract with the ages of the PhD respondents (educ 7) written as "NA", as an export that lost them would.
  const lines = readFileSync(DATA, 'utf8').trimEnd().split('\n');
  const head = lines[0].split('\t');
  const [ageAt, educAt] = [head.indexOf("'age'"), head.indexOf("'educ'")];
  const withNa = tempFile('anes-age-na.tsv', [lines[0], ...lines.slice(1).map((l) => l.split('\t').map((v, k) => (k === ageAt && l.split('\t')[educAt] === '7' ? 'NA' : v)).join('\t'))].join('\n') + '\n');
  const lost = reference.columns.educ.counts['7'];
  const made = await run(['profile', withNa, '--format', 'codebook']);
  const starter = tempFile('anes-age-na.json', made.stdout);
  it('profile calls the column numeric and its starter lists "NA" as a missing code beside the cut points', async () => {
    const profile = await runJson(['profile', withNa]);
    expect(profile.columns.find((c: { name: string }) => c.name === 'age').kind).toBe('numeric');
    const age = JSON.parse(made.stdout).columns.find((c: { name: string }) => c.name === 'age');
    expect(age.values).toEqual([{ code: 'NA', missing: 'written as "NA"' }]);
    expect(age.cuts.length).toBeGreaterThan(1);
  });
  it('pair and scan cut the numbers and leave the "NA" rows out, counted by reason (pandas value_counts: 127 PhD respondents)', async () => {
    const pair = await runJson(['pair', withNa, '--rows', 'age', '--cols', 'vote', '--codebook', starter]);
    expect(pair.excluded).toBe(lost);
    expect(pair.excludedBy).toEqual([{ column: 'age', reason: 'written as "NA"', rows: lost }]);
    expect(pair.rows.levels.every((l: string) => /^(<\d+|\d+–\d+|\d+\+)$/.test(l))).toBe(true);
    expect(pair.n).toBe(944 - lost);
    const scan = await runJson(['scan', withNa, '--columns', 'age,vote', '--codebook', starter, '--full']);
    expect(scan.pairs[0].rows.levels).toEqual(pair.rows.levels);
    expect(scan.pairs[0].counts).toEqual(pair.counts);
    expect(scan.excludedBy).toEqual(pair.excludedBy);
  });
});
