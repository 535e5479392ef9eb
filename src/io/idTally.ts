/**
 * Rows tallied by their combination of value ids: the built-in reader's
 * counterpart of the engine's GROUP BY. An unweighted table is counted by
 * adding each distinct combination once, with its number of rows, instead
 * of adding every row; the worker threads of a large file hand their
 * tallies back in this form (io/parallelCount.ts).
 */

/** Distinct combinations of `width` value ids with the number of rows of each, in order of first appearance. */
export class IdTally {
  /** keys[e·width + k] is slot k's id of entry e. */
  private keys: Int32Array;
  private counts: Float64Array;
  /** Open addressing: entry index + 1, or 0 for an empty slot. */
  private table: Int32Array;
  private mask: number;
  /**
   * A combination whose ids are all below `1 << denseBits` (of one, two or
   * three slots: the few levels of most tables) is found by its ids alone:
   * dense[ids laid side by side as bits] is its entry index + 1 (0: none
   * yet). Others are hashed into `table`. A combination always takes the
   * same way, so no entry is held twice.
   */
  private readonly dense: Int32Array | null;
  private readonly denseBits: number;
  /** Distinct combinations held. */
  size = 0;

  constructor(readonly width: number) {
    this.keys = new Int32Array(64 * width);
    this.counts = new Float64Array(64);
    this.table = new Int32Array(256);
    this.mask = 255;
    this.denseBits = width === 1 ? 12 : width === 2 ? 6 : width === 3 ? 5 : 0;
    this.dense = this.denseBits > 0 ? new Int32Array(1 << (this.denseBits * width)) : null;
  }

  /** Adds `rows` rows of the combination ids[0, width). */
  add(ids: Int32Array, rows = 1): void {
    const width = this.width;
    const dense = this.dense;
    if (dense !== null) {
      const bits = this.denseBits;
      let key = 0;
      let all = 0;
      for (let k = 0; k < width; k++) {
        const id = ids[k];
        all |= id;
        key = (key << bits) | id;
      }
      // A negative id (past an interner's limit) sets the sign bit of `all`.
      if (all >>> 0 < 1 << bits) {
        const at = dense[key];
        if (at !== 0) {
          this.counts[at - 1] += rows;
          return;
        }
        dense[key] = this.append(ids, rows) + 1;
        return;
      }
    }
    const keys = this.keys;
    let hash = 0x811c9dc5;
    for (let k = 0; k < width; k++) hash = Math.imul(hash ^ ids[k], 0x01000193);
    hash ^= hash >>> 15;
    let slot = hash & this.mask;
    for (;;) {
      const at = this.table[slot];
      if (at === 0) break;
      const base = (at - 1) * width;
      let same = true;
      for (let k = 0; k < width; k++) {
        if (keys[base + k] !== ids[k]) {
          same = false;
          break;
        }
      }
      if (same) {
        this.counts[at - 1] += rows;
        return;
      }
      slot = (slot + 1) & this.mask;
    }
    this.insert(slot, ids, rows);
  }

  /** A new entry at the end (arrays grown as needed); returns its index. */
  private append(ids: Int32Array, rows: number): number {
    const entry = this.size++;
    if (entry >= this.counts.length) {
      const keys = new Int32Array(this.keys.length * 2);
      keys.set(this.keys);
      this.keys = keys;
      const counts = new Float64Array(this.counts.length * 2);
      counts.set(this.counts);
      this.counts = counts;
    }
    for (let k = 0; k < this.width; k++) this.keys[entry * this.width + k] = ids[k];
    this.counts[entry] = rows;
    return entry;
  }

  private insert(slot: number, ids: Int32Array, rows: number): void {
    this.table[slot] = this.append(ids, rows) + 1;
    if (this.size * 2 > this.mask) this.rehash();
  }

  /** Whether entry e is found through the dense index. */
  private isDense(e: number): boolean {
    if (this.dense === null) return false;
    let all = 0;
    for (let k = 0; k < this.width; k++) all |= this.keys[e * this.width + k];
    return all >>> 0 < 1 << this.denseBits;
  }

  private rehash(): void {
    const size = (this.mask + 1) * 2;
    this.table = new Int32Array(size);
    this.mask = size - 1;
    const width = this.width;
    for (let e = 0; e < this.size; e++) {
      if (this.isDense(e)) continue;
      let hash = 0x811c9dc5;
      for (let k = 0; k < width; k++) hash = Math.imul(hash ^ this.keys[e * width + k], 0x01000193);
      hash ^= hash >>> 15;
      let slot = hash & this.mask;
      while (this.table[slot] !== 0) slot = (slot + 1) & this.mask;
      this.table[slot] = e + 1;
    }
  }

  /** Forgets every entry (the arrays are kept for reuse). */
  clear(): void {
    this.table.fill(0);
    this.dense?.fill(0);
    this.size = 0;
  }

  /** Each combination (a reused array) with its rows, in order of first appearance. */
  forEach(visit: (ids: Int32Array, rows: number) => void): void {
    const ids = new Int32Array(this.width);
    for (let e = 0; e < this.size; e++) {
      for (let k = 0; k < this.width; k++) ids[k] = this.keys[e * this.width + k];
      visit(ids, this.counts[e]);
    }
  }

  /** The entries as plain arrays (ids laid end to end, and rows), for a transfer between threads. */
  entries(): { keys: Int32Array; counts: Float64Array } {
    return { keys: this.keys.slice(0, this.size * this.width), counts: this.counts.slice(0, this.size) };
  }
}
