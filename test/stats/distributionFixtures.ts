import { readReferenceFixture } from '../helpers.js';

/** fixtures/reference/f-t-distributions.json, recorded by scripts/record_f_t_distributions.py (mpmath, 80 digits). */
export interface DistributionReference {
  recordedWith: Record<string, string | number>;
  beta: { a: number; b: number; x: number; lower: number; upper: number }[];
  f: { f: number; df1: number; df2: number; upper: number; lower: number }[];
  t: { t: number; df: number; upper: number; upperOfNegative: number }[];
  fQuantiles: { q: number; df1: number; df2: number; f: number | null }[];
  tQuantiles: { q: number; df: number; t: number | null }[];
  betaQuantiles: { side: 'lower' | 'upper'; p: number; a: number; b: number; x: number; oneMinusX: number }[];
}

export const distributions = readReferenceFixture<DistributionReference>('f-t-distributions.json');

/** Relative error, and the worst one over a list of (actual, expected) pairs with expected above 1e-305. */
export function worstRelativeError(pairs: [number, number][]): number {
  let worst = 0;
  for (const [actual, expected] of pairs) {
    if (!(expected > 1e-305)) continue;
    const error = Math.abs(actual - expected) / expected;
    worst = Math.max(worst, Number.isNaN(error) ? Infinity : error);
  }
  return worst;
}
