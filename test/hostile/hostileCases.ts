// What every case of the hostile corpus must end with, in-process or as its
// own process: the documented status; for an error exactly one line on
// stderr, matching the case; never a stack trace or an internal error; and
// every input file exactly as it was (bytes, type and mode).
import { spawn, spawnSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import { existsSync, lstatSync, readdirSync, readFileSync, readlinkSync, realpathSync, statSync } from 'node:fs';
import { dirname } from 'node:path';
import { expect } from 'vitest';
import { BIN, run, Run, spawnCli } from '../cli/cliHelpers.js';

export interface HostileCase {
  name: string;
  args: string[];
  /** Standard input; an array arrives in separate reads (in-process cases). */
  stdin?: Buffer | string | Buffer[];
  /** The exit status; for a `signal` case, the status is not looked at. */
  status: number;
  stderr?: RegExp;
  stdout?: RegExp;
  json?: (out: unknown) => void;
  /** A check of the whole standard output (a text, Markdown, CSV or HTML report). */
  stdoutCheck?: (text: string) => void;
  large?: boolean;
  /**
   * How the case runs: in-process (the default), as its own process, through
   * bash (`shell` gives the command line), or as its own process stopped by
   * `signal` once its temporary file is there.
   */
  mode?: 'process' | 'shell' | 'signal';
  /** For shell cases: the command line, given the quoted program with its arguments. */
  shell?: (program: string) => string;
  signal?: NodeJS.Signals;
  env?: Record<string, string>;
  /** Standard error goes elsewhere (a closed pipe): only the status is checked. */
  stderrElsewhere?: boolean;
  /** Checks after the run (the files an output left, a mode kept, no temporary left behind). */
  after?: () => void;
  /** False: the case is not for the engine (it tests the built-in reader or the output side only); 'only': only through the engine. */
  engine?: boolean | 'only';
}

/** The cases the engine can read too: files (not standard input) for the counting commands. */
export function engineCases(cases: HostileCase[]): HostileCase[] {
  return cases.filter((c) => c.engine !== false && ['pair', 'scan', 'count', 'compare'].includes(c.args[0]) && c.args[1] !== '-' && c.stdin === undefined);
}

const quote = (s: string) => `'${s.replace(/'/g, `'\\''`)}'`;

/** A fingerprint of a path: its type, mode and (for a file) the hash of its bytes. */
function fingerprint(path: string): string {
  const link = lstatSync(path);
  if (link.isSymbolicLink()) return `link to ${readlinkSync(path)}: ${fingerprint(realpathSync(path))}`;
  const stats = statSync(path);
  if (!stats.isFile()) return `${stats.mode.toString(8)} ${stats.rdev}`;
  return `${stats.mode.toString(8)} ${createHash('sha256').update(readFileSync(path)).digest('hex')}`;
}

/** The inputs of a case: arguments that name existing files, before the option that names an output. */
function inputsOf(c: HostileCase): string[] {
  const inputs: string[] = [];
  c.args.forEach((arg, k) => {
    if (k > 0 && ['--output', '--plot'].includes(c.args[k - 1])) return;
    if (arg.startsWith('/') && existsSync(arg) && statSync(arg).isFile()) inputs.push(arg);
  });
  return inputs;
}

/** Temporary files (of an atomic write) left in the folders of a case's files. */
function temporariesLeft(c: HostileCase): string[] {
  const folders = new Set(c.args.filter((a) => a.startsWith('/')).map((a) => dirname(a)));
  return [...folders].flatMap((folder) => (existsSync(folder) && statSync(folder).isDirectory() ? readdirSync(folder).filter((f) => /^\..*\.[0-9a-f]{16}\.tmp$/.test(f)) : []));
}

/** Runs a child and stops it with `signal` once a temporary file appears beside `target`. */
function runUntilTemporary(args: string[], env: Record<string, string>, signal: NodeJS.Signals, folder: string): Promise<Run & { signal: NodeJS.Signals | null }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, [BIN, ...args], { env: { ...process.env, NO_COLOR: '1', ...env } });
    let stdout = '';
    let stderr = '';
    child.stdout.on('data', (d) => (stdout += d));
    child.stderr.on('data', (d) => (stderr += d));
    const poll = setInterval(() => {
      if (readdirSync(folder).some((f) => f.endsWith('.tmp'))) {
        clearInterval(poll);
        child.kill(signal);
      }
    }, 20);
    child.on('close', (status, sig) => {
      clearInterval(poll);
      resolve({ status, stdout, stderr, signal: sig });
    });
  });
}

/** Runs a case its way (in-process unless it needs its own process), with the engine when asked. */
export async function runCase(c: HostileCase, options: { engine?: boolean; heap?: string[] } = {}): Promise<Run & { signal?: NodeJS.Signals | null }> {
  const args = options.engine ? [...c.args, '--engine', 'duckdb'] : c.args;
  const env = { NO_COLOR: '1', ...(c.env ?? {}) };
  if (c.mode === 'signal') return runUntilTemporary(args, env, c.signal ?? 'SIGTERM', dirname(args[args.indexOf('--output') + 1]));
  if (c.mode === 'shell') {
    const program = [process.execPath, ...(options.heap ?? []), BIN, ...args].map(quote).join(' ');
    const result = spawnSync('bash', ['-c', c.shell!(program)], { input: Array.isArray(c.stdin) ? Buffer.concat(c.stdin) : c.stdin, encoding: 'utf8', env: { ...process.env, ...env }, maxBuffer: 256 * 1024 * 1024 });
    return { status: result.status, stdout: result.stdout, stderr: result.stderr, signal: result.signal };
  }
  if (c.mode === 'process' || options.heap) return spawnCli(args, Array.isArray(c.stdin) ? Buffer.concat(c.stdin) : (c.stdin ?? ''), env, options.heap ?? []);
  return run(args, c.stdin ?? '', env);
}

/**
 * Runs a case and checks its outcome. With `notes`, the engine's one-line
 * notes (a file handed back to the built-in reader) are set aside first.
 */
export async function checkCase(c: HostileCase, options: { engine?: boolean; heap?: string[] } = {}): Promise<void> {
  const inputs = inputsOf(c);
  const before = inputs.map(fingerprint);
  const result = await runCase(c, options);
  expectOutcome(c, result, { notes: options.engine });
  expect(inputs.map(fingerprint), 'an input changed').toEqual(before);
  expect(temporariesLeft(c), 'a temporary file was left behind').toEqual([]);
  c.after?.();
}

export function expectOutcome(c: HostileCase, result: Run & { signal?: NodeJS.Signals | null }, options: { notes?: boolean } = {}): void {
  expect(result.stderr).not.toMatch(/\n\s+at .*:\d+:\d+/);
  expect(result.stderr).not.toMatch(/internal error/);
  if (c.mode === 'signal') {
    expect(result.signal, result.stderr).toBe(c.signal ?? 'SIGTERM');
    return;
  }
  expect(result.status, result.stderr).toBe(c.status);
  const lines = result.stderr.split('\n').filter((l) => l !== '' && !(options.notes && l.startsWith('tabsight: note:')));
  if (c.status !== 0 && !c.stderrElsewhere) {
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(c.stderr as RegExp);
  } else if (c.stderr) expect(result.stderr).toMatch(c.stderr);
  if (c.stdout) expect(result.stdout).toMatch(c.stdout);
  if (c.json) c.json(JSON.parse(result.stdout));
  c.stdoutCheck?.(result.stdout);
}
