/**
 * The temporary files of atomic writes that exist right now: removed when a
 * write fails, when the process exits, and on SIGINT, SIGTERM or SIGHUP
 * during the write (src/cleanup.ts holds the signal listeners while a write
 * is under way).
 */
import { unlinkSync } from 'node:fs';
import { atProcessEnd } from '../cleanup.js';

const live = new Map<string, () => void>();

export function holdTemporary(path: string): void {
  live.set(
    path,
    atProcessEnd(() => {
      try {
        unlinkSync(path);
      } catch {
        // already gone
      }
    }),
  );
}

export function releaseTemporary(path: string): void {
  live.get(path)?.();
  live.delete(path);
}
