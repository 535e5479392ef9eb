import { promises as fs, createReadStream } from 'node:fs';
import { dataError, TabsightError, usageError } from '../errors.js';
import { readRecords, ReaderOptions } from './readRecords.js';
import { checkFile, InputSource, isGzipFile, rawChunks } from './source.js';
import type { WeightKind } from './rowRules.js';
import { ENGINE_PACKAGE, ENGINE_VERSION } from '../version.js';

/**
 * Counting in an embedded analytical engine (DuckDB, through the optional
 * package @duckdb/node-api). The engine only groups and counts: it returns
 * one line per distinct combination of the selected columns' values, with
 * the number of rows and exact sums of the weights, and every rule of the
 * tool (missing values, recodes, filters, weights, layers) is then applied
 * to those lines by the same code that handles rows from the built-in
 * reader. Values are read as text and grouped as they are; the trim and
 * the missing-value rule are the reader's own, applied to each group.
 */


export type EngineName = 'builtin' | 'duckdb';
export type EngineChoice = EngineName | 'auto';

/** Plain CSV files at least this large go to the engine under --engine auto (see README, benchmark). */
export const AUTO_ENGINE_BYTES = 256 * 1024 * 1024;

interface Reader {
  getRows(): unknown[][];
}
interface Connection {
  runAndReadAll(sql: string): Promise<Reader>;
  closeSync?(): void;
}

let connection: Promise<Connection> | null = null;

/** The engine's module, loaded on first use only; one line says how to add it when it is absent. */
async function connect(): Promise<Connection> {
  if (connection === null) {
    connection = (async () => {
      const specifier = process.env.TABSIGHT_ENGINE_MODULE ?? ENGINE_PACKAGE; // the variable lets a test stand for a machine without it
      let module: { DuckDBInstance: { create(path: string): Promise<{ connect(): Promise<Connection> }> } };
      try {
        module = await import(specifier);
      } catch {
        throw usageError(`--engine duckdb needs the optional package ${ENGINE_PACKAGE}, which is not installed; add it with "npm install ${ENGINE_PACKAGE}@${ENGINE_VERSION}", or use --engine builtin`);
      }
      const instance = await module.DuckDBInstance.create(':memory:');
      return instance.connect();
    })();
    connection.catch(() => (connection = null));
  }
  return connection;
}

/** Whether the engine's package can be loaded here (for --engine auto). */
export async function engineAvailable(): Promise<boolean> {
  try {
    await connect();
    return true;
  } catch {
    return false;
  }
}

/** Raised when the engine cannot read a file the tool's way; the built-in reader then reads it. */
export class EngineFallback extends Error {}

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

export function isGlob(path: string): boolean {
  return GLOB.test(path);
}

export function isParquetPath(path: string): boolean {
  return PARQUET.test(path);
}

export function sqlString(text: string): string {
  return `'${text.replace(/'/g, "''")}'`;
}

function sqlIdentifier(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

/** The first line of an engine message, without its class prefix ("IO Error: …"). */
export function engineMessage(error: unknown): string {
  const text = error instanceof Error ? error.message : String(error);
  const first = text.split('\n').map((l) => l.trim()).find((l) => l !== '') ?? text;
  return first.replace(/^[A-Za-z ]*Error:\s*/, '');
}

export async function run(sql: string): Promise<unknown[][]> {
  const db = await connect();
  const reader = await db.runAndReadAll(sql);
  return reader.getRows();
}

/** Resolves the input: one file or the files a pattern matches, and their format. */
export async function engineInput(source: InputSource): Promise<EngineInput> {
  if (source.path === '-') throw usageError('--engine duckdb reads files, not standard input; give a file or a pattern, or use --engine builtin');
  const format: InputFormat = isParquetPath(source.path) ? 'parquet' : 'csv';
  if (!isGlob(source.path)) {
    await checkFile(source);
    return { label: source.label, format, files: [source.path], glob: false };
  }
  let rows: unknown[][];
  try {
    rows = await run(`SELECT file FROM glob(${sqlString(source.path)}) ORDER BY file`);
  } catch (error) {
    if (error instanceof TabsightError) throw error;
    throw dataError(`${source.label}: ${engineMessage(error)}`);
  }
  const files = rows.map((r) => String(r[0]));
  if (files.length === 0) throw dataError(`${source.label}: no file matches this pattern`);
  return { label: source.label, format, files, glob: true };
}

interface CsvFileLayout {
  file: string;
  header: string[];
  /** Lines before the header (blank lines the reader skips). */
  skip: number;
  delimiter: string;
  gzip: boolean;
}

/** Reads a CSV file's header with the built-in reader (the first megabyte or so). */
async function csvLayout(file: string, reader: ReaderOptions): Promise<CsvFileLayout> {
  const source: InputSource = { path: file, label: file };
  if (reader.encoding !== undefined && !/^utf-?8$/i.test(reader.encoding)) throw new EngineFallback(`--encoding ${reader.encoding}`);
  for await (const head of rawChunks(source)) {
    if ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff)) throw new EngineFallback('the file is UTF-16');
    break;
  }
  const found: { header: string[]; line: number; delimiter: string } = { header: [], line: 1, delimiter: ',' };
  const stop = new Error('header read');
  try {
    await readRecords(source, reader, (header, line, delimiter) => {
      found.header = header;
      found.line = line;
      found.delimiter = delimiter;
      throw stop;
    }, () => undefined);
  } catch (error) {
    if (error !== stop) throw error;
  }
  return { file, header: found.header, skip: found.line - 1, delimiter: found.delimiter, gzip: await isGzipFile(file) };
}

/**
 * Empty lines outside quoted fields: the engine skips them without a word,
 * the built-in reader counts them, so they are counted here. Most files have
 * none, which a native search for two line ends in a row settles quickly.
 */
async function countEmptyLines(file: string, gzip: boolean): Promise<number> {
  const chunks = async function* () {
    for await (const chunk of rawChunks({ path: file, label: file })) yield chunk;
  };
  if (!gzip) {
    let any = false;
    let previous = -1;
    for await (const raw of createReadStream(file, { highWaterMark: 1 << 22 })) {
      const chunk = raw as Buffer;
      if (previous === 0x0a && (chunk[0] === 0x0a || chunk[0] === 0x0d)) any = true;
      if (previous === 0x0d && chunk[0] === 0x0d) any = true;
      if (previous === -1 && (chunk[0] === 0x0a || chunk[0] === 0x0d)) any = true;
      if (any || chunk.indexOf('\n\n') >= 0 || chunk.indexOf('\n\r\n') >= 0 || chunk.indexOf('\r\r') >= 0) {
        any = true;
        break;
      }
      previous = chunk[chunk.length - 1];
    }
    if (!any) return 0;
  }
  let count = 0;
  let inQuotes = false;
  let lineEmpty = true;
  let afterCr = false;
  for await (const chunk of chunks()) {
    for (let i = 0; i < chunk.length; i++) {
      const b = chunk[i];
      if (b === 0x0a && afterCr) {
        afterCr = false;
        continue; // the LF of a CRLF
      }
      afterCr = false;
      if (inQuotes) {
        if (b === 0x22) inQuotes = false;
        continue;
      }
      if (b === 0x0a || b === 0x0d) {
        if (lineEmpty) count++;
        lineEmpty = true;
        afterCr = b === 0x0d;
        continue;
      }
      lineEmpty = false;
      if (b === 0x22) inQuotes = true;
    }
  }
  return count;
}

/**
 * The engine reads a quote inside an unquoted field as a character, where
 * the built-in reader refuses the row and names its line. A value with a
 * quote in it is rare, so when one turns up the built-in reader settles the
 * question: it reads one file in place of the engine, or checks each file
 * of a pattern (and its error, if any, is the answer).
 */
export async function settleQuotes(input: EngineInput, reader: ReaderOptions, values: Iterable<string | null>): Promise<void> {
  if (input.format !== 'csv') return;
  for (const value of values) {
    if (value === null || !value.includes('"')) continue;
    if (!input.glob) throw new EngineFallback('a quote inside a field, which the built-in reader judges');
    for (const file of input.files) await readRecords({ path: file, label: file }, reader, () => [], () => undefined);
    return;
  }
}

export interface EngineWeightRule {
  /** Index (in the selection) of the weight column. */
  slot: number;
  kind: WeightKind;
  decimalComma: boolean;
}

/** One distinct combination of the selected columns' values, as the engine counted it. */
export interface EngineGroup {
  /** Per selected column: its text as read (untrimmed), or null; the weight slot is null. */
  values: (string | null)[];
  rows: number;
  /** Σw and Σw² of the group as exact sums (see pairFromBuckets), or null without weights. */
  weightBuckets: [number, bigint][] | null;
  squareBuckets: [number, bigint][] | null;
  /** The weight's text when the engine found it unusable (the reader's rule decides). */
  badWeight: string | null;
}

export interface EngineSummary {
  header: string[];
  delimiter: string | null;
  records: number;
  blankLines: number;
  badRows: number;
  files: number;
  format: InputFormat;
}

/** The pattern of parseWeightValue in rowRules.ts, for the engine's regular expressions. */
export const NUMBER_PATTERN = '[+-]?([0-9]+[.]?[0-9]*|[.][0-9]+)([eE][+-]?[0-9]+)?';

/** x · 2^k in SQL, in two steps where 2^k alone would overflow. */
export function scaled(x: string, k: string): string {
  return `CASE WHEN ${k} > 900 THEN (${x} * pow(2.0, 600)) * pow(2.0, ${k} - 600) ELSE ${x} * pow(2.0, ${k}) END`;
}

/** The relation of all rows, every column as text, and the SQL names of the columns. */
export async function relation(input: EngineInput, reader: ReaderOptions): Promise<{ sql: string; header: string[]; names: string[]; delimiter: string | null; blankLines: () => Promise<number> }> {
  if (input.format === 'parquet') {
    const list = `[${input.files.map(sqlString).join(', ')}]`;
    const from = `read_parquet(${list}, union_by_name = true)`;
    let described: unknown[][];
    try {
      described = await run(`DESCRIBE SELECT * FROM ${from}`);
    } catch (error) {
      if (error instanceof TabsightError) throw error;
      throw dataError(`${input.label}: not a readable Parquet input (${engineMessage(error)})`);
    }
    const header = described.map((r) => String(r[0]));
    return { sql: from, header, names: header.map(sqlIdentifier), delimiter: null, blankLines: async () => 0 };
  }
  const layouts: CsvFileLayout[] = [];
  for (const file of input.files) layouts.push(await csvLayout(file, reader));
  const first = layouts[0];
  for (const layout of layouts.slice(1)) {
    if (layout.header.length !== first.header.length || layout.header.some((h, k) => h !== first.header[k])) {
      throw dataError(`${layout.file}: its header differs from that of ${first.file}; the files of one pattern must have the same columns`);
    }
  }
  const names = first.header.map((_h, k) => `c${k}`);
  const columns = `{${names.map((n) => `'${n}': 'VARCHAR'`).join(', ')}}`;
  // One read_csv per layout (skip and delimiter), joined; files that share one are read together.
  const byLayout = new Map<string, CsvFileLayout[]>();
  for (const layout of layouts) {
    const key = `${layout.skip}\u0000${layout.delimiter}\u0000${layout.gzip}`;
    byLayout.set(key, [...(byLayout.get(key) ?? []), layout]);
  }
  const parts = [...byLayout.values()].map((group) => {
    const l = group[0];
    const options = [
      `header = ${reader.header}`,
      `skip = ${l.skip}`,
      `delim = ${sqlString(l.delimiter)}`,
      `quote = '"'`,
      `escape = '"'`,
      `auto_detect = false`,
      `columns = ${columns}`,
      `compression = ${l.gzip ? "'gzip'" : "'none'"}`,
      `strict_mode = true`,
      `null_padding = false`,
    ];
    return `SELECT * FROM read_csv([${group.map((g) => sqlString(g.file)).join(', ')}], ${options.join(', ')})`;
  });
  return {
    sql: parts.length === 1 ? `(${parts[0]})` : `(${parts.join(' UNION ALL ')})`,
    header: first.header,
    names,
    delimiter: first.delimiter,
    blankLines: async () => {
      let total = 0;
      for (const l of layouts) total += await countEmptyLines(l.file, l.gzip);
      return total;
    },
  };
}

/**
 * Counts the distinct combinations of the selected columns in the engine.
 * `select` resolves the columns against the header (and throws the tool's
 * own message for an unknown one), as for the built-in reader.
 */
export async function engineGroups(
  input: EngineInput,
  reader: ReaderOptions,
  select: (header: string[]) => number[],
  weight: EngineWeightRule | null,
  onGroup: (group: EngineGroup) => void,
): Promise<EngineSummary> {
  const rel = await relation(input, reader);
  const selected = select(rel.header);
  const keys = selected.map((column, slot) => (weight && slot === weight.slot ? null : `CAST(${rel.names[column]} AS VARCHAR) AS v${slot}`));
  const keyNames = selected.map((_c, slot) => (weight && slot === weight.slot ? null : `v${slot}`)).filter((k): k is string => k !== null);
  let sql: string;
  if (weight === null) {
    sql = `SELECT ${keyNames.join(', ')}, COUNT(*) AS n FROM (SELECT ${keys.filter((k) => k !== null).join(', ')} FROM ${rel.sql}) GROUP BY ALL`;
  } else {
    const text = `trim(CAST(${rel.names[selected[weight.slot]]} AS VARCHAR))`;
    const normalised = weight.decimalComma ? `regexp_replace(wt, ',', '.')` : 'wt';
    const whole = weight.kind === 'freq' ? ' AND wd = floor(wd)' : '';
    sql = `
      WITH src AS (SELECT ${keys.filter((k) => k !== null).join(', ')}, ${text} AS wt FROM ${rel.sql}),
      parsed AS (SELECT *, CASE WHEN regexp_full_match(${normalised}, '${NUMBER_PATTERN}') THEN TRY_CAST(${normalised} AS DOUBLE) END AS wd FROM src),
      judged AS (SELECT *, COALESCE(isfinite(wd) AND wd >= 0${whole}, false) AS ok FROM parsed),
      bucketed AS (
        SELECT ${keyNames.join(', ')}, ok, CASE WHEN ok THEN NULL ELSE COALESCE(wt, '') END AS bad, wd,
          CASE WHEN ok AND wd > 0 THEN CAST(floor(log2(wd)) AS INTEGER) - 3 END AS b,
          CASE WHEN ok AND wd * wd > 0 AND isfinite(wd * wd) THEN CAST(floor(log2(wd * wd)) AS INTEGER) - 3 END AS bq
        FROM judged)
      SELECT ${keyNames.join(', ')}, bad, b, bq, COUNT(*) AS n,
        SUM(CASE WHEN b IS NULL THEN 0 ELSE CAST(${scaled('wd', '(52 - b)')} AS HUGEINT) END) AS sm,
        SUM(CASE WHEN bq IS NULL THEN 0 ELSE CAST(${scaled('(wd * wd)', '(52 - bq)')} AS HUGEINT) END) AS smq
      FROM bucketed GROUP BY ALL`;
  }
  const blank = rel.blankLines();
  let rows: unknown[][];
  try {
    rows = await run(sql);
  } catch (error) {
    if (error instanceof TabsightError) throw error;
    if (input.format === 'csv' && !input.glob) throw new EngineFallback(engineMessage(error));
    throw dataError(`${input.label}: the engine could not read the input (${engineMessage(error)}); --engine builtin reads one CSV file at a time and names the line`);
  }
  await settleQuotes(input, reader, rows.flatMap((row) => row.slice(0, keyNames.length) as (string | null)[]));
  // Buckets of one combination arrive as separate lines; they are joined here.
  const joined = new Map<string, EngineGroup>();
  let records = 0;
  const k = keyNames.length;
  for (const row of rows) {
    const n = Number(row[weight ? k + 3 : k]);
    records += n;
    const values: (string | null)[] = selected.map(() => null);
    let at = 0;
    selected.forEach((_c, slot) => {
      if (weight && slot === weight.slot) return;
      values[slot] = row[at++] as string | null;
    });
    if (weight === null) {
      onGroup({ values, rows: n, weightBuckets: null, squareBuckets: null, badWeight: null });
      continue;
    }
    const bad = row[k] as string | null;
    if (bad !== null) {
      onGroup({ values, rows: n, weightBuckets: null, squareBuckets: null, badWeight: bad });
      continue;
    }
    const key = JSON.stringify(values);
    let group = joined.get(key);
    if (group === undefined) {
      group = { values, rows: 0, weightBuckets: [], squareBuckets: [], badWeight: null };
      joined.set(key, group);
    }
    group.rows += n;
    const b = row[k + 1];
    const bq = row[k + 2];
    if (b !== null) group.weightBuckets!.push([Number(b), BigInt(row[k + 4] as bigint)]);
    if (bq !== null) group.squareBuckets!.push([Number(bq), BigInt(row[k + 5] as bigint)]);
  }
  for (const group of joined.values()) onGroup(group);
  return { header: rel.header, delimiter: rel.delimiter, records, blankLines: await blank, badRows: 0, files: input.files.length, format: input.format };
}

/** The engine for this input under --engine: auto takes the engine where only it can read the input, or for a large file. */
export async function chooseEngine(choice: EngineChoice, source: InputSource): Promise<EngineName> {
  if (choice !== 'auto') return choice;
  if (source.path === '-') return 'builtin';
  const needsEngine = isGlob(source.path) || isParquetPath(source.path);
  if (needsEngine) return 'duckdb';
  try {
    const stat = await fs.stat(source.path);
    if (stat.size >= AUTO_ENGINE_BYTES && !(await isGzipFile(source.path)) && (await engineAvailable())) return 'duckdb';
  } catch {
    // the reader names the problem
  }
  return 'builtin';
}
