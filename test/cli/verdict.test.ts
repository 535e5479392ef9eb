import { copyFileSync, mkdirSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import stringWidth from 'string-width';
import { describe, expect, it } from 'vitest';
import { formatP } from '../../src/readableNumbers.js';
import { reference } from '../helpers.js';
import { DEMO, expandTable, run, runJson, tempFile } from './cliHelpers.js';

const flat = (s: string) => s.replace(/\s+/g, ' ');

// Graduate admissions by department (Bickel, Hammel & O'Connell 1975; counts as recorded in the fixtures).
const departments = ['A', 'B', 'C', 'D', 'E', 'F'];
const admissions = (() => {
  const lines = ['gender,decision,department'];
  reference.stratified2x2.strata.forEach((t, k) => {
    const cells: [string, string, number][] = [['male', 'admitted', t[0][0]], ['male', 'rejected', t[0][1]], ['female', 'admitted', t[1][0]], ['female', 'rejected', t[1][1]]];
    for (const [g, d, count] of cells) for (let i = 0; i < count; i++) lines.push(`${g},${d},${departments[k]}`);
  });
  return tempFile('admissions-verdict.csv', lines.join('\n'));
})();
const byArgs = ['pair', admissions, '--rows', 'gender', '--cols', 'decision', '--row-order', 'male,female', '--by', 'department'];

describe('one verdict, every format', async () => {
  it('every format of a --by pair holds the layered test, and its p-value decides (Bickel et al. 1975)', async () => {
    const json = await runJson(byArgs);
    const cmh = json.stratified.cmh.pValue;
    expect(json.verdict.test).toBe('cmh');
    expect(json.verdict.pValue).toBe(cmh);
    const shown = formatP(cmh);
    const text = flat((await run(byArgs)).stdout);
    expect(text).toContain(`p ${shown} > α 0.05, Cochran–Mantel–Haenszel test`);
    const md = flat((await run([...byArgs, '--format', 'markdown'])).stdout);
    expect(md).toContain(`Cochran–Mantel–Haenszel (association within the levels): ${json.stratified.cmh.statistic.toFixed(2)}, df 1, p ${shown}`);
    expect(md).toContain('#### Within each level of department');
    const html = flat((await run([...byArgs, '--format', 'html'])).stdout);
    expect(html).toContain('Cochran–Mantel–Haenszel (association within the levels)');
    expect(html).toContain(`<td>${shown}</td>`);
    const csv = parse((await run([...byArgs, '--format', 'csv'])).stdout, { columns: true }) as Record<string, string>[];
    const layered = csv.find((l) => l.section === 'held_fixed' && l.name === 'cochran_mantel_haenszel')!;
    expect(Number(layered.p_value)).toBe(cmh);
    expect(csv.find((l) => l.section === 'held_fixed' && l.name === 'common_odds_ratio')).toBeDefined();
    expect(csv.find((l) => l.section === 'held_fixed' && l.name === 'breslow_day')).toBeDefined();
    expect(new Set(csv.filter((l) => l.level !== '').map((l) => l.level))).toEqual(new Set(departments));
    const verdictLine = csv.find((l) => l.section === 'verdict' && l.name === 'leading_p_value' && l.level === '')!;
    expect(Number(verdictLine.p_value)).toBe(cmh);
    expect(verdictLine.text).toBe('cmh');
    // and the exit status follows the same decision
    expect((await run([...byArgs, '--exit-status'])).status).toBe(3);
  });

  it('the leading p-value is the one every format and --exit-status use: a sparse table led by its exact p-value (Fisher 1935 tea tasting)', async () => {
    const file = tempFile('tea-verdict.csv', expandTable('poured', 'guess', ['milk first', 'tea first'], ['milk first', 'tea first'], [[3, 1], [1, 3]]));
    const args = ['pair', file, '--rows', 'poured', '--cols', 'guess'];
    const json = await runJson(args);
    const exact = json.tests.fisher.pValue;
    expect(json.verdict).toMatchObject({ test: 'fisher', pValue: exact, passes: false });
    // at alpha 0.5 the exact p-value (0.486) passes and Pearson's (0.157) would too; at 0.3 only Pearson's would
    const at = async (alpha: string) => (await run([...args, '--alpha', alpha, '--exit-status'])).status;
    expect(await at('0.5')).toBe(0);
    expect(await at('0.3')).toBe(3);
    expect(flat((await run([...args, '--alpha', '0.3'])).stdout)).toContain(`p ${formatP(exact)} > α 0.3, Fisher's exact test`);
    const csv = parse((await run([...args, '--format', 'csv', '--alpha', '0.3'])).stdout, { columns: true }) as Record<string, string>[];
    expect(csv.find((l) => l.name === 'passes')!.value).toBe('0');
    expect(flat((await run([...args, '--format', 'markdown', '--alpha', '0.3'])).stdout)).toContain(`p ${formatP(exact)} > α 0.3`);
    expect(flat((await run([...args, '--format', 'html', '--alpha', '0.3'])).stdout)).toContain(`p ${formatP(exact)} &gt; α 0.3`);
  });

  it('scan adjusts the leading p-value: Pearson passes but the exact p-value does not (exact reference: enumeration of the tables)', async () => {
    // [[1,0,0],[2,20,18],[2,18,20]]: Pearson p 0.0036, exact (Fisher–Freeman–Halton) p 0.1624.
    const lines = ['a,b,c'];
    const counts = [[1, 0, 0], [2, 20, 18], [2, 18, 20]];
    let k = 0;
    counts.forEach((row, i) => row.forEach((n, j) => { for (let m = 0; m < n; m++) lines.push(`${'xyz'[i]},${'pqr'[j]},${k++ % 2 ? 'u' : 'v'}`); }));
    const file = tempFile('pearson-passes.csv', lines.join('\n'));
    const scan = await runJson(['scan', file]);
    const pair = scan.pairs.find((p: any) => p.rows.name === 'a' && p.cols.name === 'b');
    expect(pair.tests.pearson.pValue).toBeCloseTo(0.0036006, 6);
    expect(pair.verdict.test).toBe('fisher');
    expect(pair.verdict.pValue).toBeCloseTo(0.1623975421462, 10);
    expect(pair.passes).toBe(false);
    expect(pair.pAdjusted).toBeGreaterThanOrEqual(pair.verdict.pValue);
    // the same record as pair gives for the same table
    const single = await runJson(['pair', file, '--rows', 'a', '--cols', 'b']);
    expect(single.verdict.pValue).toBe(pair.verdict.pValue);
    expect(single.tests).toEqual(pair.tests);
    expect((await run(['scan', file, '--columns', 'a,b', '--exit-status'])).status).toBe(3);
    const csv = parse((await run(['scan', file, '--format', 'csv'])).stdout, { columns: true }) as Record<string, string>[];
    const row = csv.find((r) => r.rows === 'a' && r.cols === 'b')!;
    expect(row.passes).toBe('false');
    expect(Number(row.leading_p_value)).toBe(pair.verdict.pValue);
  });

  it('scan --top k says how many pass in all, and marks passing pairs in a column of its own (no colour needed)', async () => {
    const all = await runJson(['scan', DEMO]);
    const text = (await run(['scan', DEMO, '--top', '3'])).stdout;
    expect(flat(text)).toContain(`${all.pairsPassing} of ${all.pairsTested} pass (the 3 strongest are shown)`);
    expect(flat(text)).toContain(`${all.pairsPassing} of all ${all.pairsTested} pairs pass`);
    const rows = text.split('\n').filter((l) => /^\s+\d+ {2}/.test(l));
    expect(rows).toHaveLength(3);
    all.pairs.slice(0, 3).forEach((p: any, k: number) => expect(rows[k].slice(6, 14).trim()).toBe(p.passes ? 'yes' : '—'));
    expect(flat((await run(['scan', DEMO, '--format', 'html'])).stdout)).toContain('Adjustment for multiple testing: Benjamini–Hochberg (false discovery rate)');
  });

  it('compare decides once, at --alpha (no second verdict at 0.05)', async () => {
    const args = ['compare', DEMO, '--period', 'has_children', '--rows', 'age_band', '--cols', 'preferred_format'];
    const json = await runJson([...args, '--alpha', '0.01']);
    expect(json.verdict.alpha).toBe(0.01);
    expect(json.colShifted).toBe(json.colShift.pValue <= 0.01);
    const text = flat((await run([...args, '--alpha', '0.01'])).stdout);
    expect(text).not.toMatch(/0\.05/);
    expect(text.match(/association changed/g)?.length).toBe(1);
  });
});

describe('80 columns whatever the length of the file path', async () => {
  it('pair, 2×2 with --by and --ordinal, scan and compare on a file under a 200-character path', async () => {
    const deep = join(tmpdir(), 'tabsight-long-path', 'a'.repeat(60), 'b'.repeat(60), 'c'.repeat(60));
    mkdirSync(deep, { recursive: true });
    const file = join(deep, 'patron-survey-with-a-long-name.csv');
    copyFileSync(DEMO, file);
    const outputs = [
      (await run(['pair', file, '--rows', 'age_band', '--cols', 'preferred_format'])).stdout,
      (await run(['pair', file, '--rows', 'membership', '--cols', 'has_children', '--by', 'age_band', '--ordinal'])).stdout,
      (await run(['pair', file, '--rows', 'visit_frequency', '--cols', 'heard_via', '--cells', 'residuals'])).stdout,
      (await run(['scan', file])).stdout,
      (await run(['compare', file, '--period', 'has_children', '--rows', 'age_band', '--cols', 'preferred_format'])).stdout,
    ];
    for (const out of outputs) {
      expect(out.length).toBeGreaterThan(500);
      for (const line of out.split('\n')) expect(stringWidth(line), line).toBeLessThanOrEqual(80);
    }
  });

  it('CJK, emoji and combining labels: every line within 80 columns and no label cut (UAX #11 widths)', async () => {
    const rows = ['東京都の回答者', 'e\u0301tudiant·e', '👩‍👩‍👧 famille nombreuse'];
    const cols = ['とても満足している', 'pas du tout satisfait', '🙂'];
    const counts = [[30, 12, 9], [11, 25, 14], [8, 10, 31]];
    const file = tempFile('wide-scripts.csv', expandTable('地域', 'réponse', rows, cols, counts));
    const out = (await run(['pair', file, '--rows', '地域', '--cols', 'réponse'])).stdout;
    for (const line of out.split('\n')) expect(stringWidth(line), line).toBeLessThanOrEqual(80);
    const text = out.replace(/\s+/g, '').normalize('NFC');
    for (const label of [...rows, ...cols]) expect(text).toContain(label.replace(/\s+/g, '').normalize('NFC'));
  });
});
