// Slow tier (npm run test:slow): the large cases of the hostile corpus
// (50 MB fields, a million distinct levels, 10,000 columns, an error 200,000
// lines down), each as its own process of the built program under a 512 MB
// heap, with the built-in reader and through the engine. A hang is caught by
// the runner's timeout; speed is measured by npm run bench, not here.
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, it } from 'vitest';
import { describeEngine } from '../engineHelpers.js';
// @ts-expect-error plain JavaScript module without types
import { makeCorpus } from './corpus.mjs';
import { checkCase, engineCases, HostileCase } from './hostileCases.js';

const cases: HostileCase[] = makeCorpus(mkdtempSync(join(tmpdir(), 'tabsight-hostile-large-')), 'large');
const HEAP = ['--max-old-space-size=512'];

describe('large hostile inputs, as their own process under a 512 MB heap', () => {
  for (const c of cases.filter((k) => k.engine !== 'only')) it(c.name, () => checkCase(c, { heap: HEAP }));
});

describeEngine('large hostile inputs through --engine duckdb, under a 512 MB heap', () => {
  for (const c of engineCases(cases)) it(c.name, () => checkCase(c, { engine: true, heap: HEAP }));
});
