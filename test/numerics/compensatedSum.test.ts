// Order-free sums of weights (src/numerics/compensatedSum.ts). The reference is
// exact integer arithmetic: weights are drawn as multiples of 2^-60 below
// 2^40, so Σw·2^60 is an exact BigInt, and ECMAScript's BigInt → Number
// conversion is specified to round to nearest, ties to even (ECMA-262,
// §21.1.1.1 Number(value) → "the Number value for ℝ(prim)").
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { shuffle } from '../helpers.js';
import { addCompensated, CompensatedSum, compensatedSum, pairFromBuckets } from '../../src/numerics/compensatedSum.js';

const SCALE = 2n ** 60n;
const weight = fc.tuple(fc.bigInt({ min: 0n, max: 2n ** 100n - 1n }), fc.integer({ min: 0, max: 60 })).map(([m, shift]) => {
  // a double that is an exact multiple of 2^-60 (53 significant bits at most)
  const bits = m.toString(2).length;
  const mantissa = bits > 53 ? m >> BigInt(bits - 53) : m;
  return Number(mantissa) * 2 ** (-shift);
}).filter((w) => w < 2 ** 40);

function exactlyRounded(values: number[]): number {
  let total = 0n;
  for (const w of values) total += BigInt(w * 2 ** 60); // exact: w·2^60 is an integer below 2^100
  return Number(total) / Number(SCALE);
}

describe('compensated sums of weights', () => {
  it('give the correctly rounded sum, whatever the order of the rows (exact BigInt reference)', () => {
    fc.assert(
      fc.property(fc.array(weight, { minLength: 1, maxLength: 300 }), fc.integer(), (values, seed) => {
        const shuffled = shuffle(values, seed);
        const a = new CompensatedSum();
        const b = new CompensatedSum();
        for (const w of values) a.add(w);
        for (const w of shuffled) b.add(w);
        const exact = exactlyRounded(values);
        expect(a.value).toBe(exact);
        // the list sum and the in-place cell sum are the same algorithm
        expect(compensatedSum(shuffled)).toBe(exact);
        const hi = [0];
        const lo = [0];
        for (const w of values) addCompensated(hi, lo, 0, w);
        expect(hi[0] + lo[0]).toBe(exact);
        expect(b.value).toBe(exact);
      }),
      { numRuns: 300, seed: 7 },
    );
  });

  it('where plain left-to-right addition drifts (a case it gets wrong)', () => {
    const values = [1e16, 1, 1, 1, 1, -0, 1];
    let naive = 0;
    for (const w of values) naive += w;
    const c = new CompensatedSum();
    for (const w of values) c.add(w);
    const exact = Number(10_000_000_000_000_005n); // the exact sum, rounded once (ties to even)
    expect(naive).not.toBe(exact);
    expect(c.value).toBe(exact);
  });

  it('turn an engine\'s exact bucket sums (m · 2^(b−52)) into the correctly rounded value', () => {
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: -80, max: 80 }), fc.bigInt({ min: 0n, max: 2n ** 90n })), { minLength: 1, maxLength: 8 }), (buckets) => {
        // reference: everything over the common denominator 2^(52 + 80)
        let total = 0n;
        for (const [b, m] of buckets) total += m << BigInt(b + 80);
        const reference = Number(total) / 2 ** 132;
        const [hi, lo] = pairFromBuckets(buckets);
        expect(hi).toBe(reference);
        expect(Math.abs(lo)).toBeLessThanOrEqual(Math.abs(hi) * 2 ** -52);
      }),
      { numRuns: 300, seed: 11 },
    );
  });
});
