/**
 * Error-free transformations of doubles: a sum or a product as the rounded
 * result plus its exact rounding error (Dekker 1971, "A floating-point
 * technique for extending the available precision", Numer. Math. 18,
 * 224–242; Knuth, TAOCP vol. 2, §4.2.2). The compensated sums
 * (compensatedSum.ts) and the exact deviations of the chi-square tests
 * (stats/contingency.ts) are built on them.
 */

/**
 * The rounding error of s = fl(a + b): a + b = s + e exactly (Knuth's TwoSum,
 * no branch and no condition on |a|, |b|), barring overflow.
 */
export function sumError(a: number, b: number, s: number): number {
  const bb = s - a;
  return a - (s - bb) + (b - bb);
}

/** a + b = s + e exactly (Knuth's TwoSum). */
export function twoSum(a: number, b: number): [number, number] {
  const s = a + b;
  return [s, sumError(a, b, s)];
}

const SPLITTER = 134217729; // 2^27 + 1

/** Veltkamp's split: a = hi + lo, each with at most 26 significant bits. */
function split(a: number): [number, number] {
  const c = SPLITTER * a;
  const hi = c - (c - a);
  return [hi, a - hi];
}

/** a · b = p + e exactly (Dekker's TwoProduct with Veltkamp splitting), barring overflow. */
export function twoProduct(a: number, b: number): [number, number] {
  const p = a * b;
  const [ah, al] = split(a);
  const [bh, bl] = split(b);
  const e = ah * bh - p + ah * bl + al * bh + al * bl;
  return [p, e];
}

/** a·b − c·d, correctly rounded up to a few units in the last place even under cancellation. */
export function differenceOfProducts(a: number, b: number, c: number, d: number): number {
  const [p, pe] = twoProduct(a, b);
  const [q, qe] = twoProduct(c, d);
  const [s, se] = twoSum(p, -q);
  return s + (se + (pe - qe));
}

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
