/**
 * Where a run's text goes: the streams and environment a run is given
 * (CliIo: the process's own, or a test's), standard output or an --output
 * file, notes on standard error, and colour. The writing itself, and the
 * rules that keep outputs from destroying data, live in src/output.
 */
import { Chalk, ChalkInstance } from 'chalk';
import { messageLine } from '../escape/terminal.js';
import { OutputGuard, OutputTarget } from '../output/guard.js';
import { writeTarget, WriteHooks } from '../output/atomicWrite.js';
import { OutputStream, processStandardError, processStandardOutput, writeStandardOutput } from '../output/standardOutput.js';

export type { OutputStream };

/** What a run reads from and writes to: the process's streams in bin/tabsight.js, captured ones in tests. */
export interface CliIo {
  stdin: NodeJS.ReadableStream & { isTTY?: boolean; fd?: number };
  stdout: OutputStream;
  stderr: OutputStream;
  env: Readonly<Record<string, string | undefined>>;
}

/** The runs on the process's own streams (processIo), whose standard input is descriptor 0. */
const processRuns = new WeakSet<CliIo>();

/**
 * The process's own streams and environment (standard output with checked
 * writes: src/output/standardOutput.ts). Node makes its standard input and
 * error streams when they are first asked for, and making them loads the
 * stream modules: a run that reads a file and writes no note never does.
 */
export function processIo(): CliIo {
  const io: CliIo = {
    get stdin() {
      return process.stdin;
    },
    stdout: processStandardOutput(),
    stderr: processStandardError(),
    env: process.env,
  };
  processRuns.add(io);
  return io;
}

/** Colour only for a terminal, never when NO_COLOR is set, --no-color is given or output goes to a file. */
export function painter(io: CliIo, colorOption: boolean | undefined, toFile = false): ChalkInstance {
  const noColor = io.env.NO_COLOR !== undefined && io.env.NO_COLOR !== '';
  const wanted = !toFile && colorOption !== false && io.stdout.isTTY === true && !noColor;
  return new Chalk({ level: wanted ? 1 : 0 });
}

/** Writes to standard output and waits until the text is out; a failed write is one line (a closed pipe ends quietly). */
export function writeOut(io: CliIo, text: string): Promise<void> {
  return writeStandardOutput(io.stdout, text);
}

/** A one-line note on standard error (for example, that the engine handed a file back to the built-in reader). */
export function noteWriter(io: CliIo): (note: string) => void {
  return (note) => io.stderr.write(`tabsight: note: ${messageLine(note)}\n`);
}

/** The test hooks of the environment (see WriteHooks). */
function writeHooks(io: CliIo): WriteHooks {
  const number = (value: string | undefined) => (value === undefined || value === '' ? undefined : Number(value));
  return { failAfter: number(io.env.TABSIGHT_FAIL_WRITE_AFTER), pauseAfter: number(io.env.TABSIGHT_PAUSE_WRITE_AFTER) };
}

/**
 * The guard of a run's outputs: refuses (status 2) an --output or --plot
 * that is an input, or both naming one file. Call `checkInputs` with the
 * run's inputs before reading them.
 */
export function outputGuard(io: CliIo, targets: { output?: string; plot?: string }): OutputGuard {
  const named = [targets.output !== undefined ? { option: '--output', path: targets.output } : null, targets.plot !== undefined ? { option: '--plot', path: targets.plot } : null];
  return new OutputGuard(named, processRuns.has(io) ? 0 : null);
}

/** Writes a file beside the report (--plot). */
export function writeSideFile(io: CliIo, path: string, text: string, option = '--plot'): Promise<void> {
  return writeTarget({ option, path }, text, writeHooks(io));
}

/** Sends a report to --output (a file, written atomically) or to standard output. */
export async function emit(io: CliIo, text: string, output: string | undefined): Promise<void> {
  if (output !== undefined) await writeTarget({ option: '--output', path: output }, text, writeHooks(io));
  else await writeOut(io, text);
}

/** Sends a binary report (a spreadsheet) to --output (a file, written atomically) or to standard output. */
export async function emitBytes(io: CliIo, bytes: Uint8Array, output: string | undefined): Promise<void> {
  if (output !== undefined) await writeTarget({ option: '--output', path: output }, bytes, writeHooks(io));
  else await writeStandardOutput(io.stdout, bytes);
}

export type { OutputTarget };

/** Page width of a text report: the terminal's when printing to one (at least 60 columns), 80 otherwise. */
export function pageWidth(io: CliIo, toFile: boolean): number {
  const columns = (io.stdout as { columns?: number }).columns;
  if (!toFile && io.stdout.isTTY === true && typeof columns === 'number' && columns > 0) return Math.max(60, columns);
  return 80;
}
