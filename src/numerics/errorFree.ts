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
