/**
 * Error-free transformations for sums and products of doubles (Dekker 1971,
 * "A floating-point technique for extending the available precision",
 * Numer. Math. 18, 224–242; Knuth, TAOCP vol. 2, §4.2.2). They let the
 * deviation n·n_ij − n_i.·n_.j be formed exactly enough that tables with
 * counts near 10^12, or close to independence, keep their digits.
 */

/** a + b = s + e exactly (Knuth's TwoSum). */
export function twoSum(a: number, b: number): [number, number] {
  const s = a + b;
  const bb = s - a;
  const e = a - (s - bb) + (b - bb);
  return [s, e];
}

const SPLITTER = 134217729; // 2^27 + 1

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
