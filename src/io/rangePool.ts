/**
 * A few worker threads kept for the whole run, each counting whole files or
 * byte ranges of them (io/rangeCount.ts) as they are handed out: the waves
 * of a series are many files of moderate size, and a thread started per
 * file would cost more than it counts. The files are counted on every core
 * while this thread reads the next headers and turns finished tallies into
 * tables (io/counting.ts, countFiles).
 */
import { Worker } from 'node:worker_threads';
import type { RangeRunner } from './parallelCount.js';
import type { RangeJob, RangeTally } from './rangeCount.js';

interface Pending {
  id: number;
  job: RangeJob;
  resolve: (tally: RangeTally) => void;
  reject: (error: unknown) => void;
}

interface PoolWorker {
  worker: Worker;
  /** Jobs posted to it and not answered yet, by id. */
  running: Map<number, Pending>;
}

/** Jobs a worker holds at once: the next one waits in its queue while it counts, so it never idles for a message. */
const IN_FLIGHT = 2;

export class RangePool {
  private readonly workers: PoolWorker[] = [];
  private readonly queue: Pending[] = [];
  private nextId = 0;
  private failure: unknown = null;

  constructor(threads: number, script: URL) {
    for (let k = 0; k < threads; k++) {
      const entry: PoolWorker = { worker: new Worker(script, { workerData: { pool: true } }), running: new Map() };
      entry.worker.unref(); // held only while it has work (see dispatch)
      entry.worker.on('message', ({ id, tally }: { id: number; tally: RangeTally }) => {
        const pending = entry.running.get(id);
        entry.running.delete(id);
        pending?.resolve(tally);
        this.dispatch();
      });
      entry.worker.on('error', (error) => this.fail(entry, error));
      entry.worker.on('exit', (code) => {
        if (code !== 0) this.fail(entry, new Error(`a counting thread stopped with status ${code}`));
      });
      this.workers.push(entry);
    }
  }

  /** Counts a job on the first free worker. */
  readonly run: RangeRunner = (job) =>
    new Promise<RangeTally>((resolve, reject) => {
      if (this.failure !== null) return reject(this.failure);
      this.queue.push({ id: this.nextId++, job, resolve, reject });
      this.dispatch();
    });

  private dispatch(): void {
    for (;;) {
      if (this.queue.length === 0) break;
      let target: PoolWorker | null = null;
      for (const entry of this.workers) if (entry.running.size < IN_FLIGHT && (target === null || entry.running.size < target.running.size)) target = entry;
      if (target === null) break;
      const pending = this.queue.shift() as Pending;
      target.running.set(pending.id, pending);
      target.worker.postMessage({ id: pending.id, job: pending.job });
    }
    // A worker with work keeps the process alive; an idle one does not.
    for (const entry of this.workers) {
      if (entry.running.size > 0) entry.worker.ref();
      else entry.worker.unref();
    }
  }

  private fail(entry: PoolWorker, error: unknown): void {
    this.failure ??= error;
    for (const pending of [...entry.running.values(), ...this.queue.splice(0)]) pending.reject(error);
    entry.running.clear();
    entry.worker.unref();
  }

  /** Stops every worker (their jobs are done or no longer wanted). */
  async close(): Promise<void> {
    await Promise.all(this.workers.map((entry) => entry.worker.terminate()));
  }
}
