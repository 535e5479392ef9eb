// waves through the embedded engine (all files in one pass, grouped by file)
// against the built-in reader (one pass per file): the same JSON but for
// input.engine, on the demo's weekly waves under weights, filters and
// missing values; files the engine cannot read in one pass go to the
// built-in reader with a note. The built-in reader is itself tested against
// csv-parse and the recorded references elsewhere.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { expect, it } from 'vitest';
import { ROOT } from '../helpers.js';
import { run, runJson, spawnCli, tempFile } from '../cli/cliHelpers.js';
import { describeEngine } from '../engineHelpers.js';

const WEEKS = join(ROOT, 'fixtures', 'demo', 'weekly', 'patron-2026-W*.csv');

function withoutEngine(report: any): any {
  const copy = structuredClone(report);
  const strip = (o: any) => {
    if (o && typeof o === 'object') {
      if (o.input && typeof o.input === 'object') delete o.input.engine;
      for (const v of Object.values(o)) strip(v);
    }
  };
  strip(copy);
  return copy;
}

describeEngine('waves: the engine in one pass equals the built-in reader file by file', () => {
  for (const extra of [[], ['--weight', 'survey_weight', '--where', 'branch!=Old Town'], ['--missing', 'no preference', '--rows', 'membership']]) {
    it(`weekly demo waves ${extra.join(' ') || '(plain)'}`, async () => {
      const args = ['waves', WEEKS, '--rows', 'age_band', '--cols', 'preferred_format', ...extra];
      const builtin = await runJson([...args, '--engine', 'builtin']);
      const engine = await runJson([...args, '--engine', 'duckdb']);
      expect(engine.waves[0].input.engine).toBe('duckdb');
      expect(engine.waves[0].input.files).toBe(1);
      expect(withoutEngine(engine)).toEqual(withoutEngine(builtin));
    });
  }

  it('as its own process: every file the engine route opens to read a header or count empty lines is closed (no warning on standard error)', () => {
    const result = spawnCli(['waves', WEEKS, '--rows', 'age_band', '--cols', 'preferred_format', '--engine', 'duckdb', '--format', 'csv']);
    expect(result.status).toBe(0);
    expect(result.stderr).toBe('');
    expect(result.stdout.trim().split('\n')).toHaveLength(13);
  });

  it('files whose headers differ are counted one by one by the built-in reader, and a note says so', async () => {
    const lines = readFileSync(join(ROOT, 'fixtures', 'demo', 'weekly', 'patron-2026-W01.csv'), 'utf8').trim().split('\n');
    const a = tempFile('hdr-2026-W01.csv', lines.join('\n') + '\n');
    // the second week's export has its columns in another order
    const swap = (line: string) => {
      const f = line.split(',');
      return [f[2], f[0], f[1], ...f.slice(3)].join(',');
    };
    const b = tempFile('hdr-2026-W02.csv', lines.map(swap).join('\n') + '\n');
    const result = await run(['waves', a, b, '--rows', 'age_band', '--cols', 'membership', '--engine', 'duckdb', '--format', 'json']);
    expect(result.status).toBe(0);
    expect(result.stderr).toMatch(/^tabsight: note: the engine cannot read these 2 files in one pass .*another header.*counted one by one with the built-in reader\n$/);
    const out = JSON.parse(result.stdout);
    expect(out.waves[1].input.engine).toBe('builtin');
    expect(out.waves[0].tests).toEqual(out.waves[1].tests);
  });
});
