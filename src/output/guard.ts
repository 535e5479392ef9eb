/**
 * Outputs never destroy inputs: before any work (and again for the files a
 * pattern matches, once they are known), an --output or --plot target that
 * is the same file as an input, or --output and --plot naming one file, is
 * refused with status 2.
 */
import { realpathSync } from 'node:fs';
import { basename, dirname, join, resolve } from 'node:path';
import { usageError } from '../errors.js';
import { FileIdentity, identityOfDescriptor, identityOfPath, sameIdentity } from './identity.js';

/** A file a run writes, and the option that names it (for messages). */
export interface OutputTarget {
  option: string;
  path: string;
}

/** Where a path leads: its real path when it exists, else its real directory and its name. */
function resolvedPath(path: string): string {
  try {
    return realpathSync(path);
  } catch {
    try {
      return join(realpathSync(dirname(path)), basename(path));
    } catch {
      return resolve(path);
    }
  }
}

export class OutputGuard {
  private readonly targets: (OutputTarget & { identity: FileIdentity | null })[];

  /**
   * `stdinFd` is the descriptor of the run's standard input when it is the
   * process's own (0), so that `< data.csv --output data.csv` is caught too.
   */
  constructor(targets: readonly (OutputTarget | null)[], private readonly stdinFd: number | null) {
    this.targets = targets.filter((t): t is OutputTarget => t !== null).map((t) => ({ ...t, identity: identityOfPath(t.path) }));
    for (let a = 0; a < this.targets.length; a++) {
      for (let b = a + 1; b < this.targets.length; b++) {
        const [x, y] = [this.targets[a], this.targets[b]];
        if (sameIdentity(x.identity, y.identity) || resolvedPath(x.path) === resolvedPath(y.path)) {
          throw usageError(`${x.option} ${x.path} and ${y.option} ${y.path} name the same file; give each its own file`);
        }
      }
    }
  }

  /** Refuses when a target is one of these inputs ('-' is standard input). */
  checkInputs(inputs: readonly string[]): void {
    if (this.targets.every((t) => t.identity === null)) return;
    for (const input of inputs) {
      const identity = input === '-' ? (this.stdinFd === null ? null : identityOfDescriptor(this.stdinFd)) : identityOfPath(input);
      for (const target of this.targets) {
        if (!sameIdentity(target.identity, identity)) continue;
        const what = input === '-' ? 'the file on standard input' : `the input file ${input}`;
        throw usageError(`${target.option} ${target.path} is ${what}; writing there would destroy the data, so choose another file`);
      }
    }
  }
}
