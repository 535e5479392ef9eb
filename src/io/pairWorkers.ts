/**
 * A scan's pairs counted on two threads: a worker thread that read a range
 * of the file (io/readRecords.ts, RecordSplit) stays for the pairs and
 * counts every other pair's grid (table/pairGrid.ts) from the same codes,
 * shared with it (SharedArrayBuffer: io/rangeCount.ts and
 * io/encodeColumns.ts keep the codes there), while this thread counts the
 * rest. Only unweighted pairs without a layer or a design, whose table is
 * its grid; the tables are then made from the grids as one thread makes them.
 */
import type { Worker } from 'node:worker_threads';
import type { Codes } from '../table/codes.js';
import { countGrid } from '../table/pairGrid.js';
import type { OrderedColumn } from '../table/orderedColumn.js';

/** What a worker is sent: the columns' codes, each column's grid width (levels + 1), and the pairs it counts (column indexes, two a pair). */
export interface PairsJob {
  kind: 'pairs';
  columns: Codes[];
  widths: number[];
  pairs: Int32Array;
}

/** Cells of every pair's grid held at once, at most (past it the pairs are counted one at a time, on one thread). */
const GRID_CELLS_LIMIT = 1 << 23;

/** Counts one pair's grid, as the worker does for each pair it is sent. */
export function gridOf(job: PairsJob, k: number): Uint32Array {
  const a = job.pairs[2 * k];
  const b = job.pairs[2 * k + 1];
  return countGrid(job.columns[a], job.columns[b], job.widths[b], job.widths[a] * job.widths[b]);
}

/** The codes as the worker can read them without a copy: on shared memory (copied there once when they are not). */
function shared(codes: Codes): Codes {
  if (codes.buffer instanceof SharedArrayBuffer) return codes;
  const copy = new (codes.constructor as new (buffer: SharedArrayBuffer) => Codes)(new SharedArrayBuffer(codes.byteLength));
  copy.set(codes);
  return copy;
}

/**
 * The grids of every pair of `columns` (a before b, in report order), half
 * counted by the worker; null when the grids would take too much memory at
 * once (the caller counts pair by pair). Keyed by the two columns.
 */
export async function countGridsOnTwoThreads(columns: readonly OrderedColumn[], worker: Worker): Promise<Map<OrderedColumn, Map<OrderedColumn, Uint32Array>> | null> {
  const widths = columns.map((c) => c.labels.length + 1);
  let cells = 0;
  for (let a = 0; a < columns.length; a++) for (let b = a + 1; b < columns.length; b++) cells += widths[a] * widths[b];
  if (cells > GRID_CELLS_LIMIT) return null;
  const codes = columns.map((c) => shared(c.codes));
  const mine: number[] = [];
  const theirs: number[] = [];
  let k = 0;
  for (let a = 0; a < columns.length; a++) for (let b = a + 1; b < columns.length; b++) (k++ % 2 === 0 ? mine : theirs).push(a, b);
  const job = (pairs: number[]): PairsJob => ({ kind: 'pairs', columns: codes, widths, pairs: Int32Array.from(pairs) });
  const sent = job(theirs);
  const answer = new Promise<Uint32Array[]>((resolve, reject) => {
    worker.once('message', resolve);
    worker.once('error', reject);
  });
  worker.ref();
  worker.postMessage(sent);
  const grids = new Map<OrderedColumn, Map<OrderedColumn, Uint32Array>>();
  const keep = (pairs: Int32Array, p: number, grid: Uint32Array) => {
    const a = columns[pairs[2 * p]];
    if (!grids.has(a)) grids.set(a, new Map());
    grids.get(a)!.set(columns[pairs[2 * p + 1]], grid);
  };
  const own = job(mine);
  for (let p = 0; p < own.pairs.length / 2; p++) keep(own.pairs, p, gridOf(own, p));
  const counted = await answer;
  counted.forEach((grid, p) => keep(sent.pairs, p, grid));
  return grids;
}
