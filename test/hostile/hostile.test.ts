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

describe('file errors that a root user cannot provoke', () => {
  it('permission denied names the file', () => {
    const error = Object.assign(new Error('EACCES'), { code: 'EACCES' });
    expect(describeOpenError({ path: 'secret.csv', label: 'secret.csv' }, error).message).toBe('secret.csv: permission denied');
  });
});
