/**
 * Turns a column's field bytes into small integer ids without making a
 * string per field: the trimmed bytes are hashed (FNV-1a, Fowler–Noll–Vo)
 * into an open-addressing table, and only a value never seen before is
 * decoded, trimmed and checked against the missing tokens. Id 0 is
 * "missing"; ids 1, 2, 3, … are the distinct labels in order of first
 * appearance. Past `limit` distinct labels new values get the id −1, so an
 * identifier column cannot exhaust memory.
 */
export const MISSING_ID = 0;
const CACHE_MASK = 255;
export const OVERFLOW_ID = -1;

export class FieldInterner {
  /** labels[id − 1] is the label of id. */
  readonly labels: string[] = [];
  private readonly labelIds = new Map<string, number>();
  private keys = new Uint8Array(1 << 12);
  private keysUsed = 0;
  private slotStart = new Int32Array(1 << 10);
  private slotLength = new Int32Array(1 << 10);
  private slotId = new Int32Array(1 << 10);
  private slotHash = new Int32Array(1 << 10);
  private slotCount = 0;
  private mask = (1 << 10) - 1;
  /** The table slot last found for each cache key (−1: none). */
  private readonly cacheSlot = new Int32Array(CACHE_MASK + 1).fill(-1);
  /** Distinct labels refused past the limit (a lower bound on how many more there are). */
  overflowed = 0;

  constructor(
    private readonly missing: ReadonlySet<string>,
    private readonly limit: number,
    /** Receives each value refused past the limit (every time it occurs), for a caller that still wants to see it. */
    private readonly onOverflow?: (label: string) => void,
  ) {
    this.slotId.fill(-2);
  }

  private labelId(raw: string): number {
    const label = raw.trim();
    if (label === '' || this.missing.has(label)) return MISSING_ID;
    const known = this.labelIds.get(label);
    if (known !== undefined) return known;
    if (this.labels.length >= this.limit) {
      this.overflowed++;
      this.onOverflow?.(label);
      return OVERFLOW_ID;
    }
    this.labels.push(label);
    this.labelIds.set(label, this.labels.length);
    return this.labels.length;
  }

  /** Id of an already-decoded value (used for quoted fields with doubled quotes). */
  internString(value: string): number {
    return this.labelId(value);
  }

  /**
   * Id of the field bytes buf[start, end), decoded only when new. This part,
   * small enough for the compiler to inline into the reader's loop, finds a
   * value in the cache; the rest is in `lookUp`.
   */
  intern(buf: Uint8Array, view: Buffer, start: number, end: number): number {
    while (start < end && (buf[start] === 0x20 || buf[start] === 0x09)) start++;
    while (end > start && (buf[end - 1] === 0x20 || buf[end - 1] === 0x09)) end--;
    if (start === end) return MISSING_ID;
    const length = end - start;
    // A small cache keyed by length and the first and last bytes: a column of
    // few levels finds its value here with one comparison, without hashing.
    const probe = (length * 0x9e5 + buf[start] * 0x3b + buf[end - 1]) & CACHE_MASK;
    const cached = this.cacheSlot[probe];
    if (cached >= 0 && this.slotLength[cached] === length) {
      const at = this.slotStart[cached] - start;
      const keys = this.keys;
      let i = start;
      while (i < end && keys[at + i] === buf[i]) i++;
      if (i === end) return this.slotId[cached];
    }
    return this.lookUp(buf, view, start, end, probe);
  }

  /** The trimmed, non-empty value buf[start, end) not found in the cache: hashed into the table, and decoded when new. */
  private lookUp(buf: Uint8Array, view: Buffer, start: number, end: number, probe: number): number {
    const length = end - start;
    let hash = 0x811c9dc5;
    for (let i = start; i < end; i++) hash = Math.imul(hash ^ buf[i], 0x01000193);
    let slot = hash & this.mask;
    for (;;) {
      const id = this.slotId[slot];
      if (id === -2) break;
      if (this.slotHash[slot] === hash && this.slotLength[slot] === length) {
        const at = this.slotStart[slot];
        let same = true;
        for (let i = 0; i < length; i++) {
          if (this.keys[at + i] !== buf[start + i]) {
            same = false;
            break;
          }
        }
        if (same) {
          this.cacheSlot[probe] = slot;
          return id;
        }
      }
      slot = (slot + 1) & this.mask;
    }
    const id = this.labelId(view.toString('utf8', start, end));
    if (id === OVERFLOW_ID) return id; // not remembered: memory stays bounded
    this.remember(slot, hash, buf, start, length, id);
    return id;
  }

  private remember(slot: number, hash: number, buf: Uint8Array, start: number, length: number, id: number): void {
    if (this.keysUsed + length > this.keys.length) {
      const grown = new Uint8Array(Math.max(this.keys.length * 2, this.keysUsed + length));
      grown.set(this.keys.subarray(0, this.keysUsed));
      this.keys = grown;
    }
    this.keys.set(buf.subarray(start, start + length), this.keysUsed);
    this.slotStart[slot] = this.keysUsed;
    this.slotLength[slot] = length;
    this.slotHash[slot] = hash;
    this.slotId[slot] = id;
    this.keysUsed += length;
    this.slotCount++;
    if (this.slotCount * 2 > this.mask) this.rehash();
  }

  private rehash(): void {
    this.cacheSlot.fill(-1); // table slots move
    const size = (this.mask + 1) * 2;
    const start = this.slotStart;
    const length = this.slotLength;
    const ids = this.slotId;
    const hashes = this.slotHash;
    this.slotStart = new Int32Array(size);
    this.slotLength = new Int32Array(size);
    this.slotId = new Int32Array(size).fill(-2);
    this.slotHash = new Int32Array(size);
    this.mask = size - 1;
    for (let s = 0; s < ids.length; s++) {
      if (ids[s] === -2) continue;
      let slot = hashes[s] & this.mask;
      while (this.slotId[slot] !== -2) slot = (slot + 1) & this.mask;
      this.slotStart[slot] = start[s];
      this.slotLength[slot] = length[s];
      this.slotHash[slot] = hashes[s];
      this.slotId[slot] = ids[s];
    }
  }
}
