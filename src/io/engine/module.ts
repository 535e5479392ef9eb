/**
 * Loading the embedded engine: DuckDB through the optional package
 * @duckdb/node-api, imported on first use only (one in-memory database per
 * module name), and the one-line hint when the package is not installed.
 *
 * The engine stays inside the machine and leaves nothing behind: it never
 * installs or loads extension code on its own (so a URL cannot make it fetch
 * code from the network), keeps no persistent secrets, and keeps its home,
 * extension, secret and spill folders in one temporary folder of the run,
 * removed when the process ends (normally, or by SIGINT, SIGTERM or SIGHUP
 * during a query); the configuration is locked, so no query can change it.
 */
import { randomBytes } from 'node:crypto';
import { rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { atProcessEnd, withSignalCleanup } from '../../cleanup.js';
import { usageError } from '../../errors.js';
import { ENGINE_PACKAGE, ENGINE_VERSION } from '../../version.js';

/** An open engine: runs one SQL statement and gives its rows. */
export interface Engine {
  query(sql: string): Promise<unknown[][]>;
  /**
   * Runs a query whose columns are numbers without NULLs and hands its
   * result chunk by chunk: each column as an array of `rows` numbers (valid
   * only during the call: a typed array over the engine's own memory).
   */
  numericChunks(sql: string, visit: (columns: ArrayLike<number>[], rows: number) => void): Promise<void>;
}

interface Vector {
  getItem(index: number): unknown;
}

interface Connection {
  runAndReadAll(sql: string): Promise<{ getRows(): unknown[][] }>;
  stream(sql: string): Promise<{ fetchChunk(): Promise<{ rowCount: number; columnCount: number; getColumnVector(index: number): Vector } | null> }>;
}

/** A vector's numbers: its typed array of items where the package exposes one (its vectors keep them in `items`), else item by item. */
function numbersOf(vector: Vector, rows: number): ArrayLike<number> {
  const items = (vector as { items?: unknown }).items;
  if (ArrayBuffer.isView(items) && !(items instanceof DataView) && (items as unknown as ArrayLike<number>).length >= rows) return items as unknown as ArrayLike<number>;
  return Float64Array.from({ length: rows }, (_v, i) => Number(vector.getItem(i)));
}

const opened = new Map<string, Promise<Engine>>();

/**
 * The engine's settings (see the top of this file). Its folder is a fresh
 * path that the engine creates only when it needs it (to spill a large
 * query), and that is removed when the process ends, or by a signal during
 * a query (src/cleanup.ts).
 */
export function engineSettings(): Record<string, string> {
  const home = join(tmpdir(), `tabsight-engine-${process.pid}-${randomBytes(6).toString('hex')}`);
  atProcessEnd(() => rmSync(home, { recursive: true, force: true }));
  return {
    autoinstall_known_extensions: 'false',
    autoload_known_extensions: 'false',
    allow_community_extensions: 'false',
    allow_unsigned_extensions: 'false',
    allow_persistent_secrets: 'false',
    home_directory: home,
    extension_directory: join(home, 'extensions'),
    secret_directory: join(home, 'secrets'),
    temp_directory: join(home, 'spill'),
    lock_configuration: 'true',
  };
}

/**
 * The engine of the package `specifier` (the optional package by default; a
 * test names a missing module to stand for a machine without it).
 */
export function openEngine(specifier: string = ENGINE_PACKAGE): Promise<Engine> {
  let engine = opened.get(specifier);
  if (engine === undefined) {
    engine = (async () => {
      let module: { DuckDBInstance: { create(path: string, options: Record<string, string>): Promise<{ connect(): Promise<Connection> }> } };
      try {
        module = await import(specifier);
      } catch {
        throw usageError(`--engine duckdb needs the optional package ${ENGINE_PACKAGE}, which is not installed; add it with "npm install ${ENGINE_PACKAGE}@${ENGINE_VERSION}", or use --engine builtin`);
      }
      const connection = await (await module.DuckDBInstance.create(':memory:', engineSettings())).connect();
      return {
        query: (sql: string) => withSignalCleanup(async () => (await connection.runAndReadAll(sql)).getRows()),
        numericChunks: (sql: string, visit: (columns: ArrayLike<number>[], rows: number) => void) =>
          withSignalCleanup(async () => {
            const result = await connection.stream(sql);
            for (let chunk = await result.fetchChunk(); chunk !== null && chunk.rowCount > 0; chunk = await result.fetchChunk()) {
              const rows = chunk.rowCount;
              visit(Array.from({ length: chunk.columnCount }, (_v, k) => numbersOf(chunk.getColumnVector(k), rows)), rows);
            }
          }),
      };
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
