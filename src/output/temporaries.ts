/**
 * The temporary files of atomic writes that exist right now, so that a run
 * stopped by a signal (SIGINT, SIGTERM, SIGHUP) removes them before it ends.
 */
import { unlinkSync } from 'node:fs';
import { runProcessEndTasks } from '../cleanup.js';

const live = new Set<string>();

export function holdTemporary(path: string): void {
  live.add(path);
}

export function releaseTemporary(path: string): void {
  live.delete(path);
}

/** Removes every temporary file still held (best effort: a file already gone is fine). */
export function removeTemporaries(): void {
  for (const path of live) {
    try {
      unlinkSync(path);
    } catch {
      // already gone
    }
    live.delete(path);
  }
}

export const CLEANUP_SIGNALS = ['SIGINT', 'SIGTERM', 'SIGHUP'] as const;

/**
 * On SIGINT, SIGTERM or SIGHUP: remove the temporaries, then end by the
 * same signal (the listener is gone by then, so the default action runs and
 * the parent sees the signal, as shells expect).
 */
export function removeTemporariesOnSignals(): void {
  for (const signal of CLEANUP_SIGNALS) {
    process.once(signal, () => {
      removeTemporaries();
      runProcessEndTasks(); // the engine's folder, among others (src/cleanup.ts)
      process.kill(process.pid, signal);
    });
  }
}
