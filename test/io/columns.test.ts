import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { bareHeaderNames } from '../../src/io/columns.js';
import { ROOT } from '../helpers.js';
import { run, runJson, tempFile } from '../cli/cliHelpers.js';

const ANES = join(ROOT, 'fixtures', 'anes96', 'anes96.csv');
// pandas value_counts of the file, with the headings' quotes stripped (scripts/fetch_anes96.py).
const reference = JSON.parse(readFileSync(join(ROOT, 'fixtures', 'anes96', 'reference.json'), 'utf8')) as { columns: Record<string, { counts: Record<string, number> }> };

describe('headings in single quotes (the 1996 ANES extract as statsmodels ships it writes \'PID\'<tab>\'age\'…)', () => {
  it('are bare when every heading is wrapped, as written otherwise', () => {
    expect(bareHeaderNames(["'popul'", "'PID'", "'age'"])).toEqual(['popul', 'PID', 'age']);
    // One wrapped name among bare ones may be meant: kept.
    expect(bareHeaderNames(["'PID'", 'age'])).toEqual(["'PID'", 'age']);
    // A lone apostrophe, or quotes around nothing, are names in their own right.
    expect(bareHeaderNames(["'", "'a'"])).toEqual(["'", "'a'"]);
    expect(bareHeaderNames(["''", "'a'"])).toEqual(["''", "'a'"]);
    expect(bareHeaderNames(["' '", "'a'"])).toEqual(["' '", "'a'"]);
    expect(bareHeaderNames([])).toEqual([]);
  });
  it('the real file: pair, scan and profile name the columns bare, and the counts are pandas\' value_counts', async () => {
    const out = await runJson(['pair', ANES, '--rows', 'PID', '--cols', 'vote']);
    expect(out.rows.name).toBe('PID');
    expect(out.rowTotals).toEqual(Object.values(reference.columns.PID.counts));
    expect(out.colTotals).toEqual(Object.values(reference.columns.vote.counts));
    const scan = await runJson(['scan', ANES, '--columns', 'PID,vote,educ']);
    expect(scan.pairs.map((p: { rows: { name: string }; cols: { name: string } }) => [p.rows.name, p.cols.name]).flat().sort()).toEqual(['PID', 'PID', 'educ', 'educ', 'vote', 'vote']);
    const profile = await runJson(['profile', ANES]);
    expect(profile.columns.map((c: { name: string }) => c.name)).toEqual(Object.keys(reference.columns));
  });
  it('the quoted name given as an option is an error that names the bare one', async () => {
    const out = await run(['pair', ANES, '--rows', "'PID'", '--cols', 'vote']);
    expect(out.status).toBe(2);
    expect(out.stderr).toMatch(/^tabsight: --rows "'PID'": no such column in .*anes96\.csv; did you mean "PID"\?/);
  });
  it('a file whose headings are partly quoted keeps them as written', async () => {
    const data = tempFile('partly-quoted.csv', "'a',b\nx,y\nw,z\n");
    const out = await runJson(['pair', data, '--rows', "'a'", '--cols', 'b']);
    expect(out.rows.name).toBe("'a'");
  });
});
