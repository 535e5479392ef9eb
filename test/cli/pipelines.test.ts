import { spawnSync } from 'node:child_process';
import { readdirSync, readFileSync } from 'node:fs';
import { dirname } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEMO, expandTable, run, runJson, tempFile } from './cliHelpers.js';

describe('compare', () => {
  it('two files: both analyses, the change in V, the change test and the margin shifts', async () => {
    const before = tempFile('before.csv', expandTable('g', 'a', ['x', 'y', 'z'], ['p', 'q'], [[30, 10], [12, 25], [9, 9]]));
    const after = tempFile('after.csv', expandTable('g', 'a', ['x', 'y', 'z'], ['p', 'q'], [[10, 30], [25, 12], [9, 9]]));
    const out = await runJson(['compare', before, after, '--rows', 'g', '--cols', 'a']);
    expect(out.before.testable).toBe(true);
    expect(out.change.method).toBe('no-three-way-interaction');
    expect(out.change.df).toBe(2);
    expect(out.change.pValue).toBeLessThan(1e-6);
    expect(out.deltaBiasCorrectedV).toBeCloseTo(out.after.measures.biasCorrectedV - out.before.measures.biasCorrectedV, 12);
    expect(out.rowShift.df).toBe(2);
    expect(out.colShift.df).toBe(1);
    expect(out.warnings.map((w: any) => w.code)).toContain('association-changed');
  });

  it('2×2 tables: the Breslow–Day test; identical periods show no change', async () => {
    const t = tempFile('same.csv', expandTable('g', 'a', ['x', 'y'], ['p', 'q'], [[20, 10], [8, 25]]));
    const out = await runJson(['compare', t, t, '--rows', 'g', '--cols', 'a']);
    expect(out.change.method).toBe('breslow-day');
    expect(out.change.statistic).toBeCloseTo(0, 12);
    expect(out.deltaBiasCorrectedV).toBe(0);
  });

  it('one file with --period, and levels present in one period only are reported, never dropped', async () => {
    const lines = ['wave,g,a'];
    const add = (wave: string, g: string, a: string, n: number) => { for (let i = 0; i < n; i++) lines.push(`${wave},${g},${a}`); };
    add('2025', 'x', 'p', 20); add('2025', 'x', 'q', 10); add('2025', 'y', 'p', 8); add('2025', 'y', 'q', 15);
    add('2026', 'x', 'p', 12); add('2026', 'x', 'q', 11); add('2026', 'y', 'p', 9); add('2026', 'y', 'q', 14); add('2026', 'new', 'p', 6); add('2026', 'new', 'q', 2);
    const file = tempFile('waves.csv', lines.join('\n'));
    const out = await runJson(['compare', file, '--period', 'wave', '--rows', 'g', '--cols', 'a']);
    expect(out.before.label).toBe('wave 2025');
    expect(out.rows.levels).toEqual(['new', 'x', 'y']);
    expect(out.onlyAfter.rows).toEqual(['new']);
    expect(out.warnings.find((w: any) => w.code === 'level-in-one-period').message).toMatch(/g "new" occurs only in wave 2026/);
    expect(out.change.method).toBe('no-three-way-interaction');
    const text = (await run(['compare', file, '--period', 'wave', '--rows', 'g', '--cols', 'a'])).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/No evidence that the association changed: p [\d.]+ > α 0\.05, G² test of no three-way interaction/);
    expect((await run(['compare', file, '--period', 'wave', '--levels', '2025,2030', '--rows', 'g', '--cols', 'a'])).status).toBe(2);
  });
});

describe('count and merge: counts in and out', () => {
  it('count writes the long format that --freq reads back, with the same analysis', async () => {
    const counts = await run(['count', DEMO, '--rows', 'branch', '--cols', 'membership']);
    expect(counts.status).toBe(0);
    expect(counts.stdout.split('\n')[0]).toBe('branch,membership,count');
    const file = tempFile('counts.csv', counts.stdout);
    const viaCounts = await runJson(['pair', file, '--rows', 'branch', '--cols', 'membership', '--freq', 'count']);
    const direct = await runJson(['pair', DEMO, '--rows', 'branch', '--cols', 'membership']);
    expect(viaCounts.counts).toEqual(direct.counts);
    expect(viaCounts.tests).toEqual(direct.tests);
    expect(viaCounts.measures).toEqual(direct.measures);
  });

  it('merging the counts of file chunks equals counting the whole file (with a layer too)', async () => {
    const lines = readFileSync(DEMO, 'utf8').trim().split('\n');
    const header = lines[0];
    const chunks = [lines.slice(1, 700), lines.slice(700, 1500), lines.slice(1500)].map((c, k) => tempFile(`chunk${k}.csv`, [header, ...c].join('\n') + '\n'));
    const args = ['--rows', 'age_band', '--cols', 'preferred_format', '--by', 'branch'];
    const parts: string[] = [];
    for (const [k, c] of chunks.entries()) {
      const r = await run(['count', c, ...args]);
      expect(r.status).toBe(0);
      parts.push(tempFile(`part${k}.csv`, r.stdout));
    }
    const merged = await run(['merge', ...parts]);
    const whole = await run(['count', DEMO, ...args]);
    expect(merged.status).toBe(0);
    expect(merged.stdout).toBe(whole.stdout);
  });

  it('merge refuses files of different columns and a bad count, naming the file and line', async () => {
    const a = tempFile('ma.csv', 'x,y,count\np,q,3\n');
    const b = tempFile('mb.csv', 'x,z,count\np,q,3\n');
    expect((await run(['merge', a, b])).stderr).toMatch(/differ from/);
    const bad = tempFile('mc.csv', 'x,y,count\np,q,-3\n');
    const r = await run(['merge', a, bad]);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/mc\.csv, line 2: the count "-3" is negative/);
  });
});

describe('the scripting contract', () => {
  it('exit statuses: 0 done, 1 data, 2 usage, 3 no association with --exit-status (README table)', async () => {
    const related = ['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format'];
    const unrelated = ['pair', DEMO, '--rows', 'branch', '--cols', 'membership'];
    expect((await run(related)).status).toBe(0);
    expect((await run([...related, '--exit-status'])).status).toBe(0);
    expect((await run([...unrelated, '--exit-status'])).status).toBe(3);
    expect((await run(unrelated)).status).toBe(0);
    expect((await run(['scan', DEMO, '--columns', 'branch,membership', '--exit-status'])).status).toBe(3);
    expect((await run(['scan', DEMO, '--exit-status'])).status).toBe(0);
    expect((await run(['pair', '/no/such.csv', '--rows', 'a', '--cols', 'b', '--exit-status'])).status).toBe(1);
    expect((await run(['pair', DEMO, '--rows', 'nope', '--cols', 'branch', '--exit-status'])).status).toBe(2);
  });

  it('--output writes atomically: a failure injected mid-write leaves the previous report untouched and no temporary file', async () => {
    const target = tempFile('report.json', 'previous report\n');
    const failed = await run(['scan', DEMO, '--format', 'json', '--full', '--output', target], undefined, { TABSIGHT_FAIL_WRITE_AFTER: '70000' });
    expect(failed.status).toBe(1);
    expect(failed.stderr).toMatch(/--output .*report\.json: cannot write: .*; the previous file is untouched/);
    expect(readFileSync(target, 'utf8')).toBe('previous report\n');
    expect(readdirSync(dirname(target)).filter((f) => f.includes('.tmp'))).toEqual([]);
    const ok = await run(['scan', DEMO, '--format', 'json', '--output', target]);
    expect(ok.status).toBe(0);
    expect(ok.stdout).toBe('');
    expect(JSON.parse(readFileSync(target, 'utf8')).command).toBe('scan');
  });

  it('pair writes CSV/TSV with stable columns and Markdown with the table, tests and measures', async () => {
    const csv = (await run(['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'csv'])).stdout.split('\n');
    expect(csv[0]).toBe('section,name,row,col,value,df,p_value,level,text');
    expect(csv.some((l) => l.startsWith('test,pearson_chi_square,,,'))).toBe(true);
    expect(csv.some((l) => l.startsWith('count,count,16-24,audiobook,'))).toBe(true);
    expect(csv.some((l) => l.startsWith('measure,cramers_v,,,'))).toBe(true);
    const json = await runJson(['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format']);
    const pearson = csv.find((l) => l.startsWith('test,pearson_chi_square'))!.split(',');
    expect(Number(pearson[4])).toBe(json.tests.pearson.statistic);
    expect(Number(pearson[6])).toBe(json.tests.pearson.pValue);
    const tsv = (await run(['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'tsv'])).stdout;
    expect(tsv.split('\n')[0]).toBe('section\tname\trow\tcol\tvalue\tdf\tp_value\tlevel\ttext');
    // shares travel with the counts (percentages 0–100, as in the JSON)
    const share = csv.find((l) => l.startsWith('row_share,row_share,16-24,audiobook,'))!.split(',');
    expect(Number(share[4])).toBe(json.percentages.row[0][0]);
    const md = (await run(['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'markdown'])).stdout;
    expect(md).toMatch(/\| test \(► leads\) \| statistic \| df \| p-value \|/);
    expect(md).toMatch(/\| ► chi-square \(Pearson's X²\) \|/);
    expect(md).toMatch(/\| Cramér's V \|/);
    expect(md).toMatch(/\| 77 \(24%\) \|/); // the count with its row share
    expect(md).not.toMatch(/cramers v/);
  });

  it('html is one self-contained file; --plot writes the same pictures as standalone SVG', async () => {
    const html = (await run(['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'html'])).stdout;
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(html).toMatch(/<svg [^>]*class="heat-map"/);
    expect(html).toMatch(/<svg [^>]*class="mosaic"/);
    expect(html).not.toMatch(/https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
    const plot = tempFile('plot.svg', '');
    expect((await run(['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format', '--plot', plot])).status).toBe(0);
    const svg = readFileSync(plot, 'utf8');
    expect(svg).toMatch(/^<\?xml/);
    expect(svg).toMatch(/class="heat-map"/);
    const scanHtml = (await run(['scan', DEMO, '--format', 'html'])).stdout;
    expect(scanHtml).toMatch(/class="strength-chart"/);
  });

  it('prints bash and zsh completion scripts that name every command and option', async () => {
    const bash = await run(['completion', 'bash']);
    expect(bash.status).toBe(0);
    expect(bash.stdout).toMatch(/complete -o filenames -F _tabsight tabsight/);
    expect(bash.stdout).toMatch(/pair\) opts=".*--rows.*--cols/);
    expect(bash.stdout).toMatch(/scan\) opts=".*--adjust/);
    const syntax = spawnSync('bash', ['-n'], { input: bash.stdout });
    expect(syntax.status).toBe(0);
    const zsh = await run(['completion', 'zsh']);
    expect(zsh.stdout).toMatch(/^#compdef tabsight/);
    expect((await run(['completion', 'fish'])).status).toBe(2);
  });
});
