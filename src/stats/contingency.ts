/**
 * The basics of a two-way table of counts: margins, expected counts, degrees
 * of freedom, and the deviations from independence formed exactly.
 */
import { compensatedSum } from '../numerics/compensatedSum.js';
import { differenceOfProducts } from '../numerics/errorFree.js';

/** A two-way table of counts: counts[i][j] for row level i and column level j. */
export type CountMatrix = readonly (readonly number[])[];

export interface Margins {
  rowTotals: number[];
  colTotals: number[];
  total: number;
}

/** Row totals n_i., column totals n_.j and the grand total n. */
export function margins(counts: CountMatrix): Margins {
  const r = counts.length;
  const c = r === 0 ? 0 : counts[0].length;
  const rowTotals = counts.map((row) => compensatedSum(row));
  const colTotals: number[] = [];
  for (let j = 0; j < c; j++) colTotals.push(compensatedSum(counts.map((row) => row[j])));
  return { rowTotals, colTotals, total: compensatedSum(rowTotals) };
}

/**
 * Expected counts under independence, E_ij = n_i. n_.j / n
 * (Pearson 1904; Agresti 2013, Categorical Data Analysis, 3rd ed., §3.2.1).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * expectedCounts([[189, 10845], [104, 10933]]) // [[146.48, 10887.52], [146.52, 10890.48]]
 */
export function expectedCounts(counts: CountMatrix): number[][] {
  const { rowTotals, colTotals, total } = margins(counts);
  // n_i. · (n_.j / n): the product n_i. n_.j would overflow for sums near 1e160
  return rowTotals.map((ri) => colTotals.map((cj) => ri * (cj / total)));
}

/** Degrees of freedom of the independence test, (r − 1)(c − 1). */
export function degreesOfFreedom(counts: CountMatrix): number {
  const r = counts.length;
  const c = r === 0 ? 0 : counts[0].length;
  return Math.max(0, (r - 1) * (c - 1));
}

/** True for a table of two rows and two columns. */
export function isTwoByTwo(counts: CountMatrix): boolean {
  return counts.length === 2 && counts[0].length === 2;
}

/** The table with rows and columns exchanged. */
export function transpose(counts: CountMatrix): number[][] {
  const c = counts.length === 0 ? 0 : counts[0].length;
  const out: number[][] = [];
  for (let j = 0; j < c; j++) out.push(counts.map((row) => row[j]));
  return out;
}

/**
 * Each cell's departure from independence, n_ij − E_ij = (n·n_ij − n_i.·n_.j)/n,
 * with the numerator formed by error-free products so that it keeps its
 * digits when the two products nearly cancel (large counts, near
 * independence). Returns the departures and the expected counts.
 */
export function deviationsFromIndependence(counts: CountMatrix): { deviation: number[][]; expected: number[][] } {
  const { rowTotals, colTotals, total } = margins(counts);
  const deviation = counts.map((row, i) => row.map((nij, j) => differenceOfProducts(total, nij, rowTotals[i], colTotals[j]) / total));
  const expected = rowTotals.map((ri) => colTotals.map((cj) => (ri * cj) / total));
  return { deviation, expected };
}
