// Error-free transformations (src/numerics/errorFree.ts): a + b = s + e and
// a·b = p + e hold exactly (Knuth, TAOCP vol. 2, §4.2.2; Dekker 1971). The
// reference is exact integer arithmetic: the doubles are drawn as integers
// times a power of two, so that scaled by a fixed power of two every side is
// an exact BigInt (ECMA-262: Number → BigInt of an integer is exact).
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { twoProduct, twoSum } from '../../src/numerics/errorFree.js';

/** A double m · 2^−k with |m| < 2^53 and 0 ≤ k ≤ 40: an exact multiple of 2^−40. */
const double = fc.tuple(fc.bigInt({ min: -(2n ** 53n) + 1n, max: 2n ** 53n - 1n }), fc.integer({ min: 0, max: 40 })).map(([m, k]) => Number(m) * 2 ** -k);

/** x · 2^scale as a BigInt; exact for the doubles drawn here. */
const scaled = (x: number, scale: number) => BigInt(x * 2 ** scale);

describe('error-free transformations', () => {
  it('twoSum: a + b = s + e exactly, s the rounded sum (exact BigInt reference)', () => {
    fc.assert(
      fc.property(double, double, (a, b) => {
        const [s, e] = twoSum(a, b);
        expect(s).toBe(a + b);
        expect(scaled(a, 40) + scaled(b, 40)).toBe(scaled(s, 40) + scaled(e, 40));
      }),
      { numRuns: 1000, seed: 3 },
    );
  });

  it('twoSum of 0.1 and 0.2: the error is exactly −2^−55 (the binary expansions of 0.1, 0.2 and 0.30000000000000004)', () => {
    expect(twoSum(0.1, 0.2)).toEqual([0.30000000000000004, -(2 ** -55)]);
  });

  it('twoProduct: a · b = p + e exactly, p the rounded product (exact BigInt reference)', () => {
    fc.assert(
      fc.property(double, double, (a, b) => {
        const [p, e] = twoProduct(a, b);
        expect(p).toBe(a * b);
        expect(scaled(a, 40) * scaled(b, 40)).toBe(scaled(p, 80) + scaled(e, 80));
      }),
      { numRuns: 1000, seed: 5 },
    );
  });
});
