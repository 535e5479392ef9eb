// Running the command line in tests: in-process through run(args, io) with
// captured streams (most checks), or as a real process through
// bin/tabsight.js (the few end-to-end checks: pipes, the built program).
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import { run as runProgram } from '../../src/cli/main.js';
import type { CliIo, OutputStream } from '../../src/cli/output.js';
import { ROOT } from '../helpers.js';

export const BIN = join(ROOT, 'bin', 'tabsight.js');
export const DEMO = join(ROOT, 'fixtures', 'demo', 'patron-survey.csv');

export interface Run {
  status: number | null;
  stdout: string;
  stderr: string;
}

/** A stream that keeps what is written to it (never a terminal). */
class Captured implements OutputStream {
  private readonly chunks: string[] = [];
  readonly isTTY = false;
  write(text: string, callback?: (error?: Error | null) => void): boolean {
    this.chunks.push(text);
    callback?.(null);
    return true;
  }
  once(): this {
    return this;
  }
  get text(): string {
    return this.chunks.join('');
  }
}

/**
 * Runs tabsight in this process with `input` on standard input (an array:
 * in separate reads) and only
 * `env` as the environment; resolves with the exit status and what was
 * written. A bug (anything but the tool's own error) rejects, so the test
 * fails with its stack.
 */
export async function run(args: string[], input?: string | Buffer | Buffer[], env: Record<string, string> = {}): Promise<Run> {
  const stdout = new Captured();
  const stderr = new Captured();
  // An array arrives as separate reads, as a pipe delivers them.
  const chunks = input === undefined ? [] : Array.isArray(input) ? input : [Buffer.from(input)];
  const stdin = Object.assign(Readable.from(chunks), { isTTY: false });
  const io: CliIo = { stdin, stdout, stderr, env };
  const { status } = await runProgram(args, io);
  return { status, stdout: stdout.text, stderr: stderr.text };
}

export async function runJson(args: string[], input?: string | Buffer, env: Record<string, string> = {}): Promise<any> {
  const result = await run([...args, '--format', 'json'], input, env);
  if (result.status !== 0) throw new Error(`exit ${result.status}: ${result.stderr}`);
  return JSON.parse(result.stdout);
}

/** Runs the built program (bin/tabsight.js) as its own process: for the end-to-end checks only. */
export function spawnCli(args: string[], input?: string | Buffer, env: Record<string, string> = {}, nodeOptions: string[] = []): Run & { signal: NodeJS.Signals | null } {
  const result = spawnSync(process.execPath, [...nodeOptions, BIN, ...args], {
    input,
    encoding: 'utf8',
    env: { ...process.env, NO_COLOR: '', FORCE_COLOR: '0', ...env },
    maxBuffer: 256 * 1024 * 1024,
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr, signal: result.signal };
}

const dir = mkdtempSync(join(tmpdir(), 'tabsight-test-'));

/** Writes a temporary file and returns its path. */
export function tempFile(name: string, content: string | Buffer): string {
  const path = join(dir, name);
  writeFileSync(path, content);
  return path;
}

/** Expands a table of counts into one CSV row per observation. */
export function expandTable(rowName: string, colName: string, rowLevels: string[], colLevels: string[], counts: number[][], delimiter = ',', eol = '\n'): string {
  const lines = [`${rowName}${delimiter}${colName}`];
  counts.forEach((row, i) => row.forEach((count, j) => {
    for (let k = 0; k < count; k++) lines.push(`${rowLevels[i]}${delimiter}${colLevels[j]}`);
  }));
  return lines.join(eol) + eol;
}
