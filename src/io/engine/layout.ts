/**
 * Layout sniffing: how the built-in reader sees a CSV file (its header,
 * delimiter, the blank lines before the header, gzip or not), so that the
 * engine reads it the same way; and the byte facts where the engine would
 * read differently: the empty lines it skips without a word (the built-in
 * reader counts them), a NUL byte anywhere, a character after a closing
 * quote (which the built-in reader refuses).
 */
import { createReadStream, promises as fs } from 'node:fs';
import { readRecords, ReaderOptions } from '../readRecords.js';
import { InputSource, isGzipFile, rawChunks } from '../source.js';
import { EngineFallback } from './query.js';
import type { CsvDialect } from './sql.js';

export interface CsvFileLayout extends CsvDialect {
  file: string;
  header: string[];
  /** Blank lines before the header that hold spaces or tabs (the built-in reader counts them; see whitespaceLines). */
  whitespaceLinesBeforeHeader: number;
}

/** Reads a CSV file's header with the built-in reader (the first megabyte or so). */
export async function csvLayout(file: string, reader: ReaderOptions): Promise<CsvFileLayout> {
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
  const skip = found.line - 1;
  return { file, header: found.header, skip, whitespaceLinesBeforeHeader: await whitespaceLines(source, skip), delimiter: found.delimiter, gzip: await isGzipFile(file) };
}

/** Bytes of a file's start read to compare first lines. */
const FIRST_LINE_LIMIT = 1 << 16;

/**
 * The first line of a plain file (up to and with its line feed) when it
 * settles the file's layout alone: no gzip, no quote, a line feed within
 * the first 64 KiB; otherwise null.
 */
export async function plainFirstLine(file: string): Promise<Buffer | null> {
  const handle = await fs.open(file, 'r');
  try {
    const head = Buffer.alloc(FIRST_LINE_LIMIT);
    const { bytesRead } = await handle.read(head, 0, FIRST_LINE_LIMIT, 0);
    if (bytesRead >= 2 && head[0] === 0x1f && head[1] === 0x8b) return null;
    const end = head.subarray(0, bytesRead).indexOf(LF);
    if (end < 0) return null;
    const line = head.subarray(0, end + 1);
    return line.includes(0x22) ? null : Buffer.from(line);
  } finally {
    await handle.close();
  }
}

/**
 * The layouts of several files: each sniffed by the built-in reader, but a
 * file whose first line is byte for byte that of the first file (which had
 * its header on that line, unquoted, nothing before it) has that file's
 * layout without being sniffed again (the header line alone gives the
 * header and the delimiter).
 */
export async function csvLayouts(files: readonly string[], reader: ReaderOptions): Promise<CsvFileLayout[]> {
  const first = await csvLayout(files[0], reader);
  const firstLine = first.skip === 0 && !first.gzip && files.length > 1 ? await plainFirstLine(first.file) : null;
  const layouts = [first];
  for (const file of files.slice(1)) {
    const line = firstLine === null ? null : await plainFirstLine(file);
    layouts.push(line !== null && firstLine !== null && line.equals(firstLine) ? { ...first, file } : await csvLayout(file, reader));
  }
  return layouts;
}

/**
 * How many of the first `lines` lines (the blank lines before the header)
 * hold spaces or tabs: the built-in reader counts them as blank lines, the
 * engine only skips them.
 */
async function whitespaceLines(source: InputSource, lines: number): Promise<number> {
  if (lines === 0) return 0;
  let seen = 0;
  let whitespace = 0;
  let current = false;
  let afterCr = false;
  for await (const chunk of rawChunks(source)) {
    for (let i = 0; i < chunk.length && seen < lines; i++) {
      const b = chunk[i];
      if (b === LF && afterCr) {
        afterCr = false;
        continue;
      }
      afterCr = b === CR;
      if (b === LF || b === CR) {
        if (current) whitespace++;
        current = false;
        seen++;
      } else current = true;
    }
    if (seen >= lines) break;
  }
  return whitespace;
}

/** What one pass over a CSV file's bytes says about the ways the engine would read it differently from the built-in reader. */
export interface ByteFacts {
  /** Empty lines outside quoted fields: the engine skips them without a word, the built-in reader counts them. */
  emptyLines: number;
  /** Why the built-in reader must judge the file (it would refuse it where the engine reads on), or null. */
  suspect: string | null;
}

const QUOTE = 0x22;
const LF = 0x0a;
const CR = 0x0d;

/**
 * Whether a plain file may hold an empty line, a NUL byte or a space or tab
 * after a quote anywhere (most files hold none, which native searches
 * settle quickly); only then is every byte looked at.
 */
async function needsByteScan(file: string): Promise<boolean> {
  let previous = -1;
  for await (const raw of createReadStream(file, { highWaterMark: 1 << 22 })) {
    const chunk = raw as Buffer;
    const first = chunk[0];
    if (previous === -1 && (first === LF || first === CR)) return true;
    if ((previous === LF && (first === LF || first === CR)) || (previous === CR && first === CR)) return true;
    if (previous === QUOTE && (first === 0x20 || first === 0x09)) return true;
    if (chunk.indexOf('\n\n') >= 0 || chunk.indexOf('\n\r\n') >= 0 || chunk.indexOf('\r\r') >= 0) return true;
    if (chunk.indexOf(0) >= 0 || chunk.indexOf('" ') >= 0 || chunk.indexOf('"\t') >= 0) return true;
    previous = chunk[chunk.length - 1];
  }
  return false;
}

/**
 * One pass over every byte, with the quote state of RFC 4180 as the built-in
 * reader keeps it: empty lines outside quotes are counted; a NUL byte, or a
 * character other than the delimiter or a line end after a closing quote
 * (the engine takes `"x" ,1` for `x`, the built-in reader refuses the row),
 * makes the file suspect.
 */
export async function byteFacts(file: string, gzip: boolean, delimiter: string): Promise<ByteFacts> {
  if (!gzip && !(await needsByteScan(file))) return { emptyLines: 0, suspect: null };
  const separator = delimiter.charCodeAt(0);
  let emptyLines = 0;
  let suspect: string | null = null;
  // 0 outside quotes, 1 inside, 2 inside right after a quote (an escaped quote or the closing one).
  let state = 0;
  let lineEmpty = true;
  let afterCr = false;
  for await (const chunk of rawChunks({ path: file, label: file })) {
    if (suspect === null && chunk.indexOf(0) >= 0) suspect = 'a NUL byte';
    for (let i = 0; i < chunk.length; i++) {
      const b = chunk[i];
      if (state === 2) {
        if (b === QUOTE) {
          state = 1; // a doubled quote inside the field
          continue;
        }
        state = 0;
        if (b !== separator && b !== LF && b !== CR && suspect === null) suspect = 'a character after a closing quote';
      } else if (state === 1) {
        if (b === QUOTE) state = 2;
        continue;
      }
      if (b === LF && afterCr) {
        afterCr = false;
        continue; // the LF of a CRLF
      }
      afterCr = false;
      if (b === LF || b === CR) {
        if (lineEmpty) emptyLines++;
        lineEmpty = true;
        afterCr = b === CR;
        continue;
      }
      lineEmpty = false;
      if (b === QUOTE) state = 1;
    }
  }
  return { emptyLines, suspect };
}
