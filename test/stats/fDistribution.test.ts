import { describe, expect, it } from 'vitest';
import { fQuantile, lowerTailF, upperQuantileF, upperTailF } from '../../src/stats/fDistribution.js';
import { upperTailStudentT } from '../../src/stats/studentTDistribution.js';
import { expectClose } from '../helpers.js';
import { distributions, worstRelativeError } from './distributionFixtures.js';

// Reference library: mpmath (Debian package python3-mpmath) at 80 digits, recorded by scripts/record_f_t_distributions.py.
describe('F distribution with real degrees of freedom', () => {
  it(`upper and lower tails agree with mpmath (80 digits, recorded) to 1e-10 relative on ${distributions.f.length} points, df from 0.3 to 1e10, tails to 1e-300`, () => {
    const pairs: [number, number][] = [];
    for (const p of distributions.f) {
      pairs.push([upperTailF(p.f, p.df1, p.df2), p.upper], [lowerTailF(p.f, p.df1, p.df2), p.lower]);
    }
    expect(worstRelativeError(pairs)).toBeLessThan(1e-10);
    expect(distributions.f.filter((p) => p.upper < 1e-290).length).toBeGreaterThan(10);
    expect(distributions.f.some((p) => p.df2 === 1e10 && p.upper < 1e-250)).toBe(true);
  });

  it(`upper quantiles agree with the mpmath root (recorded) to 1e-12 relative, down to q = 1e-300 (${distributions.fQuantiles.length} points)`, () => {
    for (const p of distributions.fQuantiles) {
      const f = upperQuantileF(p.q, p.df1, p.df2);
      if (p.f === null) expect(f, `beyond the double range at q=${p.q}`).toBe(Infinity);
      else expectClose(f, p.f, 1e-12);
    }
  });

  it('has the 5% points of Abramowitz & Stegun table 26.9: F(2, 12) 3.89, F(4, 30) 2.69, F(10, 10) 2.98', () => {
    expectClose(fQuantile(0.95, 2, 12), 3.89, 2e-3);
    expectClose(fQuantile(0.95, 4, 30), 2.69, 2e-3);
    expectClose(fQuantile(0.95, 10, 10), 2.98, 2e-3);
  });

  it('has closed forms: F(2, m) tail (1 + 2f/m)^(−m/2); F(1, ν) is the square of t(ν) (A&S 26.6.4, 26.6.6)', () => {
    for (const [f, m] of [[0.5, 3.7], [5, 12], [1e4, 40.5], [200, 1e6]]) expectClose(upperTailF(f, 2, m), Math.exp((-m / 2) * Math.log1p((2 * f) / m)), 1e-12);
    for (const [t, nu] of [[0.3, 2.5], [3, 10], [25, 7.5]]) expectClose(upperTailF(t * t, 1, nu), 2 * upperTailStudentT(t, nu), 1e-12);
  });

  it('far tails whose beta variable is below 1e-300: F(2, m) lower tail 1 − (1 + 2f/m)^(−m/2) ≈ f for tiny f; F(m, 2) upper tail by the same symmetry', () => {
    // P(F(2, m) ≤ f) = 1 − (1 + 2f/m)^(−m/2) = −expm1(−(m/2) log1p(2f/m)) (A&S 26.6.4)
    for (const f of [1e-305, 1e-200]) expectClose(lowerTailF(f, 2, 3), -Math.expm1(-1.5 * Math.log1p((2 * f) / 3)), 1e-12);
    // P(F(m, 2) ≥ f) = P(F(2, m) ≤ 1/f) (A&S 26.6.1: 1/F(m, 2) is F(2, m))
    for (const f of [1e200, 1e305]) expectClose(upperTailF(f, 3, 2), -Math.expm1(-1.5 * Math.log1p(2 / f / 3)), 1e-12);
  });

  it('edges: f ≤ 0 has tail 1, f = ∞ has 0, bad df give NaN', () => {
    expect(upperTailF(0, 3, 4)).toBe(1);
    expect(upperTailF(Infinity, 3, 4)).toBe(0);
    expect(upperTailF(1, 0, 4)).toBeNaN();
    expect(upperQuantileF(0, 3, 4)).toBe(Infinity);
  });
});
