/**
 * Standard output as a run writes it: every write is checked, so a full
 * disk, a file size limit, /dev/full or a closed standard output (`>&-`)
 * ends the run with one line and a non-zero status instead of a cut report
 * and status 0; a pipe whose reader went away (`| head`) ends it quietly.
 */
import { fstatSync, readFileSync, readlinkSync, writeSync } from 'node:fs';
import { isatty } from 'node:tty';
import { dataError } from '../errors.js';
import { ClosedPipe, writeFailure } from './reasons.js';

/** A stream a run writes to; isTTY is true only for a terminal. The callback says when the text is out, or why not. */
export interface OutputStream {
  write(text: string | Uint8Array, callback?: (error?: Error | null) => void): boolean;
  once(event: 'drain', listener: () => void): unknown;
  isTTY?: boolean;
}

/**
 * Standard output on a file or a device other than a terminal, written
 * with one system call after another until every byte is out: Node's own
 * stream for files takes a short write (a file size limit) for success.
 */
class DescriptorStream implements OutputStream {
  readonly isTTY = false;
  constructor(private readonly fd: number) {}
  write(text: string | Uint8Array, callback?: (error?: Error | null) => void): boolean {
    const bytes = typeof text === 'string' ? Buffer.from(text, 'utf8') : Buffer.from(text.buffer, text.byteOffset, text.byteLength);
    let error: Error | null = null;
    try {
      for (let written = 0; written < bytes.length; ) written += writeSync(this.fd, bytes, written, bytes.length - written);
    } catch (e) {
      error = e as Error;
    }
    if (callback) queueMicrotask(() => callback(error));
    return error === null;
  }
  once(): this {
    return this;
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

/** The process's standard output: checked writes on files and devices, Node's stream on terminals and pipes, an error when it was closed. */
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
    if (stats.isFile() || stats.isBlockDevice() || (stats.isCharacterDevice() && !isatty(1))) return new DescriptorStream(1);
  } catch {
    // fall through to Node's stream
  }
  return process.stdout;
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
