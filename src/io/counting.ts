/**
 * The counting interface. Every command counts through these two functions,
 * whoever reads the input: `countTable` gives a counted table (pair,
 * compare, count), `encodeColumns` the encoded columns of a scan. The route
 * (the built-in reader or the embedded engine) is chosen here, once, and
 * here is the one fallback rule: where the engine cannot read a single CSV
 * file the way the built-in reader does, the built-in reader counts it and
 * one note says so.
 */
import { usageError } from '../errors.js';
import type { CountedTable, CountPair, ExcludedBy } from '../table/countedTable.js';
import type { EncodedColumn } from '../table/encodedColumn.js';
import type { OrderedColumn } from '../table/orderedColumn.js';
import type { RowDesign } from '../table/surveyDesign.js';
import type { ColumnsRequest } from './columns.js';
import type { UnmatchedValue } from './rowRules.js';
import { countFilesWith, countTableWith, TableRequest } from './countTable.js';
import { encodeWithReader } from './encodeColumns.js';
import { engineInput, EngineInput, isParquetPath, isPattern } from './engine/files.js';
import type { Engine } from './engine/module.js';
import { EngineFallback, PatternFailure } from './engine/query.js';
import type { EngineName, ReaderOptions, ReadSummary } from './readRecords.js';
import { checkFile, InputSource, isStreamPath } from './source.js';

/** A counted table and what counting it read and left out. */
export interface CountedInput extends CountedTable {
  /** The layer column (--by), or null. */
  by: string | null;
  /** Rows left out by --where. */
  filtered: number;
  /** Rows skipped for an unusable weight (with --skip-bad-rows). */
  badWeights: number;
  /** Rows skipped for a missing or unusable stratum, cluster, fpc or replicate weight (with --skip-bad-rows). */
  badDesign: number;
  summary: ReadSummary;
  /** Levels named by --row-order / --col-order that never occur. */
  unknownRowLevels: string[];
  unknownColLevels: string[];
  /** Rows left out for a missing value, by column and reason (`excluded` counts each row once). */
  excludedBy: ExcludedBy[];
  /** One line per column of the table holding a value that commonly means missing, counted as a level. */
  missingTokenNotes: string[];
  /** --where values and --recode rules that no value of their column takes (a typo filters everything or nothing). */
  unmatched: UnmatchedValue[];
  /** With keepExcludedCells: the rows left out, by their values as written ([layer,] row, col), and how many. */
  excludedCells: [string[], number][];
  /** The distinct values of the row and column variables as read (trimmed, before labels and recodes; --missing values not among them): what a codebook's codes are checked against. */
  rawValues: { rows: readonly string[]; cols: readonly string[] };
}

/** The columns of a scan, read once, and the way to count their pairs. */
export interface EncodedInput {
  columns: EncodedColumn[];
  /** The layer column (--by), encoded like a candidate, or null. */
  layer: EncodedColumn | null;
  /** Rows kept (past the filters, with a usable weight). */
  rows: number;
  /** The weight (or frequency) of each kept row, in row order; absent without --weight/--freq. */
  weights?: { values: Float64Array; kind: 'weight' | 'freq' };
  filtered: number;
  badWeights: number;
  /** Rows skipped for a missing or unusable design value (with --skip-bad-rows). */
  badDesign: number;
  /** The survey design as read (each kept row's unit or replicate weights), or null. */
  design: RowDesign | null;
  summary: ReadSummary;
  /** Per --where clause: the distinct values of its column in every row read (filtered ones too), or null when not tracked in full. */
  whereValues: (readonly string[] | null)[];
  /**
   * Prepares the counts of every pair of these columns (in report order,
   * with the layer): each pair is counted from the per-row codes in memory,
   * whoever encoded them. Resolves to the function that gives one pair's
   * counted table.
   */
  countPairs(columns: OrderedColumn[], layer: OrderedColumn | null): Promise<CountPair>;
}

export type { TableRequest };

/**
 * Who counts under --engine: auto takes the engine only where it alone can
 * read the input (Parquet, patterns of files). A CSV file, however large,
 * stays with the built-in reader, which measured faster than the engine for
 * both pair (on every core) and scan (README, Speed), so that auto never
 * picks the slower route.
 */
export async function chooseRoute(reader: ReaderOptions, source: InputSource): Promise<EngineName> {
  const choice = reader.engine ?? 'builtin';
  if (choice !== 'auto') return choice;
  if (source.path === '-') return 'builtin';
  if (await isStreamPath(source.path)) return 'builtin';
  if ((await isPattern(source.path)) || isParquetPath(source.path)) return 'duckdb';
  return 'builtin';
}

/**
 * Runs `work` on the chosen route. The one fallback rule: an EngineFallback
 * (the engine cannot read this single CSV file the tool's way) sends the
 * work to the built-in reader, and the note is given only when that
 * succeeds (its error, if any, says the rest).
 */
async function onRoute<T>(source: InputSource, reader: ReaderOptions, route: EngineName, work: (engine: { engine: Engine; input: EngineInput } | null) => Promise<T>): Promise<T> {
  if (route === 'builtin') return work(null);
  // The engine's modules are loaded only on its route.
  const { openEngine } = await import('./engine/module.js');
  const open = () => openEngine(reader.engineModule);
  const input = await engineInput(source, open);
  reader.checkInputs?.(input.files);
  try {
    return await work({ engine: await open(), input });
  } catch (error) {
    if (error instanceof PatternFailure) {
      // The built-in reader names the file and line at fault; the engine's message stands when it finds none.
      const { readRecords } = await import('./readRecords.js');
      for (const file of input.files) await readRecords({ path: file, label: file }, reader, () => [], () => undefined);
      throw error.oneLine;
    }
    if (!(error instanceof EngineFallback)) throw error;
    const result = await work(null);
    reader.onNote?.(`the engine cannot read ${source.label} the way the built-in reader does (${error.message}); counted with the built-in reader`);
    return result;
  }
}

/**
 * The route of a survey design: the built-in reader, which registers every
 * row's stratum and PSU as it reads (the totals per PSU and cell, or per
 * replicate, need each row's design values; see README "Survey designs").
 * A plain CSV file that the engine would have counted is read by the
 * built-in reader instead, and a note says so; Parquet files and patterns,
 * which only the engine reads, are refused in one line.
 */
async function designRoute(route: EngineName, reader: ReaderOptions, source: InputSource, designed: boolean): Promise<EngineName> {
  if (!designed || route === 'builtin') return route;
  if ((await isPattern(source.path)) || isParquetPath(source.path)) {
    throw usageError(
      `${source.label}: a survey design (--strata, --cluster, --fpc, --replicate-weights) is counted by the built-in reader, which reads one CSV file (plain or gzip), not Parquet files or patterns; export the file as CSV`,
    );
  }
  reader.onNote?.(`a survey design is counted by the built-in reader, row by row with each row's stratum and PSU; ${source.label} is read by it, not by the engine`);
  return 'builtin';
}

/** Counts the table a request describes (and its layers) from the source. */
export async function countTable(source: InputSource, reader: ReaderOptions, request: TableRequest): Promise<CountedInput> {
  // Cells counted elsewhere are small files: the built-in reader reads them.
  const route = request.summedWeights ? 'builtin' : await designRoute(await chooseRoute(reader, source), reader, source, request.design !== undefined);
  return onRoute(source, reader, route, (engine) => countTableWith(source, reader, request, engine));
}

/**
 * Encodes columns in one read with the built-in reader, a code per row and
 * the rows' weights: for commands that need each respondent's answers side
 * by side (banner: nets and multiple responses count a respondent once),
 * which the engine's grouped entries do not give.
 */
export async function encodeRows<T>(source: InputSource, reader: ReaderOptions, request: ColumnsRequest, use: (encoded: EncodedInput) => Promise<T>): Promise<T> {
  return use(await encodeWithReader(source, reader, request));
}

/**
 * Encodes the scan's columns in one read and hands them to `use` (screening,
 * pair counts, analysis). `use` runs inside the route, so that an engine
 * failure while counting pairs also falls back to the built-in reader.
 */
export async function encodeColumns<T>(source: InputSource, reader: ReaderOptions, request: ColumnsRequest, use: (encoded: EncodedInput) => Promise<T>): Promise<T> {
  const route = await designRoute(await chooseRoute(reader, source), reader, source, request.design !== undefined);
  return onRoute(source, reader, route, async (engine) =>
    use(engine === null ? await encodeWithReader(source, reader, request) : await (await import('./engine/scanColumns.js')).encodeWithEngine(engine.engine, engine.input, reader, request)),
  );
}

/**
 * Who counts the files of a series under --engine: auto takes the engine
 * (one pass over every file) only where it alone reads them (Parquet), as
 * for one file; standard input and streams always go to the built-in reader.
 */
export async function chooseFilesRoute(reader: ReaderOptions, sources: readonly InputSource[]): Promise<EngineName> {
  const choice = reader.engine ?? 'builtin';
  if (choice !== 'auto') return choice;
  for (const source of sources) if (source.path === '-' || (await isStreamPath(source.path))) return 'builtin';
  return sources.some((s) => isParquetPath(s.path)) ? 'duckdb' : 'builtin';
}

/**
 * Counts the same table in each of several files (the waves of a series):
 * with the built-in reader one pass per file, with the engine one pass over
 * all of them, grouped by file. Either way each file is counted exactly as
 * `countTable` counts it alone. Where the engine cannot read the files the
 * tool's way (a file it would read differently, files with different
 * headers), the built-in reader counts them one by one and a note says so.
 */
export async function countFiles(sources: readonly InputSource[], reader: ReaderOptions, request: TableRequest): Promise<CountedInput[]> {
  const oneByOne = async (by: ReaderOptions) => {
    const counted: CountedInput[] = [];
    for (const source of sources) counted.push(await countTable(source, by, request));
    return counted;
  };
  // Cells counted elsewhere are small files, and a survey design is counted row by row: both by the built-in reader, file by file (countTable routes each).
  const route = request.summedWeights || request.design ? 'builtin' : await chooseFilesRoute(reader, sources);
  if (route === 'builtin') return plainUnweighted(request) ? inPool(sources, reader, request) : oneByOne(reader);
  for (const source of sources) {
    if (source.path === '-') throw usageError('--engine duckdb reads files, not standard input; give the waves as files, or use --engine builtin');
    const stats = await checkFile(source);
    if (!stats.isFile()) throw usageError(`--engine duckdb reads files; ${source.label} is a stream (a pipe, FIFO or device), which the built-in reader reads once: use --engine builtin`);
  }
  const parquet = sources.filter((s) => isParquetPath(s.path)).length;
  if (parquet > 0 && parquet < sources.length) throw usageError('the waves mix Parquet and CSV files; give files of one format');
  const files = sources.map((s) => s.path);
  reader.checkInputs?.(files);
  const input: EngineInput = { label: `${files.length} files`, format: parquet > 0 ? 'parquet' : 'csv', files, glob: false };
  // The engine's modules are loaded only on its route.
  const { openEngine } = await import('./engine/module.js');
  const engine = await openEngine(reader.engineModule);
  try {
    return await countFilesWith(engine, input, reader, request);
  } catch (error) {
    if (!(error instanceof EngineFallback)) throw error;
    const result = await oneByOne({ ...reader, engine: 'builtin' });
    reader.onNote?.(`the engine cannot read these ${files.length} files in one pass the way the built-in reader does (${error.message}); counted one by one with the built-in reader`);
    return result;
  }
}

/** A request whose rows are tallied by their combination of values (io/countTable.ts), which range workers can count. */
function plainUnweighted(request: TableRequest): boolean {
  return request.weight === undefined && request.summedWeights === undefined && request.design === undefined;
}

/** Files read ahead of the one being counted: their headers are read and their bodies queued for the pool. */
const FILES_AHEAD = 4;

/**
 * The files of a series counted on every core: a pool of worker threads
 * (io/rangePool.ts) counts each plain file while this thread reads the next
 * files' headers and turns finished tallies into tables, a few files ahead.
 * Each file is counted exactly as countTable counts it alone (a file the
 * workers cannot settle is read again by the single reader), and a failure
 * is the one of the first file in order that fails, as when they are read
 * one by one.
 */
async function inPool(sources: readonly InputSource[], reader: ReaderOptions, request: TableRequest): Promise<CountedInput[]> {
  const { poolThreads, workerUrl } = await import('./parallelCount.js');
  const threads = poolThreads(reader, sources.length);
  const results: CountedInput[] = [];
  if (threads < 2) {
    for (const source of sources) results.push(await countTable(source, reader, request));
    return results;
  }
  const { RangePool } = await import('./rangePool.js');
  const pool = new RangePool(threads, workerUrl());
  try {
    const pooled: ReaderOptions = { ...reader, rangePool: pool.run };
    const running: Promise<CountedInput>[] = [];
    const settle = (p: Promise<CountedInput>) => p.then((value) => ({ value }), (error: unknown) => ({ error }));
    const started = () => {
      const k = running.length;
      running.push(countTable(sources[k], pooled, request));
      running[k].catch(() => undefined); // awaited in order below
    };
    for (let k = 0; k < sources.length; k++) {
      while (running.length < sources.length && running.length <= k + FILES_AHEAD) started();
      const outcome = await settle(running[k]);
      if ('error' in outcome) {
        // Files after it may be in flight: they finish (or fail) before the pool stops.
        await Promise.all(running.slice(k + 1).map(settle));
        throw outcome.error;
      }
      results.push(outcome.value);
    }
    return results;
  } finally {
    await pool.close();
  }
}
