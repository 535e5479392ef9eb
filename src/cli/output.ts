import { closeSync, openSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { Chalk, ChalkInstance } from 'chalk';
import { dataError } from '../errors.js';

export type Format = 'text' | 'json' | 'csv' | 'tsv' | 'markdown' | 'html';

/** Colour only for a terminal, never when NO_COLOR is set, --no-color is given or output goes to a file. */
export function painter(colorOption: boolean | undefined, toFile = false): ChalkInstance {
  const wanted = !toFile && colorOption !== false && process.stdout.isTTY === true && !('NO_COLOR' in process.env && process.env.NO_COLOR !== '');
  return new Chalk({ level: wanted ? 1 : 0 });
}

export function writeOut(text: string): Promise<void> {
  return new Promise((resolve) => {
    if (process.stdout.write(text)) resolve();
    else process.stdout.once('drain', () => resolve());
  });
}

/**
 * Writes a report to a file atomically: into a temporary file beside it,
 * then renamed over the target, so that a failed run never leaves a
 * half-written report. TABSIGHT_FAIL_WRITE_AFTER (bytes) injects a failure
 * mid-write, for the tests.
 */
export function writeFileAtomically(path: string, text: string): void {
  const temporary = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  const bytes = Buffer.from(text, 'utf8');
  const failAfter = process.env.TABSIGHT_FAIL_WRITE_AFTER === undefined ? Infinity : Number(process.env.TABSIGHT_FAIL_WRITE_AFTER);
  let fd: number;
  try {
    fd = openSync(temporary, 'w');
  } catch (error) {
    throw dataError(`--output ${path}: cannot write (${(error as NodeJS.ErrnoException).code ?? 'error'})`);
  }
  try {
    let written = 0;
    while (written < bytes.length) {
      const size = Math.min(1 << 16, bytes.length - written);
      if (written + size > failAfter) throw Object.assign(new Error('injected write failure'), { code: 'EIO' });
      written += writeSync(fd, bytes, written, size);
    }
    closeSync(fd);
    renameSync(temporary, path);
  } catch (error) {
    try {
      closeSync(fd);
    } catch {
      // already closed
    }
    try {
      unlinkSync(temporary);
    } catch {
      // nothing to remove
    }
    throw dataError(`--output ${path}: writing failed (${(error as NodeJS.ErrnoException).code ?? 'error'}); the previous file, if any, is untouched`);
  }
}

/** Sends a report to --output (atomically) or to standard output. */
export async function emit(text: string, output: string | undefined): Promise<void> {
  if (output !== undefined) writeFileAtomically(output, text);
  else await writeOut(text);
}
