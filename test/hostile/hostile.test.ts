// The hostile-input corpus (corpus.mjs), small cases: each ends with one
// line naming the file, line, column, option or value and its documented
// exit status, or (where the input is legal) with the right result; the
// inputs are untouched and no temporary file is left behind. Most run
// in-process; those that need a process of their own (signals, closed or
// full standard streams, process substitution) run as one. The same cases
// run through the embedded engine. The large cases run in the slow tier
// (hostile.slow.test.ts) as their own process under a 512 MB heap.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { describeOpenError } from '../../src/io/source.js';
import { describeEngine } from '../engineHelpers.js';
// @ts-expect-error plain JavaScript module without types
import { makeCorpus } from './corpus.mjs';
import { checkCase, engineCases, HostileCase } from './hostileCases.js';

const cases: HostileCase[] = makeCorpus(mkdtempSync(join(tmpdir(), 'tabsight-hostile-')), 'small');

describe('hostile input corpus: a clear one-line error and a documented status, or a correct result', () => {
  for (const c of cases.filter((k) => k.engine !== 'only')) it(c.name, () => checkCase(c));
});

describeEngine('hostile input corpus through --engine duckdb: the same outcome', () => {
  const viaEngine = engineCases(cases);
  it('covers most of the corpus', () => expect(viaEngine.length).toBeGreaterThan(cases.length / 2));
  for (const c of viaEngine) it(c.name, () => checkCase(c, { engine: true }));
});

describe('file errors that a root user cannot provoke', () => {
  it('permission denied names the file', () => {
    const error = Object.assign(new Error('EACCES'), { code: 'EACCES' });
    expect(describeOpenError({ path: 'secret.csv', label: 'secret.csv' }, error).message).toBe('secret.csv: permission denied');
  });
});
