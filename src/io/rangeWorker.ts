/**
 * The worker thread of io/parallelCount.ts and io/rangePool.ts: counts one
 * range of a file (io/rangeCount.ts) and posts the tally back; in a pool,
 * counts every job it is sent until it is stopped; in a queue, takes the
 * pieces of one file in turn with the other threads and posts its tallies
 * once, when none is left. A scan's range (kind 'encode') is read into ids
 * per row instead (io/readRecords.ts), and the same thread may then count
 * some of the scan's pairs (io/pairWorkers.ts).
 */
import { parentPort, workerData } from 'node:worker_threads';
import { gridOf, PairsJob } from './pairWorkers.js';
import { countQueue, countRange, encodeRange, EncodeJob, RangeCodes, RangeJob, RangeTally } from './rangeCount.js';

const transfers = (tally: RangeTally) => [tally.keys.buffer, tally.counts.buffer] as ArrayBuffer[];
// Codes on shared memory are shared, not moved.
const codeTransfers = (read: RangeCodes) => [...new Set([...read.codes.map((c) => c.buffer), read.lines.buffer])].filter((b): b is ArrayBuffer => b instanceof ArrayBuffer);

const mode = workerData as { pool?: boolean; queue?: boolean } | null;
if (mode?.pool === true) {
  parentPort?.on('message', ({ id, job }: { id: number; job: RangeJob }) => {
    const tally = countRange(job);
    parentPort?.postMessage({ id, tally }, transfers(tally));
  });
} else if ((workerData as { encode?: boolean } | null)?.encode === true) {
  // Started ahead of its range (io/parallelCount.ts, rangeReaders): reads the one range it is sent.
  parentPort?.once('message', (job: EncodeJob) => {
    const read = encodeRange(job);
    parentPort?.postMessage(read, codeTransfers(read));
    // Then, when the scan asks, it counts some of the pairs (io/pairWorkers.ts).
    parentPort?.once('message', (pairs: PairsJob) => {
      const grids = Array.from({ length: pairs.pairs.length / 2 }, (_v, k) => gridOf(pairs, k));
      parentPort?.postMessage(grids, grids.map((g) => g.buffer as ArrayBuffer));
    });
  });
} else if (mode?.queue === true) {
  parentPort?.once('message', ({ jobs, next }: { jobs: RangeJob[]; next: Int32Array }) => {
    const counted = countQueue(jobs, next);
    parentPort?.postMessage(counted, counted.flatMap(([, tally]) => transfers(tally)));
  });
} else {
  const tally = countRange(workerData as RangeJob);
  parentPort?.postMessage(tally, transfers(tally));
}
