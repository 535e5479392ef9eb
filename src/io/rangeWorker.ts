/**
 * The worker thread of io/parallelCount.ts and io/rangePool.ts: counts one
 * range of a file (io/rangeCount.ts) and posts the tally back; in a pool,
 * counts every job it is sent until it is stopped.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { countRange, RangeJob, RangeTally } from './rangeCount.js';

const transfers = (tally: RangeTally) => [tally.keys.buffer, tally.counts.buffer] as ArrayBuffer[];

if ((workerData as { pool?: boolean } | null)?.pool === true) {
  parentPort?.on('message', ({ id, job }: { id: number; job: RangeJob }) => {
    const tally = countRange(job);
    parentPort?.postMessage({ id, tally }, transfers(tally));
  });
} else {
  const tally = countRange(workerData as RangeJob);
  parentPort?.postMessage(tally, transfers(tally));
}
