import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ROOT } from '../helpers.js';

export const BIN = join(ROOT, 'bin', 'tabsight.js');
export const DEMO = join(ROOT, 'fixtures', 'demo', 'patron-survey.csv');

export interface Run {
  status: number | null;
  stdout: string;
  stderr: string;
}

export function run(args: string[], input?: string | Buffer, env: Record<string, string> = {}): Run {
  const result = spawnSync(process.execPath, [BIN, ...args], {
    input,
    encoding: 'utf8',
    env: { ...process.env, NO_COLOR: '', FORCE_COLOR: '0', ...env },
    maxBuffer: 64 * 1024 * 1024,
    timeout: 60_000,
  });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

export function runJson(args: string[], input?: string | Buffer): any {
  const result = run([...args, '--format', 'json'], input);
  if (result.status !== 0) throw new Error(`exit ${result.status}: ${result.stderr}`);
  return JSON.parse(result.stdout);
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
