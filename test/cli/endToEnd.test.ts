// The few checks that need the real process: bin/tabsight.js as built,
// standard input through a pipe, a pipe closed by the reader, the exit
// status as the shell sees it. Everything else runs in-process (cliHelpers.ts).
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { ROOT } from '../helpers.js';
import { BIN, DEMO, spawnCli } from './cliHelpers.js';

describe('bin/tabsight.js, end to end', () => {
  it('--version prints the version of package.json', () => {
    const { version } = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
    const r = spawnCli(['--version']);
    expect(r.status).toBe(0);
    expect(r.stdout.trim()).toBe(version);
  });

  it('reads standard input from a pipe and writes JSON to standard output', () => {
    const r = spawnCli(['pair', '-', '--rows', 'membership', '--cols', 'has_children', '--format', 'json'], readFileSync(DEMO));
    expect(r.status, r.stderr).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.input.file).toBe('standard input');
    expect(out.unweightedN).toBeGreaterThan(0);
  });

  it('exit statuses as the shell sees them: 0 found, 3 not found with --exit-status, 1 data, 2 usage (README table)', () => {
    expect(spawnCli(['pair', DEMO, '--rows', 'age_band', '--cols', 'preferred_format', '--exit-status']).status).toBe(0);
    expect(spawnCli(['pair', DEMO, '--rows', 'branch', '--cols', 'membership', '--exit-status']).status).toBe(3);
    const missing = spawnCli(['pair', '/no/such.csv', '--rows', 'a', '--cols', 'b']);
    expect(missing.status).toBe(1);
    expect(missing.stderr).toBe('tabsight: /no/such.csv: no such file\n');
    expect(spawnCli(['pair', DEMO, '--rows', 'branch']).status).toBe(2);
  });

  it('a closed pipe ends quietly with status 0', () => {
    // pipefail: the pipeline's status is tabsight's own, even though head closed the pipe early
    const r = spawnSync('bash', ['-c', `set -o pipefail; "${process.execPath}" "${BIN}" scan "${DEMO}" --format json --full | head -c 100`], { encoding: 'utf8' });
    expect(r.status).toBe(0);
    expect(r.stdout).toMatch(/^\{/);
    expect(r.stderr).toBe('');
  });
});
