/**
 * Where a run's text goes: the streams and environment a run is given
 * (CliIo: the process's own, or a test's), standard output or an --output
 * file written atomically, notes on standard error, and colour.
 */
import { closeSync, openSync, renameSync, unlinkSync, writeSync } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { Chalk, ChalkInstance } from 'chalk';
import { dataError } from '../errors.js';

/** A stream a run writes to; isTTY is true only for a terminal. */
export interface OutputStream {
  write(text: string): boolean;
  once(event: 'drain', listener: () => void): unknown;
  isTTY?: boolean;
}

/** What a run reads from and writes to: the process's streams in bin/tabsight.js, captured ones in tests. */
export interface CliIo {
  stdin: NodeJS.ReadableStream & { isTTY?: boolean };
  stdout: OutputStream;
  stderr: OutputStream;
  env: Readonly<Record<string, string | undefined>>;
}

/** The process's own streams and environment. */
export function processIo(): CliIo {
  return { stdin: process.stdin, stdout: process.stdout, stderr: process.stderr, env: process.env };
}

/** Colour only for a terminal, never when NO_COLOR is set, --no-color is given or output goes to a file. */
export function painter(io: CliIo, colorOption: boolean | undefined, toFile = false): ChalkInstance {
  const noColor = io.env.NO_COLOR !== undefined && io.env.NO_COLOR !== '';
  const wanted = !toFile && colorOption !== false && io.stdout.isTTY === true && !noColor;
  return new Chalk({ level: wanted ? 1 : 0 });
}

/** Writes to standard output, waiting while the stream is full. */
export function writeOut(io: CliIo, text: string): Promise<void> {
  return new Promise((resolve) => {
    if (io.stdout.write(text)) resolve();
    else io.stdout.once('drain', () => resolve());
  });
}

/** A one-line note on standard error (for example, that the engine handed a file back to the built-in reader). */
export function noteWriter(io: CliIo): (note: string) => void {
  return (note) => io.stderr.write(`tabsight: note: ${note}\n`);
}

/**
 * Writes a report to a file atomically: into a temporary file beside it,
 * then renamed over the target, so that a failed run never leaves a
 * half-written report. `failAfter` (bytes; TABSIGHT_FAIL_WRITE_AFTER in the
 * environment) injects a failure mid-write, for the tests.
 */
export function writeFileAtomically(path: string, text: string, failAfter = Infinity): void {
  const temporary = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  const bytes = Buffer.from(text, 'utf8');
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

/** The injected write failure of the environment, if any (see writeFileAtomically). */
function injectedFailure(io: CliIo): number {
  const value = io.env.TABSIGHT_FAIL_WRITE_AFTER;
  return value === undefined ? Infinity : Number(value);
}

/** Writes a file beside the report (--plot), atomically. */
export function writeSideFile(io: CliIo, path: string, text: string): void {
  writeFileAtomically(path, text, injectedFailure(io));
}

/** Sends a report to --output (atomically) or to standard output. */
export async function emit(io: CliIo, text: string, output: string | undefined): Promise<void> {
  if (output !== undefined) writeFileAtomically(output, text, injectedFailure(io));
  else await writeOut(io, text);
}

/** Page width of a text report: the terminal's when printing to one (at least 60 columns), 80 otherwise. */
export function pageWidth(io: CliIo, toFile: boolean): number {
  const columns = (io.stdout as { columns?: number }).columns;
  if (!toFile && io.stdout.isTTY === true && typeof columns === 'number' && columns > 0) return Math.max(60, columns);
  return 80;
}
