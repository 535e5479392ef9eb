import { readFileSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import stringWidth from 'string-width';
import { describe, expect, it } from 'vitest';
import { expectClose } from '../helpers.js';
import { DEMO, run, runJson, tempFile } from './cliHelpers.js';

function screeningFile(): string {
  // Invented for the test: an id, a constant, a continuous number, and three categorical columns.
  const lines = ['id,constant,amount,colour,size,shape'];
  let seed = 17;
  const next = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
  for (let i = 0; i < 400; i++) {
    const colour = next() < 0.5 ? 'red' : 'blue';
    const size = colour === 'red' ? (next() < 0.7 ? 'large' : 'small') : next() < 0.3 ? 'large' : 'small';
    const shape = ['round', 'square', 'flat'][Math.floor(next() * 3)];
    const amount = (next() * 1000 + (size === 'large' ? 400 : 0)).toFixed(2);
    lines.push(`R${i},same,${amount},${colour},${size},${shape}`);
  }
  return tempFile('screen.csv', lines.join('\n') + '\n');
}

describe('tabsight scan', () => {
  const file = screeningFile();

  it('skips an identifier, a constant and a continuous numeric column, each with its reason', async () => {
    const out = await runJson(['scan', file]);
    const reasons = Object.fromEntries(out.skipped.map((s: any) => [s.column, s.reason]));
    expect(reasons.id).toMatch(/identifier/);
    expect(reasons.constant).toMatch(/single level/);
    expect(reasons.amount).toMatch(/numeric with \d+ distinct values; --bins/);
    expect(out.columnsScored).toEqual(['colour', 'size', 'shape']);
    expect(out.pairsTested).toBe(3);
  });

  it('scores the numeric column with --bins, in equal-frequency bins labelled by range, lowest first', async () => {
    const out = await runJson(['scan', file, '--bins', '4', '--full']);
    expect(out.columnsScored).toContain('amount');
    const pair = out.pairs.find((p: any) => p.rows.name === 'amount' || p.cols.name === 'amount');
    const levels = pair.rows.name === 'amount' ? pair.rows.levels : pair.cols.levels;
    expect(levels).toHaveLength(4);
    const lows = levels.map((l: string) => Number(l.split('–')[0]));
    expect([...lows].sort((a, b) => a - b)).toEqual(lows);
    // 400 distinct amounts in 4 equal-frequency bins: 100 rows in each, on whichever side amount sits.
    const margins: number[] = pair.rows.name === 'amount' ? pair.rowTotals : pair.colTotals;
    expect(margins).toEqual([100, 100, 100, 100]);
  });

  it('each pair’s statistics equal what pair gives for the same two columns (same code path)', async () => {
    const scan = await runJson(['scan', DEMO, '--full']);
    const checked = scan.pairs.filter((p: any) => p.expectedCountRule.passes).slice(0, 5);
    expect(checked.length).toBe(5);
    for (const pair of checked) {
      const single = await runJson(['pair', DEMO, '--rows', pair.rows.name, '--cols', pair.cols.name]);
      expect(pair.counts).toEqual(single.counts);
      expect(pair.n).toBe(single.n);
      expect(pair.excluded).toBe(single.excluded);
      expect(pair.tests).toEqual(single.tests);
      expect(pair.measures).toEqual(single.measures);
    }
  });

  it('adjusts with Benjamini–Hochberg by default, ranks by bias-corrected V, and marks passes at alpha', async () => {
    const out = await runJson(['scan', DEMO]);
    expect(out.adjustment).toBe('bh');
    expect(out.alpha).toBe(0.05);
    const vs = out.pairs.map((p: any) => p.measures.biasCorrectedV);
    expect([...vs].sort((a, b) => b - a)).toEqual(vs);
    for (const p of out.pairs) {
      // the leading p-value is the one adjusted (Pearson's where the expected counts allow it)
      expect(p.pAdjusted).toBeGreaterThanOrEqual(p.verdict.pValue);
      expect(p.verdict.adjustment.pValue).toBe(p.pAdjusted);
      expect(p.verdict.passes).toBe(p.passes);
      expect(p.passes).toBe(p.pAdjusted <= out.alpha);
      expect(p.counts).toBeUndefined();
    }
    const bonferroni = await runJson(['scan', DEMO, '--adjust', 'bonferroni']);
    const m = bonferroni.pairsTested;
    for (const p of bonferroni.pairs) expectClose(p.pAdjusted, Math.min(1, m * p.verdict.pValue), 1e-14);
    expect((await runJson(['scan', DEMO, '--top', '3'])).pairs).toHaveLength(3);
  });

  it('CSV output parses back with csv-parse to the same numbers as the JSON; TSV likewise', async () => {
    const json = await runJson(['scan', DEMO]);
    const csv = await run(['scan', DEMO, '--format', 'csv']);
    expect(csv.status).toBe(0);
    const records = parse(csv.stdout, { columns: true }) as Record<string, string>[];
    expect(records).toHaveLength(json.pairs.length);
    records.forEach((row, k) => {
      const pair = json.pairs[k];
      expect(row.rows).toBe(pair.rows.name);
      expect(row.cols).toBe(pair.cols.name);
      expect(Number(row.chi_square)).toBe(pair.tests.pearson.statistic);
      expect(Number(row.p_value)).toBe(pair.tests.pearson.pValue);
      expect(Number(row.p_adjusted)).toBe(pair.pAdjusted);
      expect(Number(row.bias_corrected_v)).toBe(pair.measures.biasCorrectedV);
      expect(row.passes).toBe(String(pair.passes));
      expect(row.expected_rule_passes).toBe(String(pair.expectedCountRule.passes));
    });
    const tsv = parse((await run(['scan', DEMO, '--format', 'tsv'])).stdout, { columns: true, delimiter: '\t' }) as Record<string, string>[];
    expect(tsv.map((r) => r.cramers_v)).toEqual(records.map((r) => r.cramers_v));
  });

  it('flags pairs that fail the expected-count rule in every format', async () => {
    const json = await runJson(['scan', DEMO]);
    const sparse = json.pairs.filter((p: any) => !p.expectedCountRule.passes);
    expect(sparse.length).toBeGreaterThan(0);
    const csv = parse((await run(['scan', DEMO, '--format', 'csv'])).stdout, { columns: true }) as Record<string, string>[];
    for (const p of sparse) expect(csv[p.rank - 1].flags).toContain('sparse');
    const md = (await run(['scan', DEMO, '--format', 'markdown'])).stdout;
    expect(md).toMatch(/\| # \| passes \| rows \| cols \|/);
    expect(md).toMatch(/sparse/);
    expect((await run(['scan', DEMO])).stdout).toMatch(/sparse/);
  });

  it('--columns and --exclude choose the candidates; an unknown name is a usage error', async () => {
    expect((await runJson(['scan', DEMO, '--columns', 'branch,age_band,membership'])).pairsTested).toBe(3);
    expect((await runJson(['scan', DEMO, '--columns', 'branch,age_band,membership', '--exclude', 'branch'])).pairsTested).toBe(1);
    const bad = await run(['scan', DEMO, '--columns', 'branch,age-band']);
    expect(bad.status).toBe(2);
    expect(bad.stderr).toMatch(/did you mean "age_band"/);
  });

  it('prints no progress and no colour in a pipe, and keeps lines within 80 columns', async () => {
    // Standard input, so that the title (which names the file) does not grow with the checkout's path.
    const r = await run(['scan', '-'], readFileSync(DEMO));
    expect(r.stderr).toBe('');
    expect(r.stdout).not.toMatch(/\x1b\[/);
    for (const line of r.stdout.split('\n')) expect(stringWidth(line), line).toBeLessThanOrEqual(80);
  });
});
