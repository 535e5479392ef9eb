/**
 * Engine errors, handled once: an engine message cut to its first line, a
 * failed read of a single CSV file handed back to the built-in reader
 * (EngineFallback), any other failure turned into the tool's one line
 * naming the input.
 */
import { dataError, TabsightError } from '../../errors.js';
import type { EngineInput } from './files.js';
import type { Engine } from './module.js';

/** Raised when the engine cannot read a file the tool's way; the built-in reader then reads it (io/counting.ts). */
export class EngineFallback extends Error {}

/**
 * Raised when the engine cannot read a pattern of CSV files: the built-in
 * reader then reads each file, so that the one line names the file and the
 * line at fault (io/counting.ts); this message stands when none is.
 */
export class PatternFailure extends Error {
  constructor(readonly oneLine: Error) {
    super(oneLine.message);
  }
}

function patternFailure(input: EngineInput, message: string): Error {
  const oneLine = dataError(`${input.label}: the engine could not read the input (${message}); --engine builtin reads one CSV file at a time and names the line`);
  return input.format === 'csv' ? new PatternFailure(oneLine) : oneLine;
}

/** The first line of an engine message, without its class prefix ("IO Error: …"). */
export function engineMessage(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  const first = text.split('\n').map((l) => l.trim()).find((l) => l !== '') ?? text;
  return first.replace(/^[A-Za-z ]*Error:\s*/, '');
}

/** Runs SQL; an engine error becomes `describe(its message)` (the tool's own errors pass through). */
export async function querySql(engine: Engine, sql: string, describe: (message: string) => Error): Promise<unknown[][]> {
  try {
    return await engine.query(sql);
  } catch (error) {
    if (error instanceof TabsightError) throw error;
    throw describe(engineMessage(error));
  }
}

/**
 * Runs SQL that reads the input. When the engine fails on a single CSV
 * file, the built-in reader reads the file instead (and names the line, if
 * there is a fault); for Parquet and patterns the failure is one line.
 */
export function queryInput(engine: Engine, input: EngineInput, sql: string): Promise<unknown[][]> {
  return querySql(engine, sql, (message) =>
    input.format === 'csv' && !input.glob ? new EngineFallback(message) : patternFailure(input, message),
  );
}

/** Streams the numeric columns of a query that reads the input (see Engine.numericChunks), with queryInput's handling of engine errors. */
export async function chunksOfInput(engine: Engine, input: EngineInput, sql: string, visit: (columns: ArrayLike<number>[], rows: number) => void): Promise<void> {
  let failedVisit: unknown = null;
  try {
    await engine.numericChunks(sql, (columns, rows) => {
      try {
        visit(columns, rows);
      } catch (error) {
        failedVisit = error;
        throw error;
      }
    });
  } catch (error) {
    // The tool's own errors, and faults of `visit` (bugs), pass through.
    if (error instanceof TabsightError || error === failedVisit) throw error;
    const message = engineMessage(error);
    throw input.format === 'csv' && !input.glob ? new EngineFallback(message) : patternFailure(input, message);
  }
}
