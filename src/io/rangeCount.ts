/**
 * One byte range of a plain CSV file, read on its own (by a worker thread,
 * io/parallelCount.ts): where its first record starts, and the tally of
 * its records by their combination of value ids, with its labels.
 *
 * Anything unusual ends the range with `settled: false` and no detail (an
 * error of the file, a value that is not UTF-8, a NUL byte, too many
 * distinct values): the caller then reads the whole file with the single
 * reader, whose message is the one the user sees.
 */
import { isUtf8 } from 'node:buffer';
import { closeSync, fstatSync, openSync, readSync } from 'node:fs';
import { TabsightError } from '../errors.js';
import { Codes, GrowingCodes } from '../table/codes.js';
import { CsvTokenizer } from './csvTokenizer.js';
import { FieldInterner, MISSING_ID, OVERFLOW_ID } from './fieldInterner.js';
import { IdTally } from './idTally.js';
import { completeUtf8Length } from './source.js';

/** What a range is asked to count. */
export interface RangeJob {
  path: string;
  /** Offset where the range starts: a record start when `exact`, else any byte (the first record after it is found). */
  start: number;
  /** The range takes the records that start before this offset. */
  end: number;
  exact: boolean;
  /** The field separator's byte. */
  delimiter: number;
  /** For each field index of the header, its slot (−1: not read). */
  slots: number[];
  /** Number of slots. */
  wanted: number;
  missing: string[];
  skipBadRows: boolean;
}

/** What a range counted. */
export interface RangeTally {
  /** False when the range met anything but plain, valid records (the file is then read by the single reader). */
  settled: boolean;
  /** Offset of its first record, and where its last record ended. */
  first: number;
  stop: number;
  /** Per slot, the labels of its ids 1, 2, … in order of first appearance in the range. */
  labels: string[][];
  /** The tally: `wanted` ids per entry, laid end to end, and each entry's rows. */
  keys: Int32Array;
  counts: Float64Array;
  records: number;
  blankLines: number;
  badRows: number;
}

/** Distinct values per column that a range keeps; past it the single reader takes over. */
export const RANGE_DISTINCT_LIMIT = 1 << 16;
/** Distinct combinations a range keeps. */
export const RANGE_TALLY_LIMIT = 1 << 20;

const BLOCK = 1 << 20;
/** Bytes after a cut read first to judge its quote state and find its first record. */
const PROBE = 1 << 18;
const QUOTE = 0x22;
const LF = 0x0a;
const CR = 0x0d;

/**
 * Bytes read at a time while counting, into one buffer a thread keeps for
 * every range it counts (a fresh block per range cost page faults): small
 * enough that the tokenizer's window stays in the processor's cache.
 */
const READ_BLOCK = 1 << 18;
let readBlock: Buffer | undefined;

class Unsettled extends Error {}

function unsettled(job: RangeJob, first: number): RangeTally {
  return { settled: false, first, stop: first, labels: [], keys: new Int32Array(0), counts: new Float64Array(0), records: 0, blankLines: 0, badRows: 0 };
}

/**
 * Whether the byte at `at` lies inside a quoted field, judged from the
 * quotes that follow it: in valid CSV a quote followed by anything but a
 * delimiter, a line end or another quote opens a field, and a quote
 * preceded by anything but a delimiter, a line end or another quote closes
 * one; the parity of the quotes before the first such quote gives the state
 * at `at`. With no such quote in view, outside. This is a guess that the
 * caller verifies: the range before must end exactly where this one starts.
 */
export function insideQuotesAt(bytes: Uint8Array, from: number, before: number, delimiter: number): boolean {
  const plain = (b: number) => b !== delimiter && b !== LF && b !== CR && b !== QUOTE;
  const view = Buffer.from(bytes.buffer, bytes.byteOffset, bytes.length);
  let quotes = 0;
  // The quotes are found natively (most cuts of a large file see none).
  for (let q = view.indexOf(QUOTE, from); q >= 0; q = view.indexOf(QUOTE, q + 1)) {
    const previous = q > from ? bytes[q - 1] : before;
    const next = q + 1 < bytes.length ? bytes[q + 1] : -1;
    if (next !== -1 && plain(next)) return quotes % 2 === 1; // opens: outside just before it
    if (previous !== -1 && plain(previous)) return quotes % 2 === 0; // closes: inside just before it
    quotes++;
  }
  return false;
}

/**
 * The first record boundary at or after `at` (at > 0): the offset just past
 * the first line end outside quotes that ends at `at` or later (so `at`
 * itself when the byte before it ends a line), with the quote state judged
 * by insideQuotesAt.
 */
export function firstRecordAfter(fd: number, at: number, size: number, delimiter: number): number {
  // The view starts at the byte before `at`; `before` is the byte before that.
  const from = at - 1;
  const probe = Buffer.allocUnsafe(Math.min(PROBE, size - from + 1));
  const readFrom = Math.max(0, from - 1);
  const bytesRead = readSync(fd, probe, 0, probe.length, readFrom);
  const window = probe.subarray(from - readFrom, bytesRead);
  let inside = insideQuotesAt(window, 0, from > 0 ? probe[0] : -1, delimiter);
  let offset = from;
  let view = window;
  for (;;) {
    for (let i = 0; i < view.length; i++) {
      const b = view[i];
      if (b === QUOTE) inside = !inside;
      else if (!inside && b === LF) return offset + i + 1;
      else if (!inside && b === CR) {
        if (i + 1 < view.length) return offset + i + (view[i + 1] === LF ? 2 : 1);
        // The CR is the last byte in view: look at the next one.
        const next = Buffer.alloc(1);
        const n = readSync(fd, next, 0, 1, offset + i + 1);
        return offset + i + (n === 1 && next[0] === LF ? 2 : 1);
      }
    }
    offset += view.length;
    if (offset >= size) return size;
    const more = Buffer.allocUnsafe(Math.min(BLOCK, size - offset));
    view = more.subarray(0, readSync(fd, more, 0, more.length, offset));
    if (view.length === 0) return size;
  }
}

/**
 * Counts pieces of a file taken in turn from a queue shared by the threads:
 * `next[0]` is the index of the next piece nobody has taken. Returns each
 * piece counted here with its index. A thread that starts late or runs on a
 * busy core simply takes fewer pieces.
 */
export function countQueue(jobs: readonly RangeJob[], next: Int32Array): [number, RangeTally][] {
  const counted: [number, RangeTally][] = [];
  for (let k = Atomics.add(next, 0, 1); k < jobs.length; k = Atomics.add(next, 0, 1)) counted.push([k, countRange(jobs[k])]);
  return counted;
}

/** Counts the records of one range of a plain UTF-8 file (see RangeJob); never throws for a fault of the file. */
export function countRange(job: RangeJob): RangeTally {
  return openRange(job, countOpenRange, (first) => unsettled(job, first));
}

/**
 * Opens the range's file, finds its first record (unless the start is
 * exact) and reads it with `read`; an error of the file, or anything the
 * range cannot settle, gives `failed` instead.
 */
function openRange<J extends RangeJob, T>(job: J, read: (fd: number, job: J, first: number, fileSize: number) => T, failed: (first: number) => T): T {
  const fd = openSync(job.path, 'r');
  let first = job.start;
  try {
    const fileSize = fstatSync(fd).size;
    if (!job.exact) first = firstRecordAfter(fd, job.start, fileSize, job.delimiter);
    return read(fd, job, first, fileSize);
  } catch (error) {
    if (error instanceof Unsettled || error instanceof TabsightError) return failed(first);
    throw error;
  } finally {
    closeSync(fd);
  }
}

/**
 * Feeds the range's bytes from `first` to the tokenizer, in blocks, up to
 * the first record that starts at or past the range's end; bytes that are
 * not UTF-8, or a NUL byte, end the range unsettled.
 */
function readRange(fd: number, job: RangeJob, first: number, fileSize: number, tokenizer: CsvTokenizer): void {
  tokenizer.presetSlots(Int32Array.from(job.slots));
  tokenizer.stopAt = job.end - first;
  const block = (readBlock ??= Buffer.allocUnsafe(READ_BLOCK));
  let position = first;
  while (!tokenizer.stopped) {
    const bytesRead = readSync(fd, block, 0, READ_BLOCK, position);
    if (bytesRead === 0) break;
    let bytes = block.subarray(0, bytesRead);
    // An incomplete character at the end of the block is read again with the next one.
    if (position + bytesRead < fileSize) bytes = bytes.subarray(0, completeUtf8Length(bytes));
    if (bytes.length === 0 || bytes.indexOf(0) >= 0 || !isUtf8(bytes)) throw new Unsettled();
    tokenizer.push(bytes);
    position += bytes.length;
  }
  if (!tokenizer.stopped) tokenizer.finish();
}

function countOpenRange(fd: number, job: RangeJob, first: number, fileSize: number): RangeTally {
  const missing = new Set(job.missing.map((m) => m.trim()));
  const interners = Array.from({ length: job.wanted }, () => new FieldInterner(missing, RANGE_DISTINCT_LIMIT));
  const ids = new Int32Array(job.wanted);
  const tally = new IdTally(job.wanted);
  const width = job.slots.length;
  let badRows = 0;
  const tokenizer = new CsvTokenizer(
    job.delimiter,
    {
      header: () => new Int32Array(0),
      fieldBytes: (slot, buf, view, begin, end) => {
        ids[slot] = interners[slot].intern(buf, view, begin, end);
      },
      fieldText: (slot, value) => {
        ids[slot] = interners[slot].internString(value);
      },
      record: (fieldCount) => {
        if (fieldCount !== width) {
          if (!job.skipBadRows) throw new Unsettled();
          badRows++;
          return;
        }
        tally.add(ids);
        if (tally.size > RANGE_TALLY_LIMIT) throw new Unsettled();
      },
    },
    job.path,
  );
  readRange(fd, job, first, fileSize, tokenizer);
  for (const interner of interners) if (interner.overflowed > 0) throw new Unsettled();
  const { keys, counts } = tally.entries();
  return {
    settled: true,
    first,
    stop: first + tokenizer.position,
    labels: interners.map((i) => i.labels),
    keys,
    counts,
    records: tokenizer.records,
    blankLines: tokenizer.blankLines,
    badRows,
  };
}

/**
 * A range read for a scan (io/encodeColumns.ts): every record's value ids,
 * as the single reader hands them to its rows, so that the reader can take
 * them as if it had read the range itself (io/readRecords.ts).
 */
export interface EncodeJob extends RangeJob {
  kind: 'encode';
  /** Slots delivered as text (a weight, a design's numbers), as the single reader delivers them. */
  textSlots: number[];
  /** Per slot, the distinct values it keeps before new ones get the overflow id (the single reader's limits). */
  distinctLimits: number[];
}

/** What a range read for a scan holds, record by record (records of the wrong length skipped, as with --skip-bad-rows). */
export interface RangeCodes {
  settled: boolean;
  first: number;
  stop: number;
  /** Per slot, the labels of its ids 1, 2, … in order of first appearance in the range. */
  labels: string[][];
  /** Per slot, the occurrences of values refused past the distinct limit. */
  overflowed: number[];
  /** Per slot, each row's id (0 missing; a code past the labels: refused past the limit); empty for text slots. */
  codes: Codes[];
  /**
   * Per slot, the rows' texts joined by NUL characters, which no value of a
   * range holds (text slots only; empty for the others): one string, not a
   * string a row, is what a large file's weights cost in memory.
   */
  texts: string[];
  /** Each row's line, counted from 1 at the range's first line. */
  lines: Int32Array;
  /** The line the record after the range starts on, counted the same way. */
  nextLine: number;
  /** Rows delivered (records of the right length). */
  rows: number;
  records: number;
  blankLines: number;
  badRows: number;
}

/** Texts of a slot joined into one string at a time. */
const TEXTS_JOINED = 4096;

/** Rows read before the range's rows are estimated from its size (and the arrays sized for it). */
const ESTIMATE_AT = 1 << 14;

/** Reads one range of a plain UTF-8 file into ids per row (see EncodeJob); never throws for a fault of the file. */
export function encodeRange(job: EncodeJob): RangeCodes {
  return openRange(job, encodeOpenRange, (first) => ({ settled: false, first, stop: first, labels: [], overflowed: [], codes: [], texts: [], lines: new Int32Array(0), nextLine: 1, rows: 0, records: 0, blankLines: 0, badRows: 0 }));
}

function encodeOpenRange(fd: number, job: EncodeJob, first: number, fileSize: number): RangeCodes {
  const missing = new Set(job.missing.map((m) => m.trim()));
  const interners = Array.from({ length: job.wanted }, (_v, slot) => new FieldInterner(missing, job.distinctLimits[slot]));
  const isText = new Uint8Array(job.wanted);
  for (const slot of job.textSlots) isText[slot] = 1;
  const ids = new Int32Array(job.wanted);
  const rowTexts: string[] = new Array(job.wanted).fill('');
  const codes = Array.from({ length: job.wanted }, (_v, slot) => (isText[slot] ? null : new GrowingCodes(ESTIMATE_AT)));
  // Each text slot's values, joined a few thousand at a time.
  const pending: string[][] = Array.from({ length: job.wanted }, () => []);
  const joined: string[][] = Array.from({ length: job.wanted }, () => []);
  let lines: Int32Array = new Int32Array(ESTIMATE_AT);
  const width = job.slots.length;
  let rows = 0;
  let badRows = 0;
  const tokenizer: CsvTokenizer = new CsvTokenizer(
    job.delimiter,
    {
      header: () => new Int32Array(0),
      fieldBytes: (slot, buf, view, begin, end) => {
        if (isText[slot] === 1) rowTexts[slot] = view.toString('utf8', begin, end);
        else ids[slot] = interners[slot].intern(buf, view, begin, end);
      },
      fieldText: (slot, value) => {
        if (isText[slot] === 1) rowTexts[slot] = value;
        else ids[slot] = interners[slot].internString(value);
      },
      record: (fieldCount, line) => {
        if (fieldCount !== width) {
          if (!job.skipBadRows) throw new Unsettled();
          badRows++;
          return;
        }
        const row = rows++;
        if (row === ESTIMATE_AT) {
          // Rows to come, from the bytes the first ones took (a little over, so that one size usually does).
          const estimate = Math.ceil((row * (job.end - first) * 1.05) / Math.max(1, tokenizer.position)) + ESTIMATE_AT;
          for (const c of codes) c?.reserve(estimate);
          if (estimate > lines.length) lines = grown(lines, estimate);
        }
        if (row >= lines.length) lines = grown(lines, Math.ceil(lines.length * 1.25) + 1);
        lines[row] = line;
        for (let slot = 0; slot < ids.length; slot++) {
          const column = codes[slot];
          if (column === null) {
            const values = pending[slot];
            values.push(rowTexts[slot]);
            if (values.length === TEXTS_JOINED) joined[slot].push(values.splice(0).join('\0'));
          }
          else {
            const id = ids[slot];
            // A refused value is kept as the code past the limit's labels (read back as the overflow id).
            if (id !== MISSING_ID) column.set(row, id === OVERFLOW_ID ? job.distinctLimits[slot] + 1 : id);
          }
        }
      },
    },
    job.path,
  );
  readRange(fd, job, first, fileSize, tokenizer);
  return {
    settled: true,
    first,
    stop: first + tokenizer.position,
    labels: interners.map((i) => i.labels),
    overflowed: interners.map((i) => i.overflowed),
    codes: codes.map((c) => (c === null ? new Uint8Array(0) : c.take(rows))),
    texts: joined.map((parts, slot) => (pending[slot].length > 0 ? [...parts, pending[slot].join('\0')] : parts).join('\0')),
    lines: lines.subarray(0, rows),
    nextLine: tokenizer.nextLine,
    rows,
    records: tokenizer.records,
    blankLines: tokenizer.blankLines,
    badRows,
  };
}

function grown(lines: Int32Array, length: number): Int32Array {
  const next = new Int32Array(length);
  next.set(lines);
  return next;
}
