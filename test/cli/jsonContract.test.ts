import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers.js';
import { DEMO, runJson } from './cliHelpers.js';

const contract = readFileSync(join(ROOT, 'docs', 'json.md'), 'utf8');

/** Every key path down to `depth`, as "a.b.c". */
function keyPaths(value: unknown, depth: number, prefix = ''): string[] {
  if (depth === 0 || value === null || typeof value !== 'object' || Array.isArray(value)) return [];
  return Object.entries(value as Record<string, unknown>).flatMap(([k, v]) => [prefix + k, ...keyPaths(v, depth - 1, `${prefix}${k}.`)]);
}

function expectDocumented(paths: string[]): void {
  const missing = paths.filter((path) => {
    const last = path.split('.').pop() as string;
    return !contract.includes(`\`${path}\``) && !contract.includes(`\`${last}\``) && !contract.includes(`.${last}\``) && !contract.includes(`${last},`) && !contract.includes(`"${last}"`);
  });
  expect(missing, `fields missing from docs/json.md: ${missing.join(', ')}`).toEqual([]);
}

describe('docs/json.md documents every field the JSON output has', () => {
  it('pair, with every optional block present (2×2, ordinal, layer, weights)', () => {
    const out = runJson(['pair', DEMO, '--rows', 'membership', '--cols', 'has_children', '--ordinal', '--by', 'age_band', '--weight', 'survey_weight']);
    expectDocumented(keyPaths(out, 2));
    expectDocumented(keyPaths(out.tests, 2, 'tests.'));
    expectDocumented(keyPaths(out.measures, 2, 'measures.'));
    expectDocumented(keyPaths(out.stratified, 1, 'stratified.'));
    const sparse = runJson(['pair', DEMO, '--rows', 'satisfaction', '--cols', 'heard_via', '--exact', 'always', '--simulations', '2000']);
    expectDocumented(keyPaths(sparse.tests, 2, 'tests.'));
  });

  it('scan and compare', () => {
    const scan = runJson(['scan', DEMO, '--by', 'branch', '--columns', 'membership,has_children,age_band']);
    expectDocumented(keyPaths(scan, 1));
    expectDocumented(keyPaths(scan.pairs[0], 1, 'pairs[].'));
    const compare = runJson(['compare', DEMO, '--period', 'has_children', '--rows', 'age_band', '--cols', 'preferred_format']);
    expectDocumented(keyPaths(compare, 1));
  });
});
