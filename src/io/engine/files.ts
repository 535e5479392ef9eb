/**
 * Which files the engine reads: one named file, or the files a pattern
 * (globbing: *, ?, [...]) matches, and whether they are CSV or Parquet.
 */
import { dataError, usageError } from '../../errors.js';
import { promises as fs } from 'node:fs';
import { checkFile, InputSource } from '../source.js';
import type { Engine } from './module.js';
import { querySql } from './query.js';
import { sqlLiteral } from './sql.js';

export type InputFormat = 'csv' | 'parquet';

export interface EngineInput {
  label: string;
  format: InputFormat;
  files: string[];
  /** A pattern that matched files (as opposed to one named file). */
  glob: boolean;
}

const GLOB = /[*?[]/;
const PARQUET = /\.(parquet|parq|pq)$/i;

/**
 * Whether a path is a pattern of files: it has *, ? or [ and no file of
 * that name exists (a name that exists is that file, brackets and all; to
 * read it as a pattern anyway, make one more character a class, as in
 * week[1].cs[v]).
 */
export async function isPattern(path: string): Promise<boolean> {
  if (!GLOB.test(path)) return false;
  try {
    await fs.lstat(path);
    return false;
  } catch {
    return true;
  }
}

export function isParquetPath(path: string): boolean {
  return PARQUET.test(path);
}

/** Resolves the input: one file or the files a pattern matches, in name order, and their format (the engine is opened only for a pattern). */
export async function engineInput(source: InputSource, engine: () => Promise<Engine>): Promise<EngineInput> {
  if (source.path === '-') throw usageError('--engine duckdb reads files, not standard input; give a file or a pattern, or use --engine builtin');
  const format: InputFormat = isParquetPath(source.path) ? 'parquet' : 'csv';
  if (!(await isPattern(source.path))) {
    const stats = await checkFile(source);
    if (!stats.isFile()) throw usageError(`--engine duckdb reads files; ${source.label} is a stream (a pipe, FIFO or device), which the built-in reader reads once: use --engine builtin`);
    return { label: source.label, format, files: [source.path], glob: false };
  }
  const rows = await querySql(await engine(), `SELECT file FROM glob(${sqlLiteral(source.path)}) ORDER BY file`, (message) => dataError(`${source.label}: ${message}`));
  const files = rows.map((r) => String(r[0]));
  if (files.length === 0) throw dataError(`${source.label}: no file matches this pattern`);
  return { label: source.label, format, files, glob: true };
}
