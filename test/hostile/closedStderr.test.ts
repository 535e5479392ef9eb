// Hostile corpus, class 6: the exit status never depends on whether
// standard error could be written. Each run's standard error is a pipe whose
// reader has gone (closed by the parent before the program writes its one
// line, so that the write fails with EPIPE): the status is still the one the
// outcome documents (README, "Exit statuses").
import { spawn } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { BIN, DEMO } from '../cli/cliHelpers.js';

/** Runs the program with standard error a pipe whose reading end is closed at once; resolves to its status. */
function statusWithStderrGone(args: string[]): Promise<{ status: number | null; signal: NodeJS.Signals | null }> {
  return new Promise((resolve) => {
    // Standard output a pipe that is read and dropped: 'ignore' would hand the child /dev/null opened for reading and
    // writing, which Linux cannot tell from a standard output closed with >&- (README, "Failures and what the tool guarantees").
    const child = spawn(process.execPath, [BIN, ...args], { stdio: ['ignore', 'pipe', 'pipe'], env: { ...process.env, NO_COLOR: '1' } });
    child.stdout.resume();
    child.stderr.destroy();
    child.on('close', (status, signal) => resolve({ status, signal }));
  });
}

describe('standard error a pipe whose reader has exited: the status stays the documented one', () => {
  it('a usage error (an unknown option) is status 2', async () => {
    expect(await statusWithStderrGone(['pair', 'x', '--bogus'])).toEqual({ status: 2, signal: null });
  });
  it('a usage error (an unknown column) is status 2', async () => {
    expect(await statusWithStderrGone(['pair', DEMO, '--rows', 'nosuch', '--cols', 'branch'])).toEqual({ status: 2, signal: null });
  });
  it('a file that does not exist is status 1', async () => {
    expect(await statusWithStderrGone(['pair', `${DEMO}.missing`, '--rows', 'branch', '--cols', 'membership'])).toEqual({ status: 1, signal: null });
  });
  it('no association under --exit-status is status 3', async () => {
    // branch × has_children in the demo survey: no association at α 0.05 (the report's own verdict, stdout discarded).
    expect(await statusWithStderrGone(['pair', DEMO, '--rows', 'branch', '--cols', 'has_children', '--exit-status'])).toEqual({ status: 3, signal: null });
  });
  it('a note that cannot be written (a --where value no row holds) leaves status 0', async () => {
    expect(await statusWithStderrGone(['count', DEMO, '--rows', 'branch', '--cols', 'membership', '--where', 'branch!=Nowhere'])).toEqual({ status: 0, signal: null });
  });
});
