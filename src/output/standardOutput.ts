/**
 * Standard output as a run writes it: every write is checked, so a full
 * disk, a file size limit, /dev/full or a closed standard output (`>&-`)
 * ends the run with one line and a non-zero status instead of a cut report
 * and status 0; a pipe whose reader went away (`| head`) ends it quietly.
 */
import { fstatSync, readFileSync, readlinkSync, writeSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dataError } from '../errors.js';
import { ClosedPipe, writeFailure } from './reasons.js';

/** A stream a run writes to; isTTY is true only for a terminal. The callback says when the text is out, or why not. */
export interface OutputStream {
  write(text: string | Uint8Array, callback?: (error?: Error | null) => void): boolean;
  once(event: 'drain', listener: () => void): unknown;
  isTTY?: boolean;
}

/**
 * Standard output on a file, a pipe or a device other than a terminal,
 * written with one system call after another until every byte is out:
 * Node's own stream for files takes a short write (a file size limit) for
 * success, and its stream for pipes loads the network modules, a visible
 * part of a run on a small file (README, Speed). Node writes to pipes
 * synchronously on Linux too. A pipe that a parent left non-blocking may
 * refuse a write while it is full (EAGAIN): from then on the text goes
 * through Node's stream, which waits for the reader, in the same order.
 */
class DescriptorStream implements OutputStream {
  readonly isTTY = false;
  private stream: OutputStream | null = null;
  constructor(private readonly fd: number, private readonly fallback: (() => OutputStream) | null = null) {}
  write(text: string | Uint8Array, callback?: (error?: Error | null) => void): boolean {
    if (this.stream !== null) return this.stream.write(text, callback);
    const bytes = typeof text === 'string' ? Buffer.from(text, 'utf8') : Buffer.from(text.buffer, text.byteOffset, text.byteLength);
    let error: Error | null = null;
    let written = 0;
    try {
      while (written < bytes.length) written += writeSync(this.fd, bytes, written, bytes.length - written);
    } catch (e) {
      if ((e as NodeJS.ErrnoException).code === 'EAGAIN' && this.fallback !== null) {
        this.stream = this.fallback();
        return this.stream.write(bytes.subarray(written), callback);
      }
      error = e as Error;
    }
    if (callback) queueMicrotask(() => callback(error));
    return error === null;
  }
  once(event: 'drain', listener: () => void): unknown {
    return this.stream === null ? this : this.stream.once(event, listener);
  }
}

/**
 * True when the process was started with standard output closed (`>&-`):
 * Node then opens /dev/null for reading and writing in its place, where a
 * shell's `> /dev/null` opens it for writing only (Linux; elsewhere false).
 */
export function standardOutputClosed(fd = 1): boolean {
  try {
    if (readlinkSync(`/proc/self/fd/${fd}`) !== '/dev/null') return false;
    const flags = /^flags:\s*([0-7]+)/m.exec(readFileSync(`/proc/self/fdinfo/${fd}`, 'utf8'));
    return flags !== null && (parseInt(flags[1], 8) & 3) === 2;
  } catch {
    return false;
  }
}

/** node:tty, loaded only where a terminal may be (it loads the network and stream modules with it). */
function terminalModule(): typeof import('node:tty') {
  return createRequire(import.meta.url)('node:tty') as typeof import('node:tty');
}

/**
 * Node's stream of standard output or error, made on first use. Write
 * errors reach each write's callback (writeStandardOutput), where they end
 * the run with one line (a closed pipe: quietly); the stream's error event
 * is then only an echo, and standard error that cannot be written (a closed
 * pipe) must not change the status either.
 */
export function nodeStream(name: 'stdout' | 'stderr'): NodeJS.WriteStream {
  const stream = process[name];
  if (stream.listenerCount('error') === 0) stream.on('error', () => undefined);
  return stream;
}

/**
 * Whether a descriptor is a terminal, asking node:tty only for a character
 * device other than /dev/null (a file, a pipe or /dev/null never is one).
 */
function isTerminal(fd: number): boolean {
  try {
    if (!fstatSync(fd).isCharacterDevice()) return false;
  } catch {
    return false;
  }
  try {
    if (readlinkSync(`/proc/self/fd/${fd}`) === '/dev/null') return false;
  } catch {
    // no /proc (not Linux): node:tty answers
  }
  return terminalModule().isatty(fd);
}

/** The process's standard error: Node's stream, made at the first write (most runs write none); whether it is a terminal is known without it. */
export function processStandardError(): OutputStream {
  let terminal: boolean | undefined;
  return {
    get isTTY() {
      return (terminal ??= isTerminal(2));
    },
    write: (text, callback) => nodeStream('stderr').write(text, callback),
    once: (event, listener) => nodeStream('stderr').once(event, listener),
  };
}

/** The process's standard output: checked writes on files, pipes and devices, Node's stream on terminals, an error when it was closed. */
export function processStandardOutput(): OutputStream {
  if (standardOutputClosed()) {
    return {
      isTTY: false,
      once: () => undefined,
      write: (_text, callback) => {
        if (callback) queueMicrotask(() => callback(Object.assign(new Error('standard output is closed'), { code: 'EBADF' })));
        return false;
      },
    };
  }
  try {
    const stats = fstatSync(1);
    if (stats.isFile() || stats.isBlockDevice()) return new DescriptorStream(1);
    if (stats.isFIFO() || stats.isSocket()) return new DescriptorStream(1, () => nodeStream('stdout'));
    if (stats.isCharacterDevice() && !isTerminal(1)) return new DescriptorStream(1);
  } catch {
    // fall through to Node's stream
  }
  return nodeStream('stdout');
}

/** Writes to a run's standard output and resolves once the text is out; a failure is one line (a closed pipe: ClosedPipe). */
export function writeStandardOutput(stream: OutputStream, text: string | Uint8Array): Promise<void> {
  return new Promise((resolve, reject) => {
    stream.write(text, (error) => {
      if (!error) resolve();
      else if ((error as NodeJS.ErrnoException).code === 'EPIPE') reject(new ClosedPipe());
      else if ((error as NodeJS.ErrnoException).code === 'EBADF') reject(dataError('standard output is closed; redirect it to a file or use --output'));
      else reject(dataError(`standard output: cannot write: ${writeFailure(error)}; the report is incomplete`));
    });
  });
}
