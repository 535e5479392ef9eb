import { describe, expect, it } from 'vitest';
import { normalQuantile, upperTailNormal } from '../../src/stats/normalDistribution.js';
import { cramersVInterval, cramersVMedianEstimate, EDGEWORTH_THRESHOLD, lowerTailNoncentralChiSquare, noncentralityInterval, upperTailNoncentralChiSquare } from '../../src/stats/noncentralChiSquare.js';
import { oddsRatio, relativeRisk } from '../../src/stats/riskMeasures.js';
import { edges, expectClose, readReferenceFixture, reference } from '../helpers.js';

/** Limits recorded by scripts/record_noncentrality.py (scipy.optimize.brentq on scipy.stats.ncx2). */
const noncentrality = readReferenceFixture<{ limits: { x: number; df: number; confidence: number; lower: number; upper: number; median: number }[] }>('noncentrality.json');

describe('normal distribution', () => {
  for (const { p, z } of reference.normalQuantiles) {
    it(`quantile at p = ${p} matches mpmath (recorded)`, () => expectClose(normalQuantile(p), z, 1e-12));
  }
  it('upper tail at 1.959964 is 0.025 (A&S table 26.1)', () => expectClose(upperTailNormal(1.959963984540054), 0.025, 1e-12));
});

describe('odds ratio and relative risk', () => {
  for (const table of reference.tables.filter((t) => t.oddsRatio)) {
    it(`${table.name}: odds ratio with Woolf interval and relative risk with Katz interval match scipy.stats.contingency (recorded)`, () => {
      const or = oddsRatio(table.counts, 0.95);
      expectClose(or?.estimate, table.oddsRatio!.estimate, 1e-10);
      expectClose(or?.lower, table.oddsRatio!.lower, 1e-9);
      expectClose(or?.upper, table.oddsRatio!.upper, 1e-9);
      const rr = relativeRisk(table.counts, 0.95);
      expectClose(rr?.estimate, table.relativeRisk!.estimate, 1e-10);
      expectClose(rr?.lower, table.relativeRisk!.lower, 1e-9);
      expectClose(rr?.upper, table.relativeRisk!.upper, 1e-9);
    });
  }

  it('adds ½ to every cell when a cell is zero (Haldane 1956) and says so', () => {
    const or = oddsRatio([[0, 5], [7, 2]]);
    expect(or?.haldaneCorrection).toBe(true);
    expectClose(or?.estimate, (0.5 * 2.5) / (5.5 * 7.5), 1e-14);
    expect(oddsRatio([[1, 5], [7, 2]])?.haldaneCorrection).toBe(false);
  });
});

describe('noncentral chi-square and the interval for Cramér’s V', () => {
  for (const point of reference.ncx2) {
    it(`tails at x=${point.x}, df=${point.df}, λ=${point.lambda} match mpmath's Poisson mixture (recorded)`, () => {
      expectClose(upperTailNoncentralChiSquare(point.x, point.df, point.lambda), point.upper, 1e-9);
      expectClose(lowerTailNoncentralChiSquare(point.x, point.df, point.lambda), point.lower, 1e-9);
    });
  }

  for (const point of edges.noncentralLarge) {
    const route = point.x > EDGEWORTH_THRESHOLD || point.lambda > EDGEWORTH_THRESHOLD ? 'Edgeworth series' : 'Poisson mixture';
    it(`tails at λ = ${point.lambda.toExponential(0)}, x = ${point.x} (${route}) match scipy.stats.ncx2 to 1e-10 (scripts/record_edges.py)`, () => {
      expectClose(upperTailNoncentralChiSquare(point.x, point.df, point.lambda), point.upper, 1e-10);
      expectClose(lowerTailNoncentralChiSquare(point.x, point.df, point.lambda), point.lower, 1e-10);
    });
  }

  for (const item of edges.noncentralityIntervals) {
    it(`95% limits for λ at X² = ${item.x.toExponential(1)} match Brent's method on scipy.stats.ncx2 to 1e-10 (scripts/record_edges.py)`, () => {
      const { lower, upper, converged } = noncentralityInterval(item.x, item.df, item.confidence);
      expect(converged).toBe(true);
      expectClose(lower, item.lower, 1e-10);
      expectClose(upper, item.upper, 1e-10);
    });
  }

  for (const item of noncentrality.limits) {
    it(`95% limits and median-unbiased λ at X² = ${item.x} on ${item.df} df (Poisson mixture) match Brent's method on scipy.stats.ncx2 to 1e-12 (scripts/record_noncentrality.py)`, () => {
      const { lower, upper, converged } = noncentralityInterval(item.x, item.df, item.confidence);
      expect(converged).toBe(true);
      expectClose(lower, item.lower, 1e-12);
      expectClose(upper, item.upper, 1e-12);
      // V² · n (m − 1) with m = 2 is λ̂ itself; n large enough that V stays below its cap of 1.
      const n = 100 * item.x;
      expectClose(cramersVMedianEstimate(item.x, item.df, n, 2, 2)! ** 2 * n, item.median, 1e-12);
    });
  }

  it('the V interval at X² = 2·10¹⁴ (counts near 10¹⁴) is computed, not a hang, and says its tails are Edgeworth', () => {
    const interval = cramersVInterval(2e14, 1, 8e14, 2, 2, 0.95);
    expect(interval?.tails).toBe('edgeworth');
    expect(interval!.lower).toBeLessThan(0.5);
    expect(interval!.upper).toBeGreaterThan(0.5);
    expect(interval!.upper - interval!.lower).toBeLessThan(1e-6);
  });

  it('inverts the distribution: the limits put α/2 in each tail (Smithson 2003)', () => {
    const { lower, upper } = noncentralityInterval(40, 6, 0.95);
    expect(lower).toBeGreaterThan(0);
    expectClose(upperTailNoncentralChiSquare(40, 6, lower), 0.025, 1e-6);
    expectClose(lowerTailNoncentralChiSquare(40, 6, upper), 0.025, 1e-6);
  });

  it('the V interval has lower limit 0 when the test is not significant, and narrows as n grows', () => {
    const weak = cramersVInterval(3, 4, 200, 3, 3, 0.95);
    expect(weak?.lower).toBe(0);
    const small = cramersVInterval(40, 4, 400, 3, 3, 0.95)!;
    const large = cramersVInterval(400, 4, 4000, 3, 3, 0.95)!;
    expect(large.upper - large.lower).toBeLessThan(small.upper - small.lower);
    const v = Math.sqrt(400 / (4000 * 2));
    expect(large.lower).toBeLessThan(v);
    expect(large.upper).toBeGreaterThan(v);
  });
});
