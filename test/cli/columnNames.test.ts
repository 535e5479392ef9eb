// A misspelt column is one usage line naming the option the analyst typed,
// the closest column and the columns, whichever command reads it (common
// practice: a message names what the user wrote, in the user's words).
import { describe, expect, it } from 'vitest';
import { DEMO, run } from './cliHelpers.js';

describe('a misspelt column name, in every command', () => {
  it.each([
    [['pair', DEMO, '--rows', 'age-band', '--cols', 'branch'], '--rows "age-band"'],
    [['banner', DEMO, '--break', 'age-band'], '--break "age-band"'],
    [['banner', DEMO, '--break', 'branch', '--questions', 'membrship'], '--questions "membrship"'],
    [['compare', DEMO, '--period', 'brnch', '--rows', 'age_band', '--cols', 'membership'], '--period "brnch"'],
    [['waves', DEMO, '--period', 'brnch', '--rows', 'age_band', '--cols', 'membership'], '--period "brnch"'],
  ])('%j', async (args, named) => {
    const r = await run(args);
    expect(r.status).toBe(2);
    const lines = r.stderr.trim().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toContain(`${named}: no such column`);
    expect(lines[0]).toMatch(/did you mean "(age_band|branch|membership)"\? columns: respondent_id, branch/);
  });

  it('a layer that is also a side names --period for compare and waves (--by for pair)', async () => {
    expect((await run(['waves', DEMO, '--period', 'branch', '--rows', 'branch', '--cols', 'membership'])).stderr).toMatch(/^tabsight: --period "branch" is already --rows or --cols/);
    expect((await run(['pair', DEMO, '--by', 'branch', '--rows', 'branch', '--cols', 'membership'])).stderr).toMatch(/^tabsight: --by "branch" is already --rows or --cols/);
  });
});
