/**
 * Compensated sums: sums that keep their digits for large n and do not
 * depend on the order of the terms. Each total is carried as an unevaluated
 * pair hi + lo: every addition is error-free (TwoSum, errorFree.ts) and the
 * rounding errors gather in lo, which is cascaded summation (Ogita, Rump &
 * Oishi 2005, "Accurate sum and dot product", SIAM J. Sci. Comput. 26,
 * Algorithm 4.4 "Sum2"; for a list, the same as Neumaier 1974). The result
 * is as accurate as a sum in twice the working precision, rounded once; so
 * the same weights, read in any order or added up by another engine from
 * exact partial sums, give the same double in practice (they could differ
 * only for a total within about n²·2⁻¹⁰⁶ of a rounding boundary).
 */
import { sumError } from './errorFree.js';

/** Adds x to the pair stored at hi[i], lo[i] (arrays of cells, updated in place). */
export function addCompensated(hi: { [k: number]: number }, lo: { [k: number]: number }, i: number, x: number): void {
  const a = hi[i];
  const s = a + x;
  lo[i] += sumError(a, x, s);
  hi[i] = s;
}

/** A running total, carried as hi + lo. */
export class CompensatedSum {
  hi = 0;
  lo = 0;
  add(x: number): void {
    const s = this.hi + x;
    this.lo += sumError(this.hi, x, s);
    this.hi = s;
  }
  /** Adds a value that is itself a pair hi + lo. */
  addPair(hi: number, lo: number): void {
    this.add(hi);
    this.lo += lo;
  }
  get value(): number {
    return this.hi + this.lo;
  }
}

/** The compensated sum of a list of numbers (Sum2; the same result as Neumaier's 1974 algorithm). */
export function compensatedSum(values: Iterable<number>): number {
  const total = new CompensatedSum();
  for (const v of values) total.add(v);
  return total.value;
}

/**
 * An exact sum of integers m_b · 2^(b−52), one per binary exponent bucket b
 * (as the engine returns them, see io/engine/sql.ts: weightedRowsSql), as a pair
 * hi + lo: hi is the correctly rounded sum, lo the rounded remainder.
 */
export function pairFromBuckets(buckets: Iterable<[number, bigint]>): [number, number] {
  let minExponent = Infinity;
  const items = [...buckets].filter(([, m]) => m !== 0n);
  if (items.length === 0) return [0, 0];
  for (const [b] of items) minExponent = Math.min(minExponent, b);
  let total = 0n;
  for (const [b, m] of items) total += m << BigInt(b - minExponent);
  // total · 2^(minExponent − 52), exactly. A total too long for a double is
  // cut to 200 bits plus a sticky bit, which rounds to nearest the same way.
  let exponent = minExponent - 52;
  const length = total.toString(2).length;
  if (length > 1000) {
    const cut = BigInt(length - 200);
    const sticky = (total & ((1n << cut) - 1n)) !== 0n ? 1n : 0n;
    total = ((total >> cut) << 1n) | sticky;
    exponent += Number(cut) - 1;
  }
  const hiScaled = Number(total);
  const rest = Number(total - BigInt(hiScaled));
  return [scaleByPowerOfTwo(hiScaled, exponent), scaleByPowerOfTwo(rest, exponent)];
}

function scaleByPowerOfTwo(x: number, e: number): number {
  let y = x;
  let k = e;
  while (k > 1000) {
    y *= 2 ** 1000;
    k -= 1000;
  }
  while (k < -1000) {
    y *= 2 ** -1000;
    k += 1000;
  }
  return y * 2 ** k;
}
