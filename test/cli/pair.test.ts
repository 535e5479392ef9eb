import { readFileSync } from 'node:fs';
import stringWidth from 'string-width';
import { describe, expect, it } from 'vitest';
import { expectClose, reference } from '../helpers.js';
import { DEMO, expandTable, run, runJson, spawnCli, tempFile } from './cliHelpers.js';

const party = reference.tables.find((t) => t.name.startsWith('party identification'))!;
const partyCsv = expandTable('gender', 'party', ['female', 'male'], ['democrat', 'independent', 'republican'], party.counts);
const partyFile = tempFile('party.csv', partyCsv);

describe('tabsight pair, end to end', () => {
  it('reproduces the party-by-gender table and scipy’s values from a raw CSV (Agresti; scipy fixture)', async () => {
    const out = await runJson(['pair', partyFile, '--rows', 'gender', '--cols', 'party']);
    expect(out.counts).toEqual(party.counts);
    expect(out.rows).toEqual({ name: 'gender', levels: ['female', 'male'] });
    expect(out.cols.levels).toEqual(['democrat', 'independent', 'republican']);
    expect(out.n).toBe(2757);
    expect(out.excluded).toBe(0);
    expectClose(out.tests.pearson.statistic, party.pearson.statistic, 1e-10);
    expectClose(out.tests.pearson.pValue, party.pearson.pValueMpmath, 1e-9);
    expectClose(out.tests.likelihoodRatio.statistic, party.likelihoodRatio.statistic, 1e-10);
    expectClose(out.measures.cramersV, party.cramersV, 1e-10);
    expect(out.tests.yates).toBeNull();
    expect(out.measures.yulesQ).toBeNull();
    expect(out.residuals.adjusted[0][0]).toBeCloseTo(4.5, 2);
    expect(out.warnings).toEqual([]);
  });

  it('reads standard input with - and with no file at all, giving the same JSON', async () => {
    const fromFile = (await run(['pair', partyFile, '--rows', 'gender', '--cols', 'party', '--format', 'json'])).stdout;
    const fromDash = (await run(['pair', '-', '--rows', 'gender', '--cols', 'party', '--format', 'json'], partyCsv)).stdout;
    const fromNothing = (await run(['pair', '--rows', 'gender', '--cols', 'party', '--format', 'json'], partyCsv)).stdout;
    const strip = (s: string) => ({ ...JSON.parse(s), input: undefined });
    expect(strip(fromDash)).toEqual(strip(fromFile));
    expect(strip(fromNothing)).toEqual(strip(fromFile));
    expect(JSON.parse(fromDash).input.file).toBe('standard input');
  });

  it('detects ; tab and | delimiters, reads CRLF with a UTF-8 byte-order mark, and gives the same counts', async () => {
    const semicolon = tempFile('semi.csv', expandTable('gender', 'party', ['female', 'male'], ['democrat', 'independent', 'republican'], party.counts, ';'));
    const tab = tempFile('tab.tsv', expandTable('gender', 'party', ['female', 'male'], ['democrat', 'independent', 'republican'], party.counts, '\t'));
    const pipe = tempFile('pipe.csv', expandTable('gender', 'party', ['female', 'male'], ['democrat', 'independent', 'republican'], party.counts, '|'));
    const bom = tempFile('bom.csv', Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(expandTable('gender', 'party', ['female', 'male'], ['democrat', 'independent', 'republican'], party.counts, ',', '\r\n'))]));
    for (const file of [semicolon, tab, pipe, bom]) {
      const out = await runJson(['pair', file, '--rows', 'gender', '--cols', 'party']);
      expect(out.counts).toEqual(party.counts);
    }
    expect((await runJson(['pair', semicolon, '--rows', 'gender', '--cols', 'party'])).input.delimiter).toBe(';');
    expect((await runJson(['pair', semicolon, '--rows', 'gender', '--cols', 'party', '--delimiter', 'semicolon'])).counts).toEqual(party.counts);
  });

  it('reads UTF-16 LE with a byte-order mark', async () => {
    const text = '\ufeff' + expandTable('gender', 'party', ['female', 'male'], ['democrat', 'independent', 'republican'], party.counts);
    const file = tempFile('utf16.csv', Buffer.from(text, 'utf16le'));
    expect((await runJson(['pair', file, '--rows', 'gender', '--cols', 'party'])).counts).toEqual(party.counts);
  });

  it('leaves out and counts rows with missing values (blank, whitespace, --missing tokens); levels seen only beside a missing value stay out', async () => {
    const csv = 'a,b\nx,1\ny,2\n  ,1\nNA,2\nx,\nz,NA\nx,2\ny,1\n';
    const out = await runJson(['pair', tempFile('missing.csv', csv), '--rows', 'a', '--cols', 'b', '--missing', 'NA']);
    expect(out.excluded).toBe(4);
    expect(out.n).toBe(4);
    expect(out.rows.levels).toEqual(['x', 'y']);
    expect(out.input.rowsRead).toBe(8);
  });

  it('trims values and keeps unicode labels', async () => {
    const csv = 'réponse,café\n  oui , noir\nnon,au lait\noui,noir\nnon , au lait\n日本,noir\n日本,au lait\n';
    const out = await runJson(['pair', tempFile('unicode.csv', csv), '--rows', 'réponse', '--cols', 'café']);
    expect(out.rows.levels).toEqual(['non', 'oui', '日本']);
    expect(out.cols.levels).toEqual(['au lait', 'noir']);
    expect(out.counts).toEqual([[2, 0], [0, 2], [1, 1]]);
  });

  it('uses --row-order and --col-order, and warns about levels that never occur', async () => {
    const out = await runJson(['pair', partyFile, '--rows', 'gender', '--cols', 'party', '--row-order', 'male,female', '--col-order', 'republican,democrat,whig']);
    expect(out.rows.levels).toEqual(['male', 'female']);
    expect(out.cols.levels).toEqual(['republican', 'democrat', 'independent']);
    expect(out.counts[0]).toEqual([477, 484, 239]);
    expect(out.warnings.map((w: any) => w.code)).toContain('unknown-level');
  });

  it('gives the tea-tasting 2×2 its exact p, Yates, a signed Q, and warns about small expected counts (Fisher 1935)', async () => {
    const csv = expandTable('poured', 'guess', ['milk first', 'tea first'], ['milk first', 'tea first'], [[3, 1], [1, 3]]);
    const out = await runJson(['pair', tempFile('tea.csv', csv), '--rows', 'poured', '--cols', 'guess']);
    expect(out.tests.fisher.pValue).toBeCloseTo(0.4857, 4);
    expect(out.tests.yates).not.toBeNull();
    expect(out.measures.yulesQ).toBeCloseTo(0.8, 12);
    expect(out.findings.diagonal).toBe('main');
    expect(out.findings.primaryTest.test).toBe('fisher');
    expect(out.warnings.map((w: any) => w.code)).toContain('low-expected');
    const text = (await run(['pair', tempFile('tea2.csv', csv), '--rows', 'poured', '--cols', 'guess'])).stdout;
    const flat = text.replace(/\s+/g, ' ');
    expect(flat).toMatch(/4 of 4 expected counts are under 5/);
    expect(out.verdict).toMatchObject({ test: 'fisher', reason: 'exact-for-small-counts', route: 'exact', passes: false, alpha: 0.05 });
    // p = 0.486: the direction is described, with the caveat that it may be chance
    expect(flat).toMatch(/In this sample the main diagonal holds more than its share \("milk first" with "milk first", "tea first" with "tea first"; Yule's Q \+0\.800\), but the data do not show that this is more than chance/);
  });

  it('says which diagonal dominates a clear 2×2 association, in the level order shown', async () => {
    const file = tempFile('diag.csv', expandTable('treated', 'recovered', ['yes', 'no'], ['yes', 'no'], [[40, 10], [12, 38]]));
    const text = (await run(['pair', file, '--rows', 'treated', '--cols', 'recovered', '--row-order', 'yes,no', '--col-order', 'yes,no'])).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/The main diagonal dominates: "yes" with "yes" and "no" with "no" occur together more than independence predicts/);
    const flipped = (await run(['pair', file, '--rows', 'treated', '--cols', 'recovered', '--row-order', 'yes,no', '--col-order', 'no,yes'])).stdout.replace(/\s+/g, ' ');
    expect(flipped).toMatch(/The off diagonal dominates/);
  });

  it('writes a text report without colour codes when piped, with the table, tests, measures and a caution', async () => {
    // Read from standard input, so that the report's first line (which names the
    // file) does not grow with the length of the checkout's path.
    const demo = readFileSync(DEMO);
    const result = await run(['pair', '-', '--rows', 'age_band', '--cols', 'preferred_format'], demo);
    expect(result.status).toBe(0);
    expect(result.stdout).not.toMatch(/\x1b\[/);
    for (const needle of ["chi-square (Pearson's X²)", 'likelihood ratio (G²)', "Cramér's V", 'bias-corrected V', 'share of the row', 'Association is not causation']) {
      expect(result.stdout).toContain(needle);
    }
    for (const line of result.stdout.split('\n')) expect(stringWidth(line), line).toBeLessThanOrEqual(80);
    // a 2×2 table adds the odds ratio and risk ratio lines
    const twoByTwo = await run(['pair', '-', '--rows', 'membership', '--cols', 'has_children', '--by', 'age_band', '--ordinal'], demo);
    for (const line of twoByTwo.stdout.split('\n')) expect(stringWidth(line), line).toBeLessThanOrEqual(80);
    expect(twoByTwo.stdout).not.toMatch(/diagonal dominates/); // no association to describe
  });

  it('adds ordinal measures and the linear-by-linear test only with --ordinal', async () => {
    const plain = await runJson(['pair', DEMO, '--rows', 'visit_frequency', '--cols', 'satisfaction']);
    expect(plain.ordinal).toBeNull();
    expect(plain.tests.linearByLinear).toBeNull();
    const ordered = await runJson(['pair', DEMO, '--rows', 'visit_frequency', '--cols', 'satisfaction', '--ordinal', '--row-order', 'rarely,a few times a year,monthly,weekly']);
    expect(ordered.settings.ordinal).toBe(true);
    expect(ordered.ordinal.gamma.estimate).toBeGreaterThan(0);
    expect(ordered.tests.linearByLinear.df).toBe(1);
  });
});

describe('tabsight pair, errors: one line, a documented exit status, no stack trace', () => {
  const expectOneLine = (stderr: string) => {
    const lines = stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(stderr).not.toMatch(/\bat .*\.js:\d+/);
  };

  it('unknown column: exit 2, lists the columns and the closest match', async () => {
    const r = await run(['pair', partyFile, '--rows', 'gendr', '--cols', 'party']);
    expect(r.status).toBe(2);
    expectOneLine(r.stderr);
    expect(r.stderr).toMatch(/--rows "gendr": no such column .*did you mean "gender"\?.*columns: gender, party/);
  });

  it('unknown option and a missing required option: exit 2', async () => {
    const r = await run(['pair', partyFile, '--rows', 'gender', '--cols', 'party', '--colour']);
    expect(r.status).toBe(2);
    expectOneLine(r.stderr);
    const missing = await run(['pair', partyFile, '--rows', 'gender']);
    expect(missing.status).toBe(2);
    expect(missing.stderr).toMatch(/--cols/);
  });

  it('the same column twice: exit 2', async () => {
    const r = await run(['pair', partyFile, '--rows', 'party', '--cols', 'party']);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/both name "party"/);
  });

  it('missing file, a directory: exit 1 naming the path', async () => {
    const r = await run(['pair', '/no/such/file.csv', '--rows', 'a', '--cols', 'b']);
    expect(r.status).toBe(1);
    expectOneLine(r.stderr);
    expect(r.stderr).toMatch(/\/no\/such\/file\.csv: no such file/);
    const d = await run(['pair', '/tmp', '--rows', 'a', '--cols', 'b']);
    expect(d.status).toBe(1);
    expect(d.stderr).toMatch(/is a directory/);
  });

  it('a one-level column: exit 1 naming the column and its level', async () => {
    const r = await run(['pair', tempFile('one.csv', 'a,b\nx,1\nx,2\nx,1\n'), '--rows', 'a', '--cols', 'b']);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/column "a" has a single level \("x"\)/);
  });

  it('a ragged row: exit 1 naming its line; --skip-bad-rows counts and reports it', async () => {
    const file = tempFile('ragged.csv', 'a,b\nx,1\ny,2,3\nx,2\ny,1\n');
    const r = await run(['pair', file, '--rows', 'a', '--cols', 'b']);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/ragged\.csv, line 3: 3 fields where the header has 2/);
    const skipped = await runJson(['pair', file, '--rows', 'a', '--cols', 'b', '--skip-bad-rows']);
    expect(skipped.input.badRowsSkipped).toBe(1);
    expect(skipped.n).toBe(3);
    const text = (await run(['pair', file, '--rows', 'a', '--cols', 'b', '--skip-bad-rows'])).stdout;
    expect(text.replace(/\s+/g, ' ')).toMatch(/1 malformed row skipped/);
  });

  it('--threads 3 (the file read in byte ranges by worker threads) gives the JSON of --threads 1, with --where, --by, quoted multi-line fields and blank lines; a broken row gives the single reader\'s message', async () => {
    const rows = ['\ufeffid,region,segment,note'];
    for (let i = 0; i < 3000; i++) {
      rows.push(`${i},${['north', 'south', 'east'][i % 3]},${i % 7 < 3 ? 'retail' : 'trade'},${i % 11 === 0 ? '"two\r\nlines, ""quoted"""' : 'plain'}`);
      if (i % 500 === 0) rows.push('');
    }
    const file = tempFile('threads.csv', rows.join('\r\n') + '\r\n');
    for (const extra of [[], ['--where', 'note!=plain'], ['--by', 'note']]) {
      const args = ['pair', file, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'builtin', ...extra];
      const one = await runJson([...args, '--threads', '1']);
      const three = await runJson([...args, '--threads', '3']);
      expect(three).toEqual(one);
    }
    const broken = tempFile('threads-broken.csv', [...rows.slice(0, 2500), '7,north,re"tail,x', ...rows.slice(2500)].join('\n') + '\n');
    const single = await run(['pair', broken, '--rows', 'region', '--cols', 'segment', '--threads', '1']);
    const threaded = await run(['pair', broken, '--rows', 'region', '--cols', 'segment', '--threads', '3']);
    expect(single.status).toBe(1);
    expect(threaded.stderr).toBe(single.stderr);
    expect(threaded.stderr).toMatch(/line \d+: a quote inside the unquoted field 3/);
  });

  it('the built program (bundled, its worker beside it) counts with --threads 2 as with --threads 1', () => {
    const rows = ['id,region,segment'];
    for (let i = 0; i < 5000; i++) rows.push(`${i},${['north', 'south', 'east'][i % 3]},${i % 7 < 3 ? '"retail, small"' : 'trade'}`);
    const file = tempFile('threads-built.csv', rows.join('\n') + '\n');
    const args = ['pair', file, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'builtin'];
    const one = spawnCli([...args, '--threads', '1']);
    const two = spawnCli([...args, '--threads', '2']);
    expect(one.status).toBe(0);
    expect(two.stderr).toBe('');
    expect(JSON.parse(two.stdout)).toEqual(JSON.parse(one.stdout));
  });

  it('duplicate or empty header names: exit 1 saying which', async () => {
    expect((await run(['pair', tempFile('dup.csv', 'a,b,a\n1,2,3\n'), '--rows', 'a', '--cols', 'b'])).stderr).toMatch(/names "a" twice \(columns 1 and 3\)/);
    expect((await run(['pair', tempFile('empty-name.csv', 'a,,c\n1,2,3\n'), '--rows', 'a', '--cols', 'c'])).stderr).toMatch(/column 2 has an empty name/);
  });

  it('too many levels: exit 1 saying how many and suggesting --max-levels', async () => {
    const rows = ['id,g'];
    for (let i = 0; i < 80; i++) rows.push(`${i},${i % 2}`);
    const r = await run(['pair', tempFile('levels.csv', rows.join('\n')), '--rows', 'id', '--cols', 'g']);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/"id" has 80 distinct values, more than --max-levels 50; raise --max-levels/);
    expect((await run(['pair', tempFile('levels2.csv', rows.join('\n')), '--rows', 'id', '--cols', 'g', '--max-levels', '100', '--format', 'json'])).status).toBe(0);
  });

  it('empty file, header only, invalid UTF-8: exit 1 with a clear line', async () => {
    expect((await run(['pair', tempFile('empty.csv', ''), '--rows', 'a', '--cols', 'b'])).stderr).toMatch(/the file is empty/);
    expect((await run(['pair', tempFile('header.csv', 'a,b\n'), '--rows', 'a', '--cols', 'b'])).stderr).toMatch(/no data rows/);
    const bad = await run(['pair', tempFile('latin1.csv', Buffer.from('a,b\ncaf\xe9,1\nx,2\n', 'latin1')), '--rows', 'a', '--cols', 'b']);
    expect(bad.status).toBe(1);
    expect(bad.stderr).toMatch(/invalid UTF-8 at byte offset 7 \(line 2\); pass --encoding/);
    const fixed = await runJson(['pair', tempFile('latin1b.csv', Buffer.from('a,b\ncaf\xe9,1\nx,2\n', 'latin1')), '--rows', 'a', '--cols', 'b', '--encoding', 'latin1']);
    expect(fixed.rows.levels).toEqual(['café', 'x']);
  });

  it('bad option values: exit 2', async () => {
    expect((await run(['pair', partyFile, '--rows', 'gender', '--cols', 'party', '--confidence', '95'])).status).toBe(2);
    expect((await run(['pair', partyFile, '--rows', 'gender', '--cols', 'party', '--delimiter', 'ab'])).status).toBe(2);
    expect((await run(['pair', partyFile, '--rows', 'gender', '--cols', 'party', '--format', 'yaml'])).status).toBe(2);
  });
});
