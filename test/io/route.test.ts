import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { chooseRoute } from '../../src/io/counting.js';

describe('--engine auto never takes the slower route (README, Speed: the built-in reader measured faster than the engine on CSV for pair and scan)', () => {
  const dir = mkdtempSync(join(tmpdir(), 'tabsight-route-'));
  const csv = join(dir, 'big.csv');
  writeFileSync(csv, 'a,b\n1,2\n');
  const reader = { missing: [], skipBadRows: false, header: true, engine: 'auto' as const };

  it('keeps a CSV file, standard input and gzip with the built-in reader, whatever their size', async () => {
    expect(await chooseRoute(reader, { path: csv, label: csv })).toBe('builtin');
    expect(await chooseRoute(reader, { path: '-', label: 'standard input' })).toBe('builtin');
  });

  it('takes the engine where it alone reads the input: Parquet, a pattern of files', async () => {
    expect(await chooseRoute(reader, { path: join(dir, 'data.parquet'), label: 'data.parquet' })).toBe('duckdb');
    expect(await chooseRoute(reader, { path: join(dir, '*.csv'), label: '*.csv' })).toBe('duckdb');
  });

  it('follows an explicit choice', async () => {
    expect(await chooseRoute({ ...reader, engine: 'duckdb' }, { path: csv, label: csv })).toBe('duckdb');
    expect(await chooseRoute({ ...reader, engine: 'builtin' }, { path: join(dir, 'data.parquet'), label: 'p' })).toBe('builtin');
  });
});
