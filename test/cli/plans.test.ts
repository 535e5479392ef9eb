// Each command parses its options once into a typed plan; the exit status is
// read from the outcome its run returns (README, "Exit statuses").
import { describe, expect, it } from 'vitest';
import { buildProgram, CommandPlan } from '../../src/cli/program.js';
import { statusOf } from '../../src/cli/outcome.js';
import type { CliIo } from '../../src/cli/output.js';
import { TabsightError } from '../../src/errors.js';

const silent: CliIo = {
  stdin: process.stdin,
  stdout: { write: () => true, once: () => undefined },
  stderr: { write: () => true, once: () => undefined },
  env: {},
};

/** The plan the arguments parse into (nothing is read or run). */
async function planOf(args: string[]): Promise<CommandPlan | null> {
  let chosen: CommandPlan | null = null;
  await buildProgram(silent, (plan) => (chosen = plan)).parseAsync(args, { from: 'user' });
  return chosen;
}

describe('typed plans', () => {
  it('pair: the table to count, its level order, the analysis settings and where the report goes', async () => {
    const chosen = await planOf(['pair', 'survey.csv', '--rows', 'a', '--cols', 'b', '--row-order', 'y, x', '--weight', 'w', '--other', '3', '--format', 'csv', '--exit-status', '--alpha', '0.01']);
    expect(chosen?.command).toBe('pair');
    if (chosen?.command !== 'pair') return;
    const { plan } = chosen;
    expect(plan.input).toBe('survey.csv');
    expect(plan.table).toMatchObject({ rows: 'a', cols: 'b', rowOrder: ['y', 'x'], weight: { column: 'w', kind: 'weight' }, other: { k: 3, label: 'other' }, maxLevels: 50 });
    expect(plan.format).toBe('csv');
    expect(plan.alpha).toBe(0.01);
    expect(plan.report).toEqual({ output: undefined, plot: undefined, exitStatus: true, color: true, rawCells: false });
    expect(plan.reader).toMatchObject({ missing: [], skipBadRows: false, header: true, engine: 'auto' });
  });

  it('no file means standard input', async () => {
    const chosen = await planOf(['scan', '--bins', '4']);
    expect(chosen?.command === 'scan' && chosen.plan.input).toBe('-');
    expect(chosen?.command === 'scan' && chosen.plan.bins).toBe(4);
  });

  it('compare: two files, or one file split by a column into two named levels', async () => {
    const files = await planOf(['compare', 'w47.csv', 'w48.csv', '--rows', 'a', '--cols', 'b']);
    expect(files?.command === 'compare' && files.plan.periods).toEqual({ kind: 'files', before: 'w47.csv', after: 'w48.csv' });
    const column = await planOf(['compare', 'all.csv', '--period', 'wave', '--levels', '2025,2026', '--rows', 'a', '--cols', 'b']);
    expect(column?.command === 'compare' && column.plan.periods).toEqual({ kind: 'column', input: 'all.csv', column: 'wave', levels: ['2025', '2026'] });
  });

  it('an invalid option value is a usage error (status 2) before anything is read', async () => {
    const refused = await planOf(['pair', 'no-such-file.csv', '--rows', 'a', '--cols', 'b', '--confidence', '95']).catch((e: unknown) => e);
    expect(refused).toBeInstanceOf(TabsightError);
    expect((refused as TabsightError).exitStatus).toBe(2);
    const levels = await planOf(['compare', 'all.csv', '--period', 'wave', '--levels', '2025', '--rows', 'a', '--cols', 'b']).catch((e: unknown) => e);
    expect((levels as TabsightError).message).toMatch(/name exactly two levels/);
  });
});

describe('the exit status comes from the outcome', () => {
  it('0 when done, 3 only when --exit-status was asked for and nothing was found', () => {
    expect(statusOf({ found: true, exitStatusWanted: true })).toBe(0);
    expect(statusOf({ found: false, exitStatusWanted: true })).toBe(3);
    expect(statusOf({ found: false, exitStatusWanted: false })).toBe(0);
    expect(statusOf({ found: null, exitStatusWanted: true })).toBe(0);
  });
});
