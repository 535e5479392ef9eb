// docs/json.md is the JSON contract: every field the output has must be
// documented there under its whole path. A path is documented when a table
// row of the command's section names it, or names an ancestor whose type or
// meaning names every step below it (`{"statistic", "df", "pValue"}`, a
// list of fields), or says the part below is "as for `pair`" (or another
// command's section, such as `compare`).
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers.js';
import { DEMO, runJson, tempFile } from './cliHelpers.js';

interface Row {
  /** Whole paths the row documents, as "a.b", "pairs[].rank". */
  paths: string[];
  /** Names the row's type and meaning give to the fields below its paths. */
  fields: Set<string>;
  /** The section the row says what lies below is documented in ("as for `pair`"), or null. */
  asFor: string | null;
}

const IDENTIFIER_PATH = /^\.?[A-Za-z][A-Za-z0-9]*(\[\])?(\.[A-Za-z][A-Za-z0-9]*(\[\])?)*$/;
const TEST_FIELDS = ['statistic', 'df', 'pValue'];
const INTERVAL_FIELDS = ['estimate', 'lower', 'upper', 'confidence'];

/** The documented rows of each `## \`command\`` section of docs/json.md. */
function contract(): Map<string, Row[]> {
  const sections = new Map<string, Row[]>();
  let rows: Row[] | null = null;
  for (const line of readFileSync(join(ROOT, 'docs', 'json.md'), 'utf8').split('\n')) {
    const heading = /^## `(\w+)`/.exec(line);
    if (heading) {
      rows = [];
      sections.set(heading[1], rows);
      continue;
    }
    if (line.startsWith('## ')) rows = null;
    if (rows === null || !line.startsWith('| `')) continue;
    const [first, type = '', meaning = ''] = line.split(/(?<!\\)\|/).slice(1).map((cell) => cell.trim());
    const names = [...first.matchAll(/`([^`]+)`/g)].map((m) => m[1]).filter((n) => IDENTIFIER_PATH.test(n));
    if (names.length === 0) continue;
    const lead = names[0];
    const prefix = lead.includes('.') ? lead.slice(0, lead.lastIndexOf('.') + 1) : '';
    const paths = names.map((n, k) => (k === 0 ? n : n.startsWith('.') ? prefix + n.slice(1) : n.includes('.') ? n : prefix + n));
    const described = `${type} ${meaning}`;
    const fields = new Set([...described.matchAll(/`([A-Za-z][A-Za-z0-9]*)`|"([A-Za-z][A-Za-z0-9]*)"/g)].map((m) => m[1] ?? m[2]));
    if (/\btest\b/.test(type)) TEST_FIELDS.forEach((f) => fields.add(f));
    if (/\binterval\b/.test(type)) INTERVAL_FIELDS.forEach((f) => fields.add(f));
    const asFor = /as (?:for|in) `(\w+)`/.exec(described)?.[1] ?? (/the fields above/.test(described) ? 'pair' : null);
    rows.push({ paths, fields, asFor });
  }
  return sections;
}

const SECTIONS = contract();

/** Every path in a value, objects inside arrays written as "name[]", all elements taken together. */
function allPaths(value: unknown, prefix = ''): string[] {
  if (Array.isArray(value)) return [...new Set(value.flatMap((v) => allPaths(v, `${prefix}[]`)))];
  if (value === null || typeof value !== 'object') return [];
  return Object.entries(value as Record<string, unknown>).flatMap(([k, v]) => {
    const path = prefix === '' ? k : prefix.endsWith('[]') ? `${prefix}.${k}` : `${prefix}.${k}`;
    return [path, ...allPaths(v, path)];
  });
}

function isDocumented(path: string, section: string, depth = 0): boolean {
  const rows = SECTIONS.get(section) ?? [];
  // An object whose fields have rows of their own ("tests" of "tests.pearson").
  if (rows.some((row) => row.paths.some((p) => p.startsWith(`${path}.`) || p.startsWith(`${path.replace(/\[\]$/, '')}.`)))) return true;
  const steps = path.split('.');
  for (let cut = steps.length; cut >= 1; cut--) {
    const head = steps.slice(0, cut).join('.');
    const bare = head.replace(/(\[\])+$/, ''); // a matrix of objects: row[][]
    for (const row of rows) {
      if (!row.paths.includes(head) && !row.paths.includes(bare)) continue;
      const below = steps.slice(cut).map((s) => s.replace(/\[\]$/, ''));
      if (below.length === 0 || below.every((step) => row.fields.has(step))) return true;
      if (row.asFor !== null && depth < 2) {
        const rest = steps.slice(cut).join('.');
        const own = bare.split('.').pop() as string;
        if (isDocumented(rest, row.asFor, depth + 1) || isDocumented(`${own}.${rest}`, row.asFor, depth + 1)) return true;
      }
    }
  }
  return false;
}

function expectDocumented(report: unknown, section: string): void {
  const missing = allPaths(report).filter((path) => !isDocumented(path, section));
  expect(missing, `fields missing from docs/json.md (section ${section}): ${missing.join(', ')}`).toEqual([]);
}

describe('docs/json.md documents every field the JSON output has, by its whole path', () => {
  it('the check itself refuses a field documented only under another path', () => {
    // `level` is documented for strata and notable cells, not at the top of the pair report.
    expect(isDocumented('level', 'pair')).toBe(false);
    expect(isDocumented('strata[].level', 'pair')).toBe(true);
    expect(isDocumented('tests.pearson.pValue', 'pair')).toBe(true);
    expect(isDocumented('tests.pearson.reason', 'pair')).toBe(false);
    expect(isDocumented('pairs[].tests.pearson.pValue', 'scan')).toBe(true);
  });

  it('pair, with every optional block present (2×2, ordinal, layer, weights, exact and simulated p-values)', async () => {
    expectDocumented(await runJson(['pair', DEMO, '--rows', 'membership', '--cols', 'has_children', '--ordinal', '--by', 'age_band', '--weight', 'survey_weight']), 'pair');
    expectDocumented(await runJson(['pair', DEMO, '--rows', 'satisfaction', '--cols', 'heard_via', '--exact', 'always', '--simulations', '2000']), 'pair');
  });

  it('banner: single, multiple-response (with a net), numeric and weighted questions', async () => {
    const api = join(ROOT, 'fixtures', 'reference', 'banner-api.csv');
    const book = tempFile('contract-book.json', JSON.stringify({ codebook: 1, columns: [{ name: 'programmes', question: 'Programmes', values: [{ code: 'awards', label: 'awards' }], nets: [{ name: 'any', codes: ['awards'] }] }] }));
    expectDocumented(await runJson(['banner', api, '--break', 'stype,size_band', '--questions', 'sch_wide', '--means', 'api00', '--multi-split', 'programmes:;', '--weight', 'pupil_weight', '--codebook', book, '--mark-levels', '95,90']), 'banner');
  });

  it('with a survey design: pair, scan (--full), compare and waves (NHANES extract of the survey package for R, its strata and PSUs)', async () => {
    const nhanes = join(ROOT, 'fixtures', 'reference', 'survey-data', 'nhanes.csv');
    const design = ['--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--cluster', 'SDMVPSU'];
    expectDocumented(await runJson(['pair', nhanes, '--rows', 'agecat', '--cols', 'race', ...design]), 'pair');
    expectDocumented(await runJson(['scan', nhanes, '--columns', 'agecat,race,HI_CHOL', '--full', ...design]), 'scan');
    expectDocumented(await runJson(['compare', nhanes, '--period', 'RIAGENDR', '--rows', 'agecat', '--cols', 'race', ...design]), 'compare');
    // waves: each level of race its own sample; r×c (layer-effect trend, departures) and 2×2 (linear trend)
    expectDocumented(await runJson(['waves', nhanes, '--period', 'race', '--rows', 'agecat', '--cols', 'RIAGENDR', ...design]), 'waves');
    expectDocumented(await runJson(['waves', nhanes, '--period', 'race', '--rows', 'HI_CHOL', '--cols', 'RIAGENDR', ...design]), 'waves');
    expectDocumented(await runJson(['banner', nhanes, '--break', 'race,RIAGENDR', '--questions', 'agecat,HI_CHOL', ...design, '--format', 'json']), 'banner');
  });

  it('scan (with a layer and --full) and compare', async () => {
    expectDocumented(await runJson(['scan', DEMO, '--by', 'branch', '--columns', 'membership,has_children,age_band', '--full']), 'scan');
    expectDocumented(await runJson(['compare', DEMO, '--period', 'has_children', '--rows', 'age_band', '--cols', 'preferred_format']), 'compare');
  });

  it('waves: r×c (layer-effect trend, departures) and 2×2 (odds-ratio trend, equal odds), with weights and a level absent from a wave', async () => {
    expectDocumented(await runJson(['waves', DEMO, '--period', 'branch', '--rows', 'age_band', '--cols', 'preferred_format', '--weight', 'survey_weight']), 'waves');
    expectDocumented(await runJson(['waves', DEMO, '--period', 'age_band', '--rows', 'membership', '--cols', 'has_children', '--where', 'branch!=Old Town']), 'waves');
    expectDocumented(await runJson(['waves', DEMO, '--period', 'branch', '--rows', 'heard_via', '--cols', 'satisfaction', '--levels', 'Old Town,Riverside,Westfield']), 'waves');
  });
});
