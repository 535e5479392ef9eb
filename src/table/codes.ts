/**
 * Arrays of codes, a code per row: one byte while a column has at most 255
 * levels, two up to 65,535, else four; and an array of them that grows as
 * rows arrive (the built-in reader's scan, and the ranges of a file read by
 * worker threads, io/rangeCount.ts).
 */

/** A code per row: one byte while a column has at most 255 levels, two up to 65,535, else four. */
export type Codes = Uint8Array | Uint16Array | Uint32Array;

/** The largest code each kind of array holds. */
export function largestCode(codes: Codes): number {
  return codes instanceof Uint8Array ? 0xff : codes instanceof Uint16Array ? 0xffff : 0xffffffff;
}

/** An array of `length` codes wide enough for codes up to `largest`; with `shared`, on memory that worker threads can read too (SharedArrayBuffer). */
export function codesFor(largest: number, length: number, shared = false): Codes {
  const bytes = largest <= 0xff ? 1 : largest <= 0xffff ? 2 : 4;
  const buffer = shared ? new SharedArrayBuffer(length * bytes) : new ArrayBuffer(length * bytes);
  return bytes === 1 ? new Uint8Array(buffer) : bytes === 2 ? new Uint16Array(buffer) : new Uint32Array(buffer);
}

/** Growth of the arrays past their reserved size. */
const GROWTH = 1.25;

/**
 * The codes of one column as rows arrive: one byte a row while the codes
 * fit in 255, widened once to two bytes (four past 65,535) when a larger
 * code arrives. Unwritten rows stay 0 (missing). They are kept on shared
 * memory, so that a worker thread can count pairs from them without a copy
 * (io/pairWorkers.ts).
 */
export class GrowingCodes {
  codes: Codes;
  private capacity: number;
  private largest: number;
  constructor(capacity: number) {
    this.codes = codesFor(0, capacity, true);
    this.capacity = capacity;
    this.largest = 0xff;
  }
  set(row: number, code: number): void {
    if (row >= this.capacity || code > this.largest) this.remake(Math.max(row + 1, row >= this.capacity ? Math.ceil(this.capacity * GROWTH) : this.capacity), code);
    this.codes[row] = code;
  }
  /** Room for `rows` rows at once (an estimate of the rows to come). */
  reserve(rows: number): void {
    if (rows > this.capacity) this.remake(rows, 0);
  }
  private remake(capacity: number, code: number): void {
    const next = codesFor(Math.max(code, this.largest), capacity, true);
    next.set(this.codes);
    this.codes = next;
    this.capacity = capacity;
    this.largest = largestCode(next);
  }
  take(rows: number): Codes {
    this.reserve(rows);
    return this.codes.subarray(0, rows);
  }
}
