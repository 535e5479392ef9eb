/**
 * Double-double arithmetic: a number carried as hi + lo, about 106
 * significant bits, built on the error-free transformations (errorFree.ts).
 */
import { twoProduct, twoSum } from './errorFree.js';

/**
 * A double-double number hi + lo (|lo| ≤ ½ ulp(hi)): about 106 significant
 * bits, enough to hold n·n_ij − n_i.·n_.j exactly for counts near 10¹² and to
 * accumulate sums of such terms as if in twice the working precision
 * (Ogita, Rump & Oishi 2005, "Accurate sum and dot product", SIAM J. Sci.
 * Comput. 26, 1955–1988, algorithms Sum2 and Dot2).
 */
export interface DoubleDouble {
  hi: number;
  lo: number;
}

export const ddZero: DoubleDouble = { hi: 0, lo: 0 };

export function ddFromNumber(x: number): DoubleDouble {
  return { hi: x, lo: 0 };
}

/** The sum of two double-doubles, renormalised. */
export function ddAdd(a: DoubleDouble, b: DoubleDouble): DoubleDouble {
  const [s, e] = twoSum(a.hi, b.hi);
  const [hi, lo] = twoSum(s, e + a.lo + b.lo);
  return { hi, lo };
}

export function ddNegate(a: DoubleDouble): DoubleDouble {
  return { hi: -a.hi, lo: -a.lo };
}

export function ddSubtract(a: DoubleDouble, b: DoubleDouble): DoubleDouble {
  return ddAdd(a, ddNegate(b));
}

/** The exact product of two doubles, as a double-double. */
export function ddProduct(a: number, b: number): DoubleDouble {
  const [hi, lo] = twoProduct(a, b);
  return { hi, lo };
}

/** A double-double times a double (Dekker's product for the high part, the low part plainly). */
export function ddScale(a: DoubleDouble, x: number): DoubleDouble {
  const [p, e] = twoProduct(a.hi, x);
  const [hi, lo] = twoSum(p, e + a.lo * x);
  return { hi, lo };
}

/** The product of two double-doubles, to about 2^-104 relative (Dekker 1971, mul2). */
export function ddMultiply(a: DoubleDouble, b: DoubleDouble): DoubleDouble {
  const [p, e] = twoProduct(a.hi, b.hi);
  const [hi, lo] = twoSum(p, e + (a.hi * b.lo + a.lo * b.hi));
  return { hi, lo };
}

/** A double-double divided by a double, to about 2^-104 relative (one correction step of the quotient). */
export function ddDivide(a: DoubleDouble, x: number): DoubleDouble {
  const q1 = a.hi / x;
  const [p, e] = twoProduct(q1, x);
  const q2 = (a.hi - p - e + a.lo) / x;
  const [hi, lo] = twoSum(q1, q2);
  return { hi, lo };
}

/** The nearest double. */
export function ddValue(a: DoubleDouble): number {
  return a.hi + a.lo;
}

/**
 * Each value's complement in the sum, Σ_{k≠i} v_k, summed from the other
 * values (so 1 − v_i/n keeps its digits when v_i is nearly all of n).
 */
export function complementsInSum(values: readonly number[]): number[] {
  return values.map((_v, i) => {
    let s = ddZero;
    values.forEach((w, k) => {
      if (k !== i) s = ddAdd(s, ddFromNumber(w));
    });
    return ddValue(s);
  });
}
