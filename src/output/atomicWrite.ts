/**
 * Writing a report to a named file (--output, --plot, and the output of
 * count, merge and sql):
 *
 * - a regular file (or a new one) is written atomically: into a temporary
 *   file created exclusively (O_EXCL, O_NOFOLLOW, a random name) in the same
 *   directory as the real target, then renamed over it, so a failed or
 *   interrupted run never leaves half a report, a planted link is never
 *   followed, and two runs writing the same target both succeed (the last
 *   rename wins);
 * - the target keeps its mode (and, for root, its owner); a symbolic link
 *   stays a link, and the file it points to is replaced;
 * - a device or a FIFO is written directly (never replaced by a file);
 * - a temporary file is removed when the write fails and on SIGINT, SIGTERM
 *   and SIGHUP (temporaries.ts);
 * - every failure is one line naming the option and the file.
 */
import { constants, promises as fs, Stats } from 'node:fs';
import { basename, dirname, join } from 'node:path';
import { dataError } from '../errors.js';
import type { OutputTarget } from './guard.js';
import { ClosedPipe, writeFailure } from './reasons.js';
import { holdTemporary, releaseTemporary } from './temporaries.js';
import { withSignalCleanup } from '../cleanup.js';

/**
 * Test hooks (from the environment, TABSIGHT_FAIL_WRITE_AFTER and
 * TABSIGHT_PAUSE_WRITE_AFTER): fail with EIO, or stop and wait (for a signal),
 * once this many bytes are written.
 */
export interface WriteHooks {
  failAfter?: number;
  pauseAfter?: number;
}

const CHUNK = 1 << 16;

async function writeAll(handle: fs.FileHandle, bytes: Buffer, hooks: WriteHooks): Promise<void> {
  let written = 0;
  while (written < bytes.length) {
    const size = Math.min(CHUNK, bytes.length - written);
    if (hooks.failAfter !== undefined && written + size > hooks.failAfter) throw Object.assign(new Error('injected write failure'), { code: 'EIO' });
    if (hooks.pauseAfter !== undefined && written >= hooks.pauseAfter) await new Promise(() => setInterval(() => undefined, 1 << 30));
    // A short write (a file size limit, a full disk) leaves the rest for the next call, which then fails with its reason.
    const { bytesWritten } = await handle.write(bytes, written, size);
    written += bytesWritten;
  }
}

function failed(target: OutputTarget, error: unknown, afterwards = ''): Error {
  if ((error as NodeJS.ErrnoException)?.code === 'EPIPE') return new ClosedPipe();
  return dataError(`${target.option} ${target.path}: cannot write: ${writeFailure(error)}${afterwards}`);
}

/** What the path names now: its stats (through links), or null for a new file; refuses what cannot be written. */
async function existingTarget(target: OutputTarget): Promise<Stats | null> {
  try {
    const stats = await fs.stat(target.path);
    if (stats.isDirectory()) throw dataError(`${target.option} ${target.path}: is a directory; name a file`);
    return stats;
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code !== 'ENOENT') {
      if (error instanceof Error && error.name === 'TabsightError') throw error;
      throw failed(target, error);
    }
  }
  const link = await fs.lstat(target.path).catch(() => null);
  if (link?.isSymbolicLink()) throw dataError(`${target.option} ${target.path}: a symbolic link to a file that does not exist; name the file itself`);
  return null;
}

/** Writes a device or a FIFO in place. */
async function writeInPlace(target: OutputTarget, path: string, bytes: Buffer, hooks: WriteHooks): Promise<void> {
  let handle: fs.FileHandle;
  try {
    handle = await fs.open(path, constants.O_WRONLY | constants.O_NOCTTY);
  } catch (error) {
    throw failed(target, error);
  }
  try {
    await writeAll(handle, bytes, hooks);
  } catch (error) {
    throw failed(target, error);
  } finally {
    await handle.close().catch(() => undefined);
  }
}

/** The name of a temporary file beside `path`: hidden, random, and short enough for any file system. */
function temporaryName(path: string): string {
  return join(dirname(path), `.${basename(path).slice(0, 180)}.${Buffer.from(globalThis.crypto.getRandomValues(new Uint8Array(8))).toString('hex')}.tmp`);
}

async function writeAtomically(target: OutputTarget, path: string, existing: Stats | null, bytes: Buffer, hooks: WriteHooks): Promise<void> {
  const temporary = temporaryName(path);
  let handle: fs.FileHandle;
  try {
    // A new file gets the usual mode (0666 less the umask); an existing one's mode is copied below.
    handle = await fs.open(temporary, constants.O_WRONLY | constants.O_CREAT | constants.O_EXCL | constants.O_NOFOLLOW, existing ? 0o600 : 0o666);
  } catch (error) {
    throw failed(target, error);
  }
  holdTemporary(temporary);
  try {
    if (existing) {
      await handle.chmod(existing.mode & 0o777);
      if (process.getuid?.() === 0 && (existing.uid !== 0 || existing.gid !== 0)) await handle.chown(existing.uid, existing.gid).catch(() => undefined);
    }
    await writeAll(handle, bytes, hooks);
    await handle.sync();
    await handle.close();
    await fs.rename(temporary, path);
    releaseTemporary(temporary);
  } catch (error) {
    await handle.close().catch(() => undefined);
    await fs.unlink(temporary).catch(() => undefined);
    releaseTemporary(temporary);
    throw failed(target, error, existing ? '; the previous file is untouched' : '');
  }
}

/** Writes `text` to the file a target names (see the top of this file); a signal meanwhile removes the temporary file. */
export function writeTarget(target: OutputTarget, text: string | Uint8Array, hooks: WriteHooks = {}): Promise<void> {
  return withSignalCleanup(() => writeTargetNow(target, text, hooks));
}

async function writeTargetNow(target: OutputTarget, text: string | Uint8Array, hooks: WriteHooks): Promise<void> {
  const existing = await existingTarget(target);
  const bytes = typeof text === 'string' ? Buffer.from(text, 'utf8') : Buffer.from(text.buffer, text.byteOffset, text.byteLength);
  if (existing !== null && !existing.isFile()) return writeInPlace(target, target.path, bytes, hooks);
  // Through a symbolic link: the file it leads to is replaced, the link stays.
  const path = existing !== null ? await fs.realpath(target.path) : target.path;
  return writeAtomically(target, path, existing, bytes, hooks);
}
