import { describe, expect, it } from 'vitest';
import { lowerTailChiSquare, upperTailChiSquare } from '../../src/stats/chiSquareDistribution.js';
import { logGamma, regularizedGammaUpper } from '../../src/stats/gamma.js';
import { edges, expectClose, reference } from '../helpers.js';

describe('upper tail of the chi-square distribution', () => {
  it(`agrees with mpmath (40 digits) to 1e-10 relative on ${reference.chi2Sf.length} points, df 1 to 100000, p down to 1e-300`, () => {
    let worst = 0;
    for (const point of reference.chi2Sf) {
      const p = upperTailChiSquare(point.x, point.df);
      const error = Math.abs(p - point.mpmath) / point.mpmath;
      worst = Math.max(worst, error);
      expectClose(p, point.mpmath, 1e-10);
    }
    expect(worst).toBeLessThan(1e-10);
  });

  it('agrees with scipy.stats.chi2.sf (recorded fixture) to 1e-10 where scipy itself is within 1e-12 of mpmath', () => {
    for (const point of reference.chi2Sf) {
      if (Math.abs(point.scipy - point.mpmath) / point.mpmath > 1e-12) continue;
      expectClose(upperTailChiSquare(point.x, point.df), point.scipy, 1e-10);
    }
  });

  it('reaches p-values below 1e-300 without forming 1 − cdf (fixture includes targets 1e-300)', () => {
    const deep = reference.chi2Sf.filter((p) => p.mpmath < 1e-250);
    expect(deep.length).toBeGreaterThan(10);
    for (const point of deep) expect(upperTailChiSquare(point.x, point.df)).toBeGreaterThan(0);
  });

  it('has the textbook critical values: P(χ²₁ ≥ 3.841459) = 0.05, P(χ²₁₀ ≥ 18.307038) = 0.05 (Abramowitz & Stegun table 26.8)', () => {
    expectClose(upperTailChiSquare(3.841458820694124, 1), 0.05, 1e-9);
    expectClose(upperTailChiSquare(18.307038053275146, 10), 0.05, 1e-9);
  });

  it('df 2 has the closed form exp(−x/2) (A&S 26.4.5)', () => {
    for (const x of [0.01, 1, 10, 100, 700, 1400]) expectClose(upperTailChiSquare(x, 2), Math.exp(-x / 2), 1e-13);
  });

  it('df 1 has the closed form erfc(√(x/2)) (A&S 26.4.4 with 7.1.2): against mpmath erfc, recorded by scripts/record_edges.py', () => {
    expect(edges.chi2Df1.length).toBeGreaterThanOrEqual(8);
    for (const point of edges.chi2Df1) expectClose(upperTailChiSquare(point.x, 1), point.p, 1e-12);
  });

  it('lower and upper tails sum to 1', () => {
    for (const [x, df] of [
      [0.5, 1],
      [3, 4],
      [50, 40],
      [1e4, 1e4],
    ]) {
      expectClose(upperTailChiSquare(x, df) + lowerTailChiSquare(x, df), 1, 1e-14);
    }
  });

  it('handles edges: x ≤ 0 gives 1, infinite x gives 0, invalid df gives NaN', () => {
    expect(upperTailChiSquare(0, 3)).toBe(1);
    expect(upperTailChiSquare(-1, 3)).toBe(1);
    expect(upperTailChiSquare(Infinity, 3)).toBe(0);
    expect(upperTailChiSquare(1, 0)).toBeNaN();
    expect(regularizedGammaUpper(-1, 1)).toBeNaN();
  });

  it('log-gamma matches exact factorials and Γ(½) = √π', () => {
    expectClose(logGamma(0.5), Math.log(Math.sqrt(Math.PI)), 1e-14);
    expectClose(logGamma(11), Math.log(3628800), 1e-15);
    expectClose(logGamma(200.5) - logGamma(199.5), Math.log(199.5), 1e-12);
  });
});
