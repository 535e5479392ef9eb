/**
 * A seeded pseudo-random generator, so that simulated p-values repeat.
 * xoshiro128** (Blackman & Vigna 2018, "Scrambled linear pseudorandom number
 * generators"), seeded through splitmix32 so that any integer seed gives a
 * well-mixed state.
 */
export class SeededRandom {
  private s0: number;
  private s1: number;
  private s2: number;
  private s3: number;

  constructor(seed: number) {
    let x = seed >>> 0;
    const next = () => {
      x = (x + 0x9e3779b9) >>> 0;
      let z = x;
      z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
      z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
      return (z ^ (z >>> 16)) >>> 0;
    };
    this.s0 = next();
    this.s1 = next();
    this.s2 = next();
    this.s3 = next();
  }

  /**
   * A generator started from the four 32-bit words of xoshiro128**'s state
   * directly (not all zero), for the published known-answer sequences.
   */
  static fromState(s0: number, s1: number, s2: number, s3: number): SeededRandom {
    if ((s0 | s1 | s2 | s3) === 0) throw new Error('xoshiro128** state must not be all zero');
    const generator = new SeededRandom(0);
    generator.s0 = s0 >>> 0;
    generator.s1 = s1 >>> 0;
    generator.s2 = s2 >>> 0;
    generator.s3 = s3 >>> 0;
    return generator;
  }

  /** The state words, for tests. */
  state(): [number, number, number, number] {
    return [this.s0 >>> 0, this.s1 >>> 0, this.s2 >>> 0, this.s3 >>> 0];
  }

  /** A uniform 32-bit unsigned integer. */
  nextUint32(): number {
    const result = Math.imul(rotl(Math.imul(this.s1, 5), 7), 9) >>> 0;
    const t = this.s1 << 9;
    this.s2 ^= this.s0;
    this.s3 ^= this.s1;
    this.s1 ^= this.s2;
    this.s0 ^= this.s3;
    this.s2 ^= t;
    this.s3 = rotl(this.s3, 11);
    return result;
  }

  /** A uniform double in [0, 1) with 53 random bits. */
  nextDouble(): number {
    const high = this.nextUint32() >>> 5; // 27 bits
    const low = this.nextUint32() >>> 6; // 26 bits
    return (high * 67108864 + low) / 9007199254740992;
  }
}

function rotl(x: number, k: number): number {
  return ((x << k) | (x >>> (32 - k))) >>> 0;
}
