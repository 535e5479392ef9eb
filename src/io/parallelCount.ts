/**
 * Counting a large plain CSV file on several cores: the header is read as
 * the single reader reads it, the rest of the file is cut into byte ranges,
 * and each range is tallied by its own thread (io/rangeCount.ts: this
 * thread takes the first, worker threads the others).
 *
 * The quote state at a cut is not known without reading what comes before
 * it, so each range guesses it from the quotes after the cut (a quote
 * followed by an ordinary character opens a field, one preceded by an
 * ordinary character closes one), starts at the first line end outside
 * quotes, and the guess is checked: every range must end exactly where the
 * next one starts (a range ends at the first record boundary at or past
 * its cut, so the two agree only when the guess was right); a range whose
 * guess was wrong is counted again from where the one before it ended. When
 * a range meets anything but plain valid records (an error of the file,
 * bytes that are not UTF-8, too many distinct values), the result is
 * dropped and the single reader reads the whole file: its counts and its
 * messages are the ones the user gets, so the two routes cannot differ.
 */
import { closeSync, openSync, promises as fs, readSync, statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { DEFAULT_DISTINCT_LIMIT, HeaderEnd, ReaderOptions, ReadSummary, readRecords, ColumnSelector } from './readRecords.js';
import { FieldInterner } from './fieldInterner.js';
import type { EncodeJob, RangeCodes, RangeJob, RangeTally } from './rangeCount.js';
import { InputSource } from './source.js';

/** Under --threads auto, plain files from this size on are counted on every core (see README, Speed). */
export const PARALLEL_MIN_BYTES = 96 * 1024 * 1024;
/**
 * Under --threads auto, plain files from this size on are read for a scan
 * in ranges, one a core (io/readRecords.ts, RecordSplit): a worker's
 * start-up (about 30-50 ms) is then a small part of what it saves.
 */
export const SCAN_PARALLEL_MIN_BYTES = 16 * 1024 * 1024;
/** Threads used at most under --threads auto. */
const AUTO_THREADS_MAX = 8;
/**
 * Pieces per thread when worker threads share a file: the threads take the
 * pieces in turn, so that one that starts later (a worker's start-up) or
 * runs on a busier core takes fewer, and all end at about the same time.
 */
const PIECES_PER_THREAD = 12;
/** The smallest piece (each starts with a read of the bytes after its cut). */
const PIECE_MIN_BYTES = 4 * 1024 * 1024;

/** A file counted in ranges: what was read, the labels of each slot, and the tally in those labels' ids. */
export interface ParallelTally {
  summary: ReadSummary & { delimiter: string };
  labels: (readonly string[])[];
  /** Each distinct combination of ids (a reused array) and its rows. */
  forEach(visit: (ids: Int32Array, rows: number) => void): void;
}

/** How the ranges are counted: in worker threads, or (tests) by a function given. */
export type RangeRunner = (job: RangeJob) => Promise<RangeTally>;

/**
 * The size of a source that ranges can count: a regular UTF-8 file with a
 * header, neither gzip nor UTF-16; null for anything the single reader
 * reads (streams, legacy encodings, files without a header, or a file it
 * cannot open, whose problem it names).
 */
export async function rangeCountableSize(source: InputSource, reader: ReaderOptions): Promise<number | null> {
  if (source.path === '-' || !reader.header) return null;
  if (reader.encoding !== undefined && !/^utf-?8$/i.test(reader.encoding)) return null;
  try {
    // Synchronous calls: a run on a small file then never starts the thread pool (README, Speed).
    const stat = statSync(source.path);
    if (!stat.isFile()) return null;
    const fd = openSync(source.path, 'r');
    try {
      const head = Buffer.alloc(2);
      readSync(fd, head, 0, 2, 0);
      // UTF-16 is transcoded by the single reader, and gzip inflated by it.
      if ((head[0] === 0xff && head[1] === 0xfe) || (head[0] === 0xfe && head[1] === 0xff)) return null;
      if (head[0] === 0x1f && head[1] === 0x8b) return null;
    } finally {
      closeSync(fd);
    }
    return stat.size;
  } catch {
    return null; // the single reader names the problem
  }
}

/** Threads for a series of files under --threads (io/rangePool.ts): every core under auto, up to one per file; 1 for none. */
export function poolThreads(reader: ReaderOptions, files: number): number {
  const asked = reader.threads ?? 'auto';
  const threads = asked === 'auto' ? Math.min(availableParallelism(), AUTO_THREADS_MAX) : asked;
  return Math.max(1, Math.min(threads, files));
}

/** How many threads count this source (or, given `minBytes`, read it for a scan), or 1 when it is for the single reader. */
export async function threadsFor(source: InputSource, reader: ReaderOptions, minBytes = PARALLEL_MIN_BYTES): Promise<number> {
  const asked = reader.threads ?? 'auto';
  if (asked !== 'auto' && asked < 2) return 1;
  const size = await rangeCountableSize(source, reader);
  if (size === null) return 1;
  if (asked === 'auto' && size < minBytes) return 1;
  return asked === 'auto' ? Math.min(availableParallelism(), AUTO_THREADS_MAX) : asked;
}

/** Raised by the header selector to stop the reader once the header is read. */
class HeaderRead extends Error {}

/**
 * Counts the records of a plain file in `threads` ranges; null when the
 * ranges do not settle (the caller reads the file with the single reader).
 * `cuts` (tests) gives the offsets where ranges are cut, `run` how a range
 * is counted (worker threads by default).
 */
export async function tallyInParallel(
  source: InputSource,
  reader: ReaderOptions,
  select: ColumnSelector,
  threads: number,
  options: { cuts?: number[]; run?: RangeRunner } = {},
): Promise<ParallelTally | null> {
  // The worker threads start before the header is read, so that their start-up overlaps it.
  const team = options.run === undefined ? await startTeam(threads - 1) : null;
  try {
    return await tallyPieces(source, reader, select, threads, options, team);
  } finally {
    team?.release();
  }
}

async function tallyPieces(
  source: InputSource,
  reader: ReaderOptions,
  select: ColumnSelector,
  threads: number,
  options: { cuts?: number[]; run?: RangeRunner },
  team: Team | null,
): Promise<ParallelTally | null> {
  let found: { header: string[]; line: number; delimiter: string; selected: number[]; end: HeaderEnd } | null = null;
  try {
    await readRecords(source, reader, (header, line, delimiter, end) => {
      found = { header, line, delimiter, selected: select(header, line, delimiter, end), end };
      throw new HeaderRead();
    }, () => undefined);
  } catch (error) {
    if (!(error instanceof HeaderRead)) throw error;
  }
  if (found === null) return null; // an empty file or only blank lines: the single reader says so
  const { header, delimiter, selected, end } = found as { header: string[]; line: number; delimiter: string; selected: number[]; end: HeaderEnd };
  const size = (await fs.stat(source.path)).size;
  const bom = await startsWithUtf8Mark(source.path);
  const dataStart = end.offset + (bom ? 3 : 0);
  const slots = new Array<number>(header.length).fill(-1);
  selected.forEach((column, slot) => (slots[column] = slot));
  const pieces = team === null ? threads : Math.max(threads, Math.min(threads * PIECES_PER_THREAD, Math.floor((size - dataStart) / PIECE_MIN_BYTES)));
  const cuts = (options.cuts ?? Array.from({ length: pieces - 1 }, (_v, k) => dataStart + Math.floor(((k + 1) * (size - dataStart)) / pieces)))
    .filter((cut) => cut > dataStart && cut < size)
    .sort((a, b) => a - b);
  const bounds = [dataStart, ...new Set(cuts), size];
  const jobs: RangeJob[] = bounds.slice(0, -1).map((start, k) => ({
    path: source.path,
    start,
    end: bounds[k + 1],
    exact: k === 0,
    delimiter: delimiter.charCodeAt(0),
    slots,
    wanted: selected.length,
    missing: [...reader.missing],
    skipBadRows: reader.skipBadRows,
  }));
  const { countRange } = await import('./rangeCount.js');
  let tallies: RangeTally[];
  if (team !== null) tallies = await team.count(jobs);
  else {
    const run = options.run as RangeRunner;
    const others = jobs.slice(1).map((job) => run(job));
    tallies = [await run(jobs[0]), ...(await Promise.all(others))];
  }

  // Each range must begin where the one before it ended: a range whose
  // quote-state guess was wrong is counted again from there (exactly, in
  // this thread). Any range that did not settle sends the file to the
  // single reader.
  for (let k = 0; k < tallies.length; k++) {
    const start = k === 0 ? dataStart : tallies[k - 1].stop;
    // (A wrong guess may also have made the range fail: its start is compared first.)
    if (tallies[k].first !== start) tallies[k] = countRange({ ...jobs[k], start, exact: true });
    if (!tallies[k].settled) return null;
  }
  if (tallies[tallies.length - 1].stop !== size) return null;

  // The ranges' ids in one numbering, labels in order of first appearance in the file.
  const missing = new Set(reader.missing.map((m) => m.trim()));
  const interners = selected.map(() => new FieldInterner(missing, DEFAULT_DISTINCT_LIMIT));
  const idMaps = tallies.map((t) => t.labels.map((labels, slot) => Int32Array.from([0, ...labels.map((label) => interners[slot].internString(label))])));
  const summary = {
    header,
    delimiter,
    records: tallies.reduce((sum, t) => sum + t.records, 0),
    blankLines: end.blankLines + tallies.reduce((sum, t) => sum + t.blankLines, 0),
    badRows: tallies.reduce((sum, t) => sum + t.badRows, 0),
    engine: 'builtin' as const,
    format: 'csv' as const,
    files: 1,
  };
  const width = selected.length;
  return {
    summary,
    labels: interners.map((i) => i.labels),
    forEach(visit) {
      const ids = new Int32Array(width);
      tallies.forEach((t, k) => {
        const maps = idMaps[k];
        for (let e = 0; e < t.counts.length; e++) {
          for (let slot = 0; slot < width; slot++) ids[slot] = maps[slot][t.keys[e * width + slot]];
          visit(ids, t.counts[e]);
        }
      });
    },
  };
}

export async function startsWithUtf8Mark(path: string): Promise<boolean> {
  const handle = await fs.open(path, 'r');
  try {
    const head = Buffer.alloc(3);
    const { bytesRead } = await handle.read(head, 0, 3, 0);
    return bytesRead === 3 && head[0] === 0xef && head[1] === 0xbb && head[2] === 0xbf;
  } finally {
    await handle.close();
  }
}

/** The worker script beside this module (from the sources under test, the built one). */
export function workerUrl(): URL {
  const here = import.meta.url;
  if (here.endsWith('.ts')) return new URL('../../dist/io/rangeWorker.js', here);
  // The bundle's worker has the bundle's extension (.js, or .cjs: scripts/bundle.mjs).
  return new URL(here.endsWith('.cjs') ? './rangeWorker.cjs' : './rangeWorker.js', here);
}

/** Worker threads that count the pieces of one file with this thread. */
interface Team {
  /** Counts every piece, this thread and the workers taking them in turn; the tallies in the pieces' order. */
  count(jobs: RangeJob[]): Promise<RangeTally[]>;
  /** Stops the workers (those that never got their pieces, after an error). */
  release(): void;
}

/** Starts `workers` worker threads that wait for the pieces of a file. */
async function startTeam(workers: number): Promise<Team> {
  // Loaded only when a file is counted in ranges.
  const { Worker } = await import('node:worker_threads');
  const started = Array.from({ length: workers }, () => {
    const worker = new Worker(workerUrl(), { workerData: { queue: true } });
    // Listened to from the start: a worker that fails before it is given its pieces must not go unheard.
    const answer = new Promise<[number, RangeTally][]>((resolve, reject) => {
      worker.once('message', resolve);
      worker.once('error', reject);
      // After an answer this changes nothing; before one, the worker stopped without it.
      worker.once('exit', (code) => reject(new Error(`a counting thread stopped with status ${code}`)));
    });
    answer.catch(() => undefined); // awaited in count(), or never when the file is not counted in pieces
    return { worker, answer };
  });
  return {
    async count(jobs) {
      const next = new Int32Array(new SharedArrayBuffer(4));
      for (const { worker } of started) worker.postMessage({ jobs, next });
      const tallies = new Array<RangeTally>(jobs.length);
      // This thread takes pieces too, while the workers start and count.
      const { countQueue } = await import('./rangeCount.js');
      for (const [k, tally] of countQueue(jobs, next)) tallies[k] = tally;
      for (const { answer } of started) for (const [k, tally] of await answer) tallies[k] = tally;
      return tallies;
    },
    release() {
      for (const { worker } of started) void worker.terminate();
    },
  };
}

/** A scan's range being read in a worker thread: its result, and a way to stop it when the result is no longer wanted. */
export interface RangeReading {
  result: Promise<RangeCodes>;
  stop(): void;
}

/** Worker threads started ahead of a scan's ranges (each reads one range), and a way to stop them. */
export interface RangeReaders {
  read(job: EncodeJob): RangeReading;
  /** The first thread that read a range, kept for the scan's pairs (io/pairWorkers.ts): close() no longer stops it, and it does not keep the process alive while idle. */
  keep(): import('node:worker_threads').Worker | null;
  close(): void;
}

/**
 * Starts `count` worker threads for a scan's ranges at once, so that their
 * start-up overlaps the reading of the header; each waits for its range.
 */
export async function rangeReaders(count: number): Promise<RangeReaders> {
  const { Worker } = await import('node:worker_threads');
  const idle = Array.from({ length: count }, () => new Worker(workerUrl(), { workerData: { encode: true } }));
  const started: import('node:worker_threads').Worker[] = [];
  return {
    read(job) {
      const worker = idle.shift();
      if (worker === undefined) throw new Error('more ranges than reading threads');
      started.push(worker);
      let stopped = false;
      let answered = false;
      const result = new Promise<RangeCodes>((resolve, reject) => {
        worker.once('message', (read: RangeCodes) => {
          answered = true;
          resolve(read);
        });
        worker.once('error', reject);
        worker.once('exit', (code) => reject(new Error(stopped ? 'stopped' : `a reading thread stopped with status ${code}`)));
      });
      result.catch(() => undefined); // awaited by the reader, or no longer wanted
      worker.postMessage(job);
      return {
        result,
        // A thread whose range is read stays (for the pairs, see keep); close() ends it.
        stop() {
          if (answered) return;
          stopped = true;
          void worker.terminate();
        },
      };
    },
    keep() {
      const worker = started.shift() ?? null;
      worker?.unref();
      return worker;
    },
    close() {
      for (const worker of idle.splice(0)) void worker.terminate();
      for (const worker of started.splice(0)) void worker.terminate();
    },
  };
}
