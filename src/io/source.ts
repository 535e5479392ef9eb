/**
 * Where the input comes from (a file, plain or gzip, or standard input) and
 * its decoding to UTF-8, with one-line errors naming the byte and line.
 */
import { accessSync, closeSync, constants, createReadStream, existsSync, openSync, read, readSync, Stats, statSync } from 'node:fs';
import { isUtf8 } from 'node:buffer';
import { TextDecoder } from 'node:util';
import { dataError, usageError } from '../errors.js';

/** Where the CSV comes from: a path, or '-' for standard input. */
export interface InputSource {
  path: string;
  /** How the file is named in messages. */
  label: string;
  /** The stream read for '-' (a run's standard input; the process's when absent). */
  stdin?: NodeJS.ReadableStream & { isTTY?: boolean };
}

/**
 * The source a path names. `streams` holds the run's standard input; it is
 * asked for it only when the path is '-' (the process's standard input
 * stream is made when first asked for, and a run that reads a file does not
 * need it).
 */
export function inputSource(path: string | undefined, streams?: { readonly stdin: NodeJS.ReadableStream & { isTTY?: boolean } }): InputSource {
  if (path === undefined || path === '-') return { path: '-', label: 'standard input', stdin: streams?.stdin };
  refuseRemote(path);
  return { path, label: path };
}

/** A URL (scheme://…) or one of the engine's remote schemes without slashes (md:, motherduck:). */
const REMOTE = /^([a-z][a-z0-9+.-]*:\/\/|(md|motherduck):)/i;

/**
 * The tool reads local files and standard input only: a URL or a remote
 * scheme (http://, s3://, hf://, file://, …) is refused in one line (status 2)
 * before anything is opened, so no engine ever reaches out of the machine;
 * a local file that happens to have such a name is still that file.
 */
export function refuseRemote(path: string): void {
  if (!REMOTE.test(path) || existsSync(path)) return;
  const scheme = /^[^:]*/.exec(path)![0];
  throw usageError(`${path}: a remote address (${scheme}:); tabsight reads local files and standard input only (fetch the data first, then give its local path)`);
}

/**
 * Standard input is a stream, read once: naming it ('-' or /dev/stdin) for
 * two inputs of one run would read the second as empty. A usage error.
 */
export function refuseStdinTwice(paths: readonly string[]): void {
  const named = paths.filter((p) => p === '-' || p === '/dev/stdin' || p === '/proc/self/fd/0' || p === '/dev/fd/0');
  if (named.length > 1) throw usageError(`standard input is named ${named.length} times (${named.join(', ')}); it is read once, so give it for one input only and the others as files`);
}

export function describeOpenError(source: InputSource, error: NodeJS.ErrnoException): Error {
  switch (error.code) {
    case 'ENOENT':
      return dataError(`${source.label}: no such file`);
    case 'EISDIR':
      return dataError(`${source.label}: is a directory, not a CSV file`);
    case 'ENOTDIR':
      return dataError(`${source.label}: a part of the path is a file, not a directory`);
    case 'EACCES':
    case 'EPERM':
      return dataError(`${source.label}: permission denied`);
    default:
      return dataError(`${source.label}: cannot read (${error.code ?? error.message})`);
  }
}

/** A file that exists, is not a directory and can be read (its stats); otherwise the tool's one-line message. */
export async function checkFile(source: InputSource): Promise<Stats> {
  try {
    const stats = statSync(source.path);
    if (stats.isDirectory()) throw Object.assign(new Error('directory'), { code: 'EISDIR' });
    accessSync(source.path, constants.R_OK);
    return stats;
  } catch (error) {
    throw describeOpenError(source, error as NodeJS.ErrnoException);
  }
}

/**
 * Whether a path names a stream rather than a regular file: a pipe, a FIFO,
 * a process substitution (`<(…)`, /dev/fd/N), a character device or a
 * socket. Streams are read once, from their start, and never again.
 */
export async function isStreamPath(path: string): Promise<boolean> {
  if (path === '-') return true;
  try {
    return !statSync(path).isFile();
  } catch {
    return false;
  }
}

/** The raw bytes of a source as they arrive, and whether the source can be read again from its start (a regular file). */
interface OpenedSource {
  chunks: AsyncIterable<Buffer>;
  rereadable: boolean;
}

/**
 * Opens the source for one sequential read (no positioned reads, so pipes,
 * FIFOs and devices work). Files are checked first so that a directory or a
 * missing file gives a clear message before any work.
 */
async function openSource(source: InputSource): Promise<OpenedSource> {
  if (source.path === '-') return { chunks: (source.stdin ?? process.stdin) as AsyncIterable<Buffer>, rereadable: false };
  const stats = await checkFile(source);
  if (!stats.isFile()) return { chunks: createReadStream(source.path, { highWaterMark: READ_BLOCK }), rereadable: false };
  return { chunks: fileBlocks(source.path), rereadable: true };
}

/** Bytes read from a regular file at a time. */
export const READ_BLOCK = 1 << 20;
/** Bytes of a regular file's first read. */
const FIRST_BLOCK = 1 << 16;

/**
 * A regular file's bytes, block by block, through two buffers used in turn
 * (a fresh buffer per block cost a page fault per 4 KiB; see README, Speed):
 * the next block is read in the thread pool while the caller works on the
 * current one, so a chunk is valid only until the caller asks for the next,
 * and a caller that keeps bytes longer copies them. The first read, and a
 * read after a short one (the file's end is near: for a small file, the
 * read that finds the end), are made at once in this thread: the file's
 * metadata calls are synchronous too, so a run on a small file never starts
 * the thread pool (README, Speed).
 */
async function* fileBlocks(path: string): AsyncGenerator<Buffer> {
  const fd = openSync(path, 'r');
  const blocks = [Buffer.allocUnsafe(READ_BLOCK), Buffer.allocUnsafe(READ_BLOCK)];
  // The first read is short: it holds the header (all that a reader of the
  // header wants) and, for a small file, the whole file.
  let next = readNow(fd, blocks[0], FIRST_BLOCK);
  let asked = FIRST_BLOCK;
  try {
    for (let k = 1; ; k ^= 1) {
      const bytesRead = await next;
      if (bytesRead === 0) break;
      next = bytesRead < asked ? readNow(fd, blocks[k], READ_BLOCK) : readInPool(fd, blocks[k], READ_BLOCK);
      asked = READ_BLOCK;
      yield blocks[k ^ 1].subarray(0, bytesRead);
    }
  } finally {
    // A read still in flight finishes before the file is closed.
    await Promise.resolve(next).catch(() => undefined);
    closeSync(fd);
  }
}

/**
 * Reads up to `length` bytes at the file's position into the start of
 * `buffer` in this thread. A failure becomes a rejected promise, marked as
 * handled: it is thrown where the read is awaited, as a failed read in the
 * thread pool would be.
 */
function readNow(fd: number, buffer: Buffer, length: number): number | Promise<number> {
  try {
    return readSync(fd, buffer, 0, length, null);
  } catch (error) {
    const failed = Promise.reject(error as Error);
    failed.catch(() => undefined);
    return failed;
  }
}

/** Reads up to `length` bytes at the file's position into the start of `buffer` in the thread pool. */
function readInPool(fd: number, buffer: Buffer, length: number): Promise<number> {
  return new Promise((resolve, reject) => read(fd, buffer, 0, length, null, (error, bytesRead) => (error ? reject(error) : resolve(bytesRead))));
}

/** True when bytes start with the gzip magic bytes 1f 8b (RFC 1952, §2.3.1). */
function gzipMagic(head: Uint8Array): boolean {
  return head.length >= 2 && head[0] === 0x1f && head[1] === 0x8b;
}

/**
 * The bytes, decompressed when they are gzip (recognised by their first two
 * bytes, as they stream: a file, a pipe or standard input alike).
 */
async function* gunzipWhenCompressed(chunks: AsyncIterable<Buffer>): AsyncGenerator<Buffer> {
  const iterator = chunks[Symbol.asyncIterator]();
  try {
    yield* inflatedWhenCompressed(iterator);
  } finally {
    // A reader that stops early (the header is all it wanted) closes the source now, not at garbage collection.
    await iterator.return?.();
  }
}

async function* inflatedWhenCompressed(iterator: AsyncIterator<Buffer>): AsyncGenerator<Buffer> {
  let head: Buffer = Buffer.alloc(0);
  let ended = false;
  while (head.length < 2) {
    const next = await iterator.next();
    if (next.done) {
      ended = true;
      break;
    }
    // (Copied when another chunk must be read to see two bytes: a chunk may be
    // valid only until the next one is read. A first chunk of two bytes or
    // more is handed on as it is: copying a whole block was a fixed cost of
    // every file.)
    head = head.length === 0 && next.value.length >= 2 ? next.value : Buffer.concat([head, next.value]);
  }
  async function* all(): AsyncGenerator<Buffer> {
    try {
      if (head.length > 0) yield head;
      if (ended) return;
      for (let next = await iterator.next(); !next.done; next = await iterator.next()) yield next.value;
    } finally {
      // A reader that stops early (a header read, an error) lets the source close its file now, not on garbage collection.
      await iterator.return?.(undefined);
    }
  }
  if (!gzipMagic(head)) {
    yield* all();
    return;
  }
  // pipeline passes a read error of the source on to the stream being read;
  // the stream reads ahead, so it is given copies.
  async function* copies(): AsyncGenerator<Buffer> {
    for await (const chunk of all()) yield Buffer.from(chunk);
  }
  const source = copies();
  // Loaded only for gzip: a plain file does not pay for the modules' start-up.
  const [{ createGunzip }, { pipeline, Readable }] = await Promise.all([import('node:zlib'), import('node:stream')]);
  const inflated = pipeline(Readable.from(source), createGunzip({ chunkSize: 1 << 20 }), () => undefined);
  try {
    for await (const chunk of inflated) yield chunk as Buffer;
  } finally {
    inflated.destroy();
    await source.return(undefined);
  }
}

/** The bytes of an opened source, decompressed, with a failure turned into the tool's one line naming it. */
async function* bytesOf(source: InputSource, opened: OpenedSource): AsyncGenerator<Buffer> {
  try {
    yield* gunzipWhenCompressed(opened.chunks);
  } catch (error) {
    const e = error as NodeJS.ErrnoException;
    if (e.code?.startsWith('Z_')) throw dataError(`${source.label}: not a readable gzip file (${e.message}); the file may be cut short`);
    throw describeOpenError(source, e);
  }
}

/** Streams the raw bytes of the source (decompressed when gzip), reading it once. */
export async function* rawChunks(source: InputSource): AsyncGenerator<Buffer> {
  yield* bytesOf(source, await openSource(source));
}

/** True when a regular file starts with the gzip magic bytes (for files only: it reads the start again). */
export async function isGzipFile(path: string): Promise<boolean> {
  const fd = openSync(path, 'r');
  try {
    const head = Buffer.alloc(2);
    return readSync(fd, head, 0, 2, 0) === 2 && gzipMagic(head);
  } finally {
    closeSync(fd);
  }
}

export type Encoding = 'utf-8' | 'utf-16le' | 'utf-16be';

/** The length of bytes without an incomplete UTF-8 sequence at its end (held back for the next block). */
export function completeUtf8Length(bytes: Uint8Array): number {
  for (let k = 1; k <= 3 && k <= bytes.length; k++) {
    const b = bytes[bytes.length - k];
    if ((b & 0xc0) === 0x80) continue;
    const needed = b >= 0xf0 ? 4 : b >= 0xe0 ? 3 : b >= 0xc0 ? 2 : 1;
    return needed > k ? bytes.length - k : bytes.length;
  }
  return bytes.length;
}

/** The byte offset and line of the first invalid UTF-8 sequence in bytes, or −1. */
export function firstInvalidUtf8(bytes: Uint8Array): number {
  let i = 0;
  while (i < bytes.length) {
    const b = bytes[i];
    let extra: number;
    let min: number;
    if (b < 0x80) {
      i++;
      continue;
    } else if (b >= 0xc2 && b <= 0xdf) {
      extra = 1;
      min = 0x80;
    } else if (b >= 0xe0 && b <= 0xef) {
      extra = 2;
      min = 0x800;
    } else if (b >= 0xf0 && b <= 0xf4) {
      extra = 3;
      min = 0x10000;
    } else return i;
    if (i + extra > bytes.length - 1) return i;
    let code = b & (0x3f >> extra);
    for (let k = 1; k <= extra; k++) {
      const c = bytes[i + k];
      if ((c & 0xc0) !== 0x80) return i;
      code = (code << 6) | (c & 0x3f);
    }
    if (code < min || code > 0x10ffff || (code >= 0xd800 && code <= 0xdfff)) return i;
    i += extra + 1;
  }
  return -1;
}

/**
 * The line of a byte offset. A regular file is read again from the start
 * (only on the way to an error), so the happy path never counts line
 * feeds; a stream (standard input, a pipe, a FIFO, a device) cannot be read
 * twice, so its line feeds are counted as it streams.
 */
async function lineOfOffset(source: InputSource, rereadable: boolean, offset: number, streamedNewlines: number, chunk: Uint8Array, inChunk: number): Promise<number> {
  if (!rereadable) return streamedNewlines + lineAt([chunk], inChunk);
  let line = 1;
  let seen = 0;
  for await (const part of rawChunks(source)) {
    const limit = Math.min(part.length, offset - seen);
    for (let i = part.indexOf(0x0a); i >= 0 && i < limit; i = part.indexOf(0x0a, i + 1)) line++;
    seen += part.length;
    if (seen >= offset) break;
  }
  return line;
}

function lineAt(bytesBefore: Uint8Array[], offsetInLast: number): number {
  let line = 1;
  bytesBefore.forEach((chunk, k) => {
    const limit = k === bytesBefore.length - 1 ? offsetInLast : chunk.length;
    for (let i = 0; i < limit; i++) if (chunk[i] === 0x0a) line++;
  });
  return line;
}

/**
 * Decodes the source to UTF-8 bytes: a UTF-8 byte-order mark is dropped,
 * UTF-16 (LE or BE, recognised by its mark) is transcoded, and anything
 * else must be valid UTF-8 without NUL bytes; otherwise one line names the
 * byte offset and line.
 */
export async function* utf8Chunks(source: InputSource, encoding?: string): AsyncGenerator<Uint8Array> {
  if (encoding !== undefined && !/^utf-?8$/i.test(encoding)) {
    yield* transcodedChunks(source, encoding);
    return;
  }
  const opened = await openSource(source);
  // The first bytes are held until three are in (or the input ends), so that a byte-order mark split across reads of a pipe is still seen.
  let head: Buffer | null = Buffer.alloc(0);
  let carry: Buffer = Buffer.alloc(0);
  let offset = 0; // bytes of the source consumed before the current chunk
  let newlinesBefore = 0;
  let decoder: TextDecoder | null = null;

  async function* decode(chunk: Buffer): AsyncGenerator<Uint8Array> {
    if (decoder) {
      let text: string;
      try {
        // The decoder drops the byte-order mark itself.
        text = decoder.decode(chunk, { stream: true });
      } catch {
        throw dataError(`${source.label}: invalid UTF-16 near byte ${offset}`);
      }
      offset += chunk.length;
      if (text.length > 0) yield Buffer.from(text, 'utf8');
      return;
    }
    let bytes = carry.length > 0 ? Buffer.concat([carry, chunk]) : chunk;
    // Hold back an incomplete multi-byte sequence at the end for the next chunk.
    const cut = completeUtf8Length(bytes);
    carry = Buffer.from(bytes.subarray(cut));
    bytes = bytes.subarray(0, cut);
    const nul = bytes.indexOf(0);
    if (nul >= 0) {
      const line = await lineOfOffset(source, opened.rereadable, offset + nul, newlinesBefore, bytes, nul);
      throw dataError(`${source.label}: NUL byte at byte offset ${offset + nul} (line ${line}); this looks like a binary file or UTF-16 without a byte-order mark`);
    }
    if (!isUtf8(bytes)) {
      const bad = firstInvalidUtf8(bytes);
      throw dataError(
        `${source.label}: invalid UTF-8 at byte offset ${offset + bad} (line ${await lineOfOffset(source, opened.rereadable, offset + bad, newlinesBefore, bytes, bad)}); pass --encoding (for example latin1 or windows-1252)`,
      );
    }
    if (!opened.rereadable) for (let i = bytes.indexOf(0x0a); i >= 0; i = bytes.indexOf(0x0a, i + 1)) newlinesBefore++;
    offset += bytes.length;
    yield bytes;
  }

  /** The first bytes, once enough are in: the byte-order mark decides the decoding. */
  function start(bytes: Buffer): Buffer {
    if (bytes[0] === 0xff && bytes[1] === 0xfe) decoder = new TextDecoder('utf-16le', { fatal: true });
    else if (bytes[0] === 0xfe && bytes[1] === 0xff) decoder = new TextDecoder('utf-16be', { fatal: true });
    else if (bytes[0] === 0xef && bytes[1] === 0xbb && bytes[2] === 0xbf) {
      offset = 3;
      return bytes.subarray(3);
    }
    return bytes;
  }

  for await (const raw of bytesOf(source, opened)) {
    if (head !== null) {
      head = head.length === 0 ? raw : Buffer.concat([head, raw]);
      if (head.length < 3) {
        head = Buffer.from(head); // kept past the next read
        continue;
      }
      const first = start(head);
      head = null;
      yield* decode(first);
      continue;
    }
    yield* decode(raw);
  }
  if (head !== null && head.length > 0) yield* decode(start(head));
  if (carry.length > 0) {
    throw dataError(`${source.label}: invalid UTF-8 at byte offset ${offset} (the file ends inside a character); pass --encoding`);
  }
  if (decoder) {
    let rest: string;
    try {
      rest = (decoder as TextDecoder).decode();
    } catch {
      throw dataError(`${source.label}: the UTF-16 text ends inside a character (an odd number of bytes, or half of a surrogate pair)`);
    }
    if (rest.length > 0) yield Buffer.from(rest, 'utf8');
  }
}

export function checkReadable(source: InputSource): void {
  if (source.path === '-' && (source.stdin ?? process.stdin).isTTY) {
    throw usageError('no input: give a CSV file, or pipe one in and use - for standard input');
  }
}

/** Decodes a source in a named legacy encoding (latin1, windows-1252, utf-16le, …) to UTF-8. */
async function* transcodedChunks(source: InputSource, encoding: string): AsyncGenerator<Uint8Array> {
  let decoder: TextDecoder;
  try {
    decoder = new TextDecoder(encoding);
  } catch {
    throw usageError(`--encoding ${encoding}: not an encoding this Node.js knows (try latin1, windows-1252, utf-16le, utf-16be)`);
  }
  let first = true;
  for await (const raw of rawChunks(source)) {
    let text = decoder.decode(raw, { stream: true });
    if (first) {
      first = false;
      if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
    }
    if (text.length > 0) yield Buffer.from(text, 'utf8');
  }
  const rest = decoder.decode();
  if (rest.length > 0) yield Buffer.from(rest, 'utf8');
}
