/**
 * A file's identity (device and inode, through symbolic links), so that an
 * output is never the same file as an input however it is named: another
 * path, a symbolic link, a hard link, or standard input redirected from it.
 */
import { fstatSync, statSync, Stats } from 'node:fs';

export interface FileIdentity {
  dev: number;
  ino: number;
}

function identity(stats: Stats): FileIdentity {
  return { dev: stats.dev, ino: stats.ino };
}

/** The identity of the file a path names (following links), or null when there is none. */
export function identityOfPath(path: string): FileIdentity | null {
  try {
    return identity(statSync(path));
  } catch {
    return null;
  }
}

/** The identity of an open descriptor when it is a regular file (standard input redirected from a file), else null. */
export function identityOfDescriptor(fd: number): FileIdentity | null {
  try {
    const stats = fstatSync(fd);
    return stats.isFile() ? identity(stats) : null;
  } catch {
    return null;
  }
}

export function sameIdentity(a: FileIdentity | null, b: FileIdentity | null): boolean {
  return a !== null && b !== null && a.dev === b.dev && a.ino === b.ino;
}
