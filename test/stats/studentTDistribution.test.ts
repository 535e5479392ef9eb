import { describe, expect, it } from 'vitest';
import { lowerTailStudentT, studentTQuantile, twoSidedStudentT, upperQuantileStudentT, upperTailStudentT } from '../../src/stats/studentTDistribution.js';
import { expectClose } from '../helpers.js';
import { distributions, worstRelativeError } from './distributionFixtures.js';

// Reference library: mpmath (Debian package python3-mpmath) at 80 digits, recorded by scripts/record_f_t_distributions.py.
describe("Student's t distribution with real degrees of freedom", () => {
  it(`tails agree with mpmath (80 digits, recorded) to 1e-10 relative on ${distributions.t.length} points and their mirror images, df 0.3 to 1e12, tails to 1e-300`, () => {
    const pairs: [number, number][] = [];
    for (const p of distributions.t) {
      pairs.push([upperTailStudentT(p.t, p.df), p.upper], [upperTailStudentT(-p.t, p.df), p.upperOfNegative], [lowerTailStudentT(-p.t, p.df), p.upper]);
      pairs.push([twoSidedStudentT(p.t, p.df), 2 * p.upper]);
    }
    expect(worstRelativeError(pairs)).toBeLessThan(1e-10);
    expect(distributions.t.filter((p) => p.upper < 1e-290).length).toBeGreaterThan(5);
  });

  it(`upper quantiles agree with the mpmath root (recorded) to 1e-12 relative, down to q = 1e-300 (${distributions.tQuantiles.length} points)`, () => {
    for (const p of distributions.tQuantiles) {
      const t = upperQuantileStudentT(p.q, p.df);
      if (p.t === null) expect(t, `beyond the double range at q=${p.q}, df=${p.df}`).toBe(Infinity);
      else expectClose(t, p.t, 1e-12);
    }
  });

  it('has the two-sided 5% points of Abramowitz & Stegun table 26.10: 12.706 (1), 2.228 (10), 2.042 (30)', () => {
    expectClose(studentTQuantile(0.975, 1), 12.706, 1e-4);
    expectClose(studentTQuantile(0.975, 10), 2.228, 2e-4);
    expectClose(studentTQuantile(0.975, 30), 2.042, 2e-4);
    expectClose(studentTQuantile(0.025, 10), -2.228, 2e-4);
  });

  it('has the closed forms of 1 and 2 df: Cauchy atan(1/t)/π, and ½(1 − t/√(2 + t²)) (A&S 26.7.3)', () => {
    for (const t of [0.01, 1, 30, 1e6, 1e200]) expectClose(upperTailStudentT(t, 1), Math.atan(1 / t) / Math.PI, 1e-13);
    // ½(1 − t/√(2+t²)) rewritten without cancellation as 1 / (√(2+t²) (√(2+t²) + t))
    for (const t of [0.01, 1, 30, 1e6, 1e100]) {
      const root = Math.sqrt(2 + t * t);
      expectClose(upperTailStudentT(t, 2), 1 / (root * (root + t)), 1e-13);
    }
  });

  it('edges: t = 0 has tail ½ and quantile(½) = 0; df ≤ 0 gives NaN', () => {
    expect(upperTailStudentT(0, 5)).toBe(0.5);
    expect(studentTQuantile(0.5, 5)).toBe(0);
    expect(upperTailStudentT(1, 0)).toBeNaN();
  });
});
