/**
 * Loading the embedded engine: DuckDB through the optional package
 * @duckdb/node-api, imported on first use only (one in-memory database per
 * module name), and the one-line hint when the package is not installed.
 */
import { usageError } from '../../errors.js';
import { ENGINE_PACKAGE, ENGINE_VERSION } from '../../version.js';

/** An open engine: runs one SQL statement and gives its rows. */
export interface Engine {
  query(sql: string): Promise<unknown[][]>;
}

interface Connection {
  runAndReadAll(sql: string): Promise<{ getRows(): unknown[][] }>;
}

const opened = new Map<string, Promise<Engine>>();

/**
 * The engine of the package `specifier` (the optional package by default; a
 * test names a missing module to stand for a machine without it).
 */
export function openEngine(specifier: string = ENGINE_PACKAGE): Promise<Engine> {
  let engine = opened.get(specifier);
  if (engine === undefined) {
    engine = (async () => {
      let module: { DuckDBInstance: { create(path: string): Promise<{ connect(): Promise<Connection> }> } };
      try {
        module = await import(specifier);
      } catch {
        throw usageError(`--engine duckdb needs the optional package ${ENGINE_PACKAGE}, which is not installed; add it with "npm install ${ENGINE_PACKAGE}@${ENGINE_VERSION}", or use --engine builtin`);
      }
      const connection = await (await module.DuckDBInstance.create(':memory:')).connect();
      return { query: async (sql: string) => (await connection.runAndReadAll(sql)).getRows() };
    })();
    opened.set(specifier, engine);
    engine.catch(() => opened.delete(specifier));
  }
  return engine;
}

/** Whether the engine's package can be loaded here (for --engine auto, and for the tests). */
export async function engineAvailable(specifier: string = ENGINE_PACKAGE): Promise<boolean> {
  try {
    await openEngine(specifier);
    return true;
  } catch {
    return false;
  }
}
