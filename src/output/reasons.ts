/**
 * Why a write failed, in words, from the system's error code; and the one
 * failure that is not an error: the reader of a pipe went away (`| head`).
 */

/** The reader of a pipe closed it: the run ends quietly with status 0 (see README, "In shell scripts"). */
export class ClosedPipe extends Error {
  constructor() {
    super('the reader closed the pipe');
    this.name = 'ClosedPipe';
  }
}

const WORDS: Record<string, string> = {
  ENOSPC: 'no space left on the device',
  EFBIG: 'the file would exceed the largest size allowed here',
  EDQUOT: 'the disk quota is used up',
  EACCES: 'permission denied',
  EPERM: 'permission denied',
  EROFS: 'the file system is read-only',
  ENOENT: 'its directory does not exist',
  ENOTDIR: 'a part of the path is a file, not a directory',
  EISDIR: 'it is a directory',
  EBADF: 'it is closed',
  EIO: 'an input/output error',
  ENAMETOOLONG: 'the name is too long',
  ELOOP: 'too many symbolic links',
  ENXIO: 'no process reads it',
  EEXIST: 'a file of that name appeared meanwhile',
};

/** "no space left on the device (ENOSPC)". */
export function writeFailure(error: unknown): string {
  const code = (error as NodeJS.ErrnoException)?.code;
  if (code === undefined) return error instanceof Error ? error.message : String(error);
  return `${WORDS[code] ?? 'the system refused the write'} (${code})`;
}
