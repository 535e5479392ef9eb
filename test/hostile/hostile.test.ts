import { spawnSync } from 'node:child_process';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { describeOpenError } from '../../src/io/source.js';
import { BIN } from '../cli/cliHelpers.js';
// @ts-expect-error plain JavaScript module without types
import { makeCorpus } from './corpus.mjs';

const dir = mkdtempSync(join(tmpdir(), 'tabsight-hostile-'));
const cases: any[] = makeCorpus(dir);

describe('hostile input corpus: a clear one-line error and a documented status, or a correct result, within seconds and bounded memory', () => {
  for (const c of cases) {
    it(c.name, () => {
      const started = Date.now();
      const result = spawnSync(process.execPath, ['--max-old-space-size=512', BIN, ...c.args], {
        input: c.stdin ?? '',
        encoding: 'utf8',
        timeout: 20_000,
        maxBuffer: 256 * 1024 * 1024,
        env: { ...process.env, NO_COLOR: '1' },
      });
      const seconds = (Date.now() - started) / 1000;
      expect(result.signal, `killed after ${seconds}s`).toBeNull();
      expect(seconds).toBeLessThan(15);
      expect(result.stderr).not.toMatch(/\n\s+at .*:\d+:\d+/); // no stack trace
      expect(result.stderr).not.toMatch(/internal error/);
      expect(result.status, result.stderr).toBe(c.status);
      if (c.status !== 0) {
        expect(result.stderr.trim().split('\n')).toHaveLength(1);
        expect(result.stderr).toMatch(c.stderr);
      }
      if (c.stdout) expect(result.stdout).toMatch(c.stdout);
      if (c.json) c.json(JSON.parse(result.stdout));
    });
  }
});

// The same corpus through the embedded engine: where it cannot read a file
// the tool's way it hands the file back to the built-in reader (with a note
// on stderr), so every case must end exactly as above.
const engineCases = cases.filter((c) => ['pair', 'scan', 'count', 'compare'].includes(c.args[0]) && c.args[1] !== '-' && c.stdin === undefined);

describe('hostile input corpus through --engine duckdb: the same outcome', () => {
  it('covers most of the corpus', () => expect(engineCases.length).toBeGreaterThan(cases.length / 2));
  for (const c of engineCases) {
    it(c.name, () => {
      const result = spawnSync(process.execPath, ['--max-old-space-size=512', BIN, ...c.args, '--engine', 'duckdb'], {
        encoding: 'utf8',
        timeout: 30_000,
        maxBuffer: 256 * 1024 * 1024,
        env: { ...process.env, NO_COLOR: '1' },
      });
      expect(result.signal).toBeNull();
      const stderr = result.stderr.split('\n').filter((l) => l !== '' && !l.startsWith('tabsight: note:'));
      expect(result.stderr).not.toMatch(/\n\s+at .*:\d+:\d+/);
      expect(result.stderr).not.toMatch(/internal error/);
      expect(result.status, result.stderr).toBe(c.status);
      if (c.status !== 0) {
        expect(stderr).toHaveLength(1);
        expect(stderr[0]).toMatch(c.stderr);
      }
      if (c.stdout) expect(result.stdout).toMatch(c.stdout);
      if (c.json) c.json(JSON.parse(result.stdout));
    });
  }
});

describe('file errors that a root user cannot provoke', () => {
  it('permission denied names the file', () => {
    const error = Object.assign(new Error('EACCES'), { code: 'EACCES' });
    expect(describeOpenError({ path: 'secret.csv', label: 'secret.csv' }, error).message).toBe('secret.csv: permission denied');
  });
});
