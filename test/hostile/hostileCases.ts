// What every case of the hostile corpus must end with, in-process or as its own process.
import { expect } from 'vitest';

export interface HostileCase {
  name: string;
  args: string[];
  stdin?: Buffer | string;
  status: number;
  stderr?: RegExp;
  stdout?: RegExp;
  json?: (out: unknown) => void;
  large?: boolean;
}

/** The cases the engine can read too: files (not standard input) for the counting commands. */
export function engineCases(cases: HostileCase[]): HostileCase[] {
  return cases.filter((c) => ['pair', 'scan', 'count', 'compare'].includes(c.args[0]) && c.args[1] !== '-' && c.stdin === undefined);
}

/**
 * The documented status; for an error exactly one line on stderr, matching
 * the case, and never a stack trace or an internal error. With `notes`, the
 * engine's one-line notes (a file handed back to the built-in reader) are
 * set aside first.
 */
export function expectOutcome(c: HostileCase, result: { status: number | null; stdout: string; stderr: string }, options: { notes?: boolean } = {}): void {
  expect(result.stderr).not.toMatch(/\n\s+at .*:\d+:\d+/);
  expect(result.stderr).not.toMatch(/internal error/);
  expect(result.status, result.stderr).toBe(c.status);
  const lines = result.stderr.split('\n').filter((l) => l !== '' && !(options.notes && l.startsWith('tabsight: note:')));
  if (c.status !== 0) {
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(c.stderr as RegExp);
  }
  if (c.stdout) expect(result.stdout).toMatch(c.stdout);
  if (c.json) c.json(JSON.parse(result.stdout));
}
