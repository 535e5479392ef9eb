/**
 * The counts of two coded columns on their padded grid (code 0, missing,
 * in row 0 and column 0): the innermost loop of a pair's table
 * (table/countPair.ts), kept apart so that a worker thread can count some
 * of a scan's pairs (io/pairWorkers.ts) without loading the rest.
 */
import type { Codes } from './codes.js';

/**
 * cell (i, j) of the (height × width) grid, at i·width + j, counts the rows
 * with code i in `a` and j in `b`; `width` is b's levels + 1.
 */
export function countGrid(a: Codes, b: Codes, width: number, plane: number): Uint32Array {
  const rows = a.length;
  const counts = new Uint32Array(plane);
  // Four interleaved grids, added up afterwards, so that runs of rows that
  // hit the same cell do not wait on each other's increments.
  const lanes = new Uint32Array(4 * plane);
  const end = rows - 3;
  let k = 0;
  for (; k < end; k += 4) {
    lanes[a[k] * width + b[k]]++;
    lanes[plane + a[k + 1] * width + b[k + 1]]++;
    lanes[2 * plane + a[k + 2] * width + b[k + 2]]++;
    lanes[3 * plane + a[k + 3] * width + b[k + 3]]++;
  }
  for (; k < rows; k++) lanes[a[k] * width + b[k]]++;
  for (let i = 0; i < plane; i++) counts[i] = lanes[i] + lanes[plane + i] + lanes[2 * plane + i] + lanes[3 * plane + i];
  return counts;
}
