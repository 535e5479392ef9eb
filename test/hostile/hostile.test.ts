// The hostile-input corpus (corpus.mjs), small cases, in-process: each ends
// with one line naming the file, line, column or value and its documented
// exit status, or (where the file is legal) with the right table; the same
// through the embedded engine. The large cases run in the slow tier
// (hostile.slow.test.ts) as their own process under a 512 MB heap.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { describeOpenError } from '../../src/io/source.js';
import { run } from '../cli/cliHelpers.js';
import { describeEngine } from '../engineHelpers.js';
// @ts-expect-error plain JavaScript module without types
import { makeCorpus } from './corpus.mjs';
import { engineCases, expectOutcome, HostileCase } from './hostileCases.js';

const cases: HostileCase[] = makeCorpus(mkdtempSync(join(tmpdir(), 'tabsight-hostile-')), 'small');

describe('hostile input corpus: a clear one-line error and a documented status, or a correct result', () => {
  for (const c of cases) it(c.name, async () => expectOutcome(c, await run(c.args, c.stdin ?? '')));
});

describeEngine('hostile input corpus through --engine duckdb: the same outcome', () => {
  const viaEngine = engineCases(cases);
  it('covers most of the corpus', () => expect(viaEngine.length).toBeGreaterThan(cases.length / 2));
  for (const c of viaEngine) it(c.name, async () => expectOutcome(c, await run([...c.args, '--engine', 'duckdb']), { notes: true }));
});

describe('file errors that a root user cannot provoke', () => {
  it('permission denied names the file', () => {
    const error = Object.assign(new Error('EACCES'), { code: 'EACCES' });
    expect(describeOpenError({ path: 'secret.csv', label: 'secret.csv' }, error).message).toBe('secret.csv: permission denied');
  });
});
