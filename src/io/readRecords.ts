/**
 * The built-in reader: streams a CSV source record by record and delivers
 * only the selected columns (as interned ids or text), with a summary of
 * what was read.
 */
import { dataError, usageError } from '../errors.js';
import { bareHeaderNames, validateHeader } from './columns.js';
import { CsvTokenizer, detectDelimiter } from './csvTokenizer.js';
import { InputSource, utf8Chunks } from './source.js';
import { FieldInterner, OVERFLOW_ID } from './fieldInterner.js';
import type { EncodeJob, RangeCodes, RangeJob, RangeTally } from './rangeCount.js';
import type { RangeReading } from './parallelCount.js';

export interface ReaderOptions {
  /** One character; detected from the header line when absent. */
  delimiter?: string;
  /** A legacy encoding name for TextDecoder; UTF-8/UTF-16 with a BOM need none. */
  encoding?: string;
  /** Values (after trimming) that count as missing, besides the empty string. */
  missing: readonly string[];
  /** Count and skip records with the wrong number of fields instead of failing. */
  skipBadRows: boolean;
  /** False when the first record is data; columns are then named 1, 2, 3, … */
  header: boolean;
  /** Who counts: the built-in reader, the embedded engine, or chosen from the input (io/counting.ts). */
  engine?: EngineName | 'auto';
  /** The engine's module (the optional package by default; a test names a missing one). */
  engineModule?: string;
  /**
   * Threads that count a large plain file (io/parallelCount.ts): 'auto' (the
   * default) uses every core for a file of PARALLEL_MIN_BYTES or more, a
   * number that many threads for any plain file, 1 the single reader.
   */
  threads?: number | 'auto';
  /**
   * Worker threads kept for a series of files (io/rangePool.ts): each plain
   * file is counted there, whole or in ranges, instead of by threads of its own.
   */
  rangePool?: (job: RangeJob) => Promise<RangeTally>;
  /**
   * How a scan's large file is cut into ranges (io/encodeColumns.ts): by
   * default the records' bytes in equal parts, each but the first read in a
   * worker thread; tests give the cuts and read the ranges in this thread.
   */
  scanRanges?: { cuts?: number[]; read?: (job: EncodeJob) => RangeReading };
  /** Receives a one-line note the user should see (for example, that the engine fell back). */
  onNote?: (note: string) => void;
  /** Sees the files a pattern matched before any is read, so that an output that is one of them is refused (src/output/guard.ts). */
  checkInputs?: (files: readonly string[]) => void;
}

/** Who read the input: the built-in reader, or the embedded engine (io/engine/). */
export type EngineName = 'builtin' | 'duckdb';

/** What was read, whoever read it. */
export interface ReadSummary {
  header: string[];
  /** The field separator given or detected; null for Parquet. */
  delimiter: string | null;
  /** Data records seen (after the header, blank lines not counted). */
  records: number;
  blankLines: number;
  /** Records skipped for a wrong field count (with --skip-bad-rows). */
  badRows: number;
  engine: EngineName;
  format: 'csv' | 'parquet';
  /** Files read (more than one for a pattern). */
  files: number;
}

/** Where the header ended: the offset of the first data record in the decoded bytes (a byte-order mark not counted), and the blank lines before it. */
export interface HeaderEnd {
  offset: number;
  blankLines: number;
}

/** Chooses the columns to deliver, given the header, its line and the delimiter in force. */
export type ColumnSelector = (header: string[], line: number, delimiter: string, end: HeaderEnd) => number[];
/**
 * A data row: for each selected column, the id of its value in that column's
 * interner (0 missing, −1 past the interner's limit). The array is reused.
 * `position` gives the decoded bytes read up to the end of this row.
 */
export type RowHandler = (ids: Int32Array, line: number, texts: (string | undefined)[], interners: readonly FieldInterner[], position: () => number) => void;

/** Distinct values one selected column may hold before new ones get the overflow id. */
export const DEFAULT_DISTINCT_LIMIT = 1_000_000;

const SAMPLE_LIMIT = 1 << 20;

/**
 * A plain file read in ranges (a scan's large file, io/encodeColumns.ts):
 * this thread reads the header and the first range, worker threads the
 * others (io/rangeCount.ts, encodeRange), each into its own ids in order of
 * first appearance. The ranges' rows are then handed to onRow in file
 * order, their ids renumbered by interning each range's labels, in that
 * range's order, after every label of the ranges before it: the ids are the
 * ones the single reader gives, and so is every row, line and count.
 *
 * A range starts at the first record boundary after its cut, from a guess
 * of the quote state there (io/rangeCount.ts); a range that does not begin
 * where the one before it ended, or that meets anything but plain valid
 * records, makes the reader throw SplitUnsettled once the rows before it
 * are handed over: the caller then reads the whole file with the single
 * reader, whose messages the user gets.
 */
export interface RecordSplit {
  /** The file's size in bytes, and whether it starts with a UTF-8 byte-order mark. */
  size: number;
  bom: boolean;
  /** Ranges the records are cut into (this thread reads the first). */
  ranges: number;
  /** Offsets where the ranges are cut (tests); by default the records' bytes in equal parts. */
  cuts?: number[];
  /** Reads a range (by default in a worker thread of its own). */
  read: (job: EncodeJob) => RangeReading;
  /**
   * Slots where a range's refusal of a value past the distinct limit cannot
   * change what onRow makes of the rows (a range refuses values the ranges
   * before it hold); past the limit in any other slot, SplitUnsettled.
   */
  overflowSafe: (slot: number) => boolean;
}

/** A file read in ranges that did not settle (see RecordSplit): read it with the single reader. */
export class SplitUnsettled extends Error {}

/**
 * The first line of the sample (its first SAMPLE_LIMIT bytes) that is not
 * blank, decoded; lines end at CR LF, LF or CR. Only the lines up to it are
 * decoded (decoding the whole sample was a fixed cost of every file read).
 */
export function firstNonBlankLine(sample: Uint8Array): string {
  const bytes = Buffer.from(sample.buffer, sample.byteOffset, Math.min(sample.length, SAMPLE_LIMIT));
  let from = 0;
  while (from <= bytes.length) {
    let end = from;
    while (end < bytes.length && bytes[end] !== 0x0a && bytes[end] !== 0x0d) end++;
    const line = bytes.toString('utf8', from, end);
    if (line.trim() !== '') return line;
    from = end + (bytes[end] === 0x0d && bytes[end + 1] === 0x0a ? 2 : 1);
  }
  return '';
}

export function parseDelimiterOption(value: string): string {
  const named: Record<string, string> = { tab: '\t', '\\t': '\t', comma: ',', semicolon: ';', pipe: '|' };
  const delimiter = named[value.toLowerCase()] ?? value;
  if (delimiter.length !== 1 || delimiter === '"' || delimiter === '\n' || delimiter === '\r' || delimiter.charCodeAt(0) > 0x7f) {
    throw usageError(`--delimiter "${value}": give one ASCII character other than a quote or line break (or tab, comma, semicolon, pipe)`);
  }
  return delimiter;
}

/**
 * Streams the records of a CSV source, handing each selected column's value
 * (trimmed; null when missing) to onRow. Only the selected columns are
 * decoded and nothing is kept, so memory does not grow with the file.
 */
export async function readRecords(
  source: InputSource,
  options: ReaderOptions,
  select: ColumnSelector,
  onRow: RowHandler,
  distinctLimit: (slot: number) => number = () => DEFAULT_DISTINCT_LIMIT,
  /** Slots delivered as raw text (trimmed) instead of interned ids, such as a weight column. */
  textSlots: ReadonlySet<number> | 'all' = new Set(),
  /** Sees each value a column's interner refuses past its distinct limit (a profile estimates the distinct count from them). */
  onOverflow?: (slot: number, label: string) => void,
  /** Reads a plain file in ranges on several threads (not with onOverflow, nor without a header). */
  split?: RecordSplit,
): Promise<ReadSummary & { delimiter: string; interners: FieldInterner[] }> {
  const allText = textSlots === 'all';
  const textSet: ReadonlySet<number> = textSlots === 'all' ? new Set() : textSlots;
  const isText = (slot: number) => allText || textSet.has(slot);
  // The set may be filled by the header callback, so it is consulted as it stands.
  const anyText = () => allText || textSet.size > 0;
  const missing = new Set(options.missing.map((m) => m.trim()));
  let interners: FieldInterner[] = [];
  let ids = new Int32Array(0);
  let textFlags = new Uint8Array(0);
  let texts: (string | undefined)[] = [];
  let header: string[] = [];
  let selected: number[] = [];
  let delimiter = options.delimiter;
  let tokenizer: CsvTokenizer | null = null;
  let badRows = 0;
  const buffered: Uint8Array[] = [];
  const position = () => (tokenizer === null ? 0 : (tokenizer as CsvTokenizer).position);
  let bufferedLength = 0;
  const splitting = split !== undefined && split.ranges > 1 && onOverflow === undefined && options.header ? split : null;
  let others: { job: EncodeJob; reading: RangeReading }[] = [];
  const stopOthers = () => {
    for (const other of others) other.reading.stop();
    others = [];
  };

  const start = (sample: Uint8Array) => {
    if (delimiter === undefined) delimiter = detectDelimiter(firstNonBlankLine(sample));
    tokenizer = new CsvTokenizer(
      delimiter.charCodeAt(0),
      {
        header: (fields, line) => {
          if (options.header) {
            header = bareHeaderNames(fields.map((f) => f.trim()));
            validateHeader(header, source.label, line);
          } else {
            header = fields.map((_f, i) => String(i + 1));
          }
          const reading = tokenizer as unknown as CsvTokenizer;
          selected = select(header, line, delimiter as string, { offset: reading.position, blankLines: reading.blankLines });
          const slots = new Int32Array(header.length).fill(-1);
          selected.forEach((column, slot) => (slots[column] = slot));
          interners = selected.map((_c, slot) => new FieldInterner(missing, distinctLimit(slot), onOverflow ? (label) => onOverflow(slot, label) : undefined));
          // Which slots are delivered as text, as the selector left the set.
          textFlags = Uint8Array.from(selected, (_c, slot) => (isText(slot) ? 1 : 0));
          ids = new Int32Array(selected.length);
          texts = new Array(selected.length).fill(undefined);
          if (splitting !== null) {
            const base = { path: source.path, missing: [...options.missing], skipBadRows: options.skipBadRows, distinctLimits: selected.map((_c, slot) => distinctLimit(slot)) };
            others = startRanges(splitting, reading, slots, delimiter as string, textFlags, base);
          }
          if (!options.header) {
            // The first record is data: deliver it too.
            selected.forEach((column, slot) => {
              if (isText(slot)) texts[slot] = fields[column];
              else ids[slot] = interners[slot].internString(fields[column]);
            });
            onRow(ids, line, texts, interners, position);
            texts.fill(undefined);
          }
          return slots;
        },
        fieldBytes: (slot, buf, view, begin, end) => {
          if (textFlags[slot] === 1) texts[slot] = view.toString('utf8', begin, end);
          else ids[slot] = interners[slot].intern(buf, view, begin, end);
        },
        fieldText: (slot, value) => {
          if (textFlags[slot] === 1) texts[slot] = value;
          else ids[slot] = interners[slot].internString(value);
        },
        record: (fieldCount, line) => {
          if (fieldCount !== header.length) {
            if (options.skipBadRows) {
              badRows++;
              ids.fill(0);
              if (anyText()) texts.fill(undefined);
              return;
            }
            throw dataError(
              `${source.label}, line ${line}: ${fieldCount} field${fieldCount === 1 ? '' : 's'} where the header has ${header.length}; fix the row or pass --skip-bad-rows to count and skip such rows`,
            );
          }
          // Every selected field of a complete record has just been delivered,
          // so ids and texts need no clearing between records.
          onRow(ids, line, texts, interners, position);
        },
      },
      source.label,
    );
  };

  try {
    await readChunks();
  } catch (error) {
    stopOthers();
    throw error;
  }
  const t = tokenizer as unknown as CsvTokenizer;
  if (header.length === 0) throw dataError(`${source.label}: no header line (the file holds only blank lines)`);
  let records = options.header ? t.records : t.records + 1;
  let blankLines = t.blankLines;
  // The other ranges' rows, in file order, as if this thread had read them.
  let stop = t.position + (splitting?.bom ? 3 : 0);
  let line = t.nextLine;
  try {
    for (const { job, reading } of others) {
      const read = await reading.result;
      if (!read.settled || read.first !== stop) throw new SplitUnsettled(`the range from byte ${job.start} did not settle`);
      handOver(read, line);
      records += read.records;
      blankLines += read.blankLines;
      badRows += read.badRows;
      stop = read.stop;
      line += read.nextLine - 1;
    }
    if (others.length > 0 && stop !== (splitting as RecordSplit).size) throw new SplitUnsettled('the last range did not end the file');
  } finally {
    stopOthers();
  }
  return { header, delimiter: delimiter as string, records, blankLines, badRows, engine: 'builtin', format: 'csv', files: 1, interners };

  /** A range's rows handed to onRow with this reader's ids (its labels interned after those of the ranges before it); `first` is the line it starts on. */
  function handOver(read: RangeCodes, first: number): void {
    const maps = read.labels.map((labels, slot) => {
      if (read.overflowed[slot] > 0 && !(splitting as RecordSplit).overflowSafe(slot)) throw new SplitUnsettled(`a range has too many distinct values in slot ${slot}`);
      interners[slot].overflowed += read.overflowed[slot];
      const map = new Int32Array(labels.length + 1);
      for (let k = 0; k < labels.length; k++) map[k + 1] = interners[slot].internString(labels[k]);
      return map;
    });
    const width = ids.length;
    // Where each text slot's next value starts in its joined texts.
    const cursors = new Array<number>(width).fill(0);
    for (let r = 0; r < read.rows; r++) {
      for (let slot = 0; slot < width; slot++) {
        if (textFlags[slot] === 1) {
          const joined = read.texts[slot];
          const from = cursors[slot];
          const end = joined.indexOf('\0', from);
          texts[slot] = joined.slice(from, end < 0 ? joined.length : end);
          cursors[slot] = end < 0 ? joined.length : end + 1;
        } else {
          const code = read.codes[slot][r];
          const map = maps[slot];
          ids[slot] = code < map.length ? map[code] : OVERFLOW_ID;
        }
      }
      onRow(ids, first + read.lines[r] - 1, texts, interners, position);
    }
  }

  /** Feeds the source to the tokenizer; with ranges, up to the end of the first (the rest of the file is not even decoded here). */
  async function readChunks(): Promise<void> {
    const stopped = () => (tokenizer as CsvTokenizer | null)?.stopped === true;
    for await (const chunk of utf8Chunks(source, options.encoding)) {
      if (tokenizer === null && bufferedLength === 0 && chunk.indexOf(0x0a) >= 0) {
        // The usual start: the first block holds a line end (the tokenizer copies what it keeps).
        start(chunk);
        (tokenizer as unknown as CsvTokenizer).push(chunk);
      } else if (tokenizer === null) {
        // The chunk's buffer is reused for the next read: keep a copy.
        buffered.push(Uint8Array.prototype.slice.call(chunk));
        bufferedLength += chunk.length;
        const joined = Buffer.concat(buffered);
        if (joined.indexOf(0x0a) < 0 && bufferedLength < SAMPLE_LIMIT) continue;
        start(joined);
        (tokenizer as unknown as CsvTokenizer).push(joined);
      } else (tokenizer as CsvTokenizer).push(chunk);
      if (stopped()) return;
    }
    if (tokenizer === null) {
      if (bufferedLength === 0) throw dataError(`${source.label}: the file is empty`);
      const joined = Buffer.concat(buffered);
      start(joined);
      (tokenizer as unknown as CsvTokenizer).push(joined);
    }
    (tokenizer as unknown as CsvTokenizer).finish();
  }
}

/**
 * Cuts the records after the header into ranges (see RecordSplit) and
 * starts reading every range but the first; the tokenizer is told to stop
 * where the first range ends.
 */
function startRanges(
  split: RecordSplit,
  tokenizer: CsvTokenizer,
  slots: Int32Array,
  delimiter: string,
  textFlags: Uint8Array,
  base: Pick<EncodeJob, 'path' | 'missing' | 'skipBadRows' | 'distinctLimits'>,
): { job: EncodeJob; reading: RangeReading }[] {
  const bom = split.bom ? 3 : 0;
  const dataStart = tokenizer.position + bom;
  const cuts = [...new Set(split.cuts ?? Array.from({ length: split.ranges - 1 }, (_v, k) => dataStart + Math.floor(((k + 1) * (split.size - dataStart)) / split.ranges)))]
    .filter((cut) => cut > dataStart && cut < split.size)
    .sort((a, b) => a - b);
  if (cuts.length === 0) return [];
  tokenizer.stopAt = cuts[0] - bom;
  const textSlots: number[] = [];
  textFlags.forEach((flag, slot) => flag === 1 && textSlots.push(slot));
  return cuts.map((start, k) => {
    const job: EncodeJob = {
      ...base,
      kind: 'encode',
      start,
      end: k + 1 < cuts.length ? cuts[k + 1] : split.size,
      exact: false,
      delimiter: delimiter.charCodeAt(0),
      slots: [...slots],
      wanted: textFlags.length,
      textSlots,
    };
    return { job, reading: split.read(job) };
  });
}
