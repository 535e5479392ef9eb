/** The worker thread of io/parallelCount.ts: counts one range of a file (io/rangeCount.ts) and posts the tally back. */
import { parentPort, workerData } from 'node:worker_threads';
import { countRange, RangeJob } from './rangeCount.js';

const tally = countRange(workerData as RangeJob);
parentPort?.postMessage(tally, [tally.keys.buffer, tally.counts.buffer] as ArrayBuffer[]);
