/**
 * HyperLogLog: the number of distinct values of a stream in fixed memory
 * (Flajolet, Fusy, Gandouet & Meunier 2007, "HyperLogLog: the analysis of a
 * near-optimal cardinality estimation algorithm", AofA 2007, Figure 3).
 *
 * Each value is hashed to 32 bits; the first p bits choose one of m = 2^p
 * registers, which keeps the largest rank ρ (position of the first 1-bit)
 * seen among the remaining 32 − p bits. The estimate is
 *   E = α_m m² / Σ_j 2^(−M_j),   α_m = 0.7213 / (1 + 1.079/m),
 * with the paper's corrections: for E ≤ 5m/2 with empty registers V > 0,
 * linear counting m ln(m/V); for E > 2^32/30, −2^32 ln(1 − E/2^32).
 * The relative standard error is about 1.04/√m: 1.6% with the default
 * m = 4,096 (4 KB per column).
 *
 * @example
 * const sketch = new DistinctSketch();
 * for (let i = 0; i < 100000; i++) sketch.add(`id-${i}`);
 * sketch.estimate(); // ≈ 100,000 (within a few per cent)
 */
export class DistinctSketch {
  private readonly registers: Uint8Array;
  private readonly p: number;

  constructor(precision = 12) {
    this.p = precision;
    this.registers = new Uint8Array(1 << precision);
  }

  /** Adds a value (a string, hashed as its UTF-16 code units). */
  add(value: string): void {
    this.addHash(hashString(value));
  }

  /** Adds a value by its 32-bit hash. */
  addHash(hash: number): void {
    const index = hash >>> (32 - this.p);
    const rest = (hash << this.p) >>> 0;
    // ρ: the position of the first 1-bit in the remaining 32 − p bits (32 − p + 1 when all are 0).
    const rank = rest === 0 ? 32 - this.p + 1 : Math.clz32(rest) + 1;
    if (rank > this.registers[index]) this.registers[index] = rank;
  }

  estimate(): number {
    const m = this.registers.length;
    let sum = 0;
    let zeros = 0;
    for (let j = 0; j < m; j++) {
      sum += 2 ** -this.registers[j];
      if (this.registers[j] === 0) zeros++;
    }
    const alpha = 0.7213 / (1 + 1.079 / m);
    const raw = (alpha * m * m) / sum;
    if (raw <= 2.5 * m) return zeros > 0 ? m * Math.log(m / zeros) : raw;
    const two32 = 2 ** 32;
    if (raw > two32 / 30) return -two32 * Math.log(1 - raw / two32);
    return raw;
  }
}

/**
 * A 32-bit hash of a string: FNV-1a (Fowler–Noll–Vo) over its UTF-16 code
 * units, then the MurmurHash3 finalizer (fmix32, Appleby) so that every
 * output bit depends on every input bit, as HyperLogLog's registers need.
 */
export function hashString(value: string): number {
  let h = 0x811c9dc5;
  for (let i = 0; i < value.length; i++) h = Math.imul(h ^ value.charCodeAt(i), 0x01000193);
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  h = Math.imul(h, 0xc2b2ae35);
  h ^= h >>> 16;
  return h >>> 0;
}
