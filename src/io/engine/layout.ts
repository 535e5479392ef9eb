/**
 * Layout sniffing: how the built-in reader sees a CSV file (its header,
 * delimiter, the blank lines before the header, gzip or not), so that the
 * engine reads it the same way, and the empty lines the engine would skip
 * without a word (the built-in reader counts them).
 */
import { createReadStream } from 'node:fs';
import { readRecords, ReaderOptions } from '../readRecords.js';
import { InputSource, isGzipFile, rawChunks } from '../source.js';
import { EngineFallback } from './query.js';
import type { CsvDialect } from './sql.js';

export interface CsvFileLayout extends CsvDialect {
  file: string;
  header: string[];
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
  return { file, header: found.header, skip: found.line - 1, delimiter: found.delimiter, gzip: await isGzipFile(file) };
}

/** Whether a plain file has two line ends in a row anywhere (most files have none, which a native search settles quickly). */
async function mayHaveEmptyLines(file: string): Promise<boolean> {
  let previous = -1;
  for await (const raw of createReadStream(file, { highWaterMark: 1 << 22 })) {
    const chunk = raw as Buffer;
    if (previous === -1 && (chunk[0] === 0x0a || chunk[0] === 0x0d)) return true;
    if (previous === 0x0a && (chunk[0] === 0x0a || chunk[0] === 0x0d)) return true;
    if (previous === 0x0d && chunk[0] === 0x0d) return true;
    if (chunk.indexOf('\n\n') >= 0 || chunk.indexOf('\n\r\n') >= 0 || chunk.indexOf('\r\r') >= 0) return true;
    previous = chunk[chunk.length - 1];
  }
  return false;
}

/** Empty lines outside quoted fields: the engine skips them without a word, the built-in reader counts them. */
export async function countEmptyLines(file: string, gzip: boolean): Promise<number> {
  if (!gzip && !(await mayHaveEmptyLines(file))) return 0;
  let count = 0;
  let inQuotes = false;
  let lineEmpty = true;
  let afterCr = false;
  for await (const chunk of rawChunks({ path: file, label: file })) {
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
