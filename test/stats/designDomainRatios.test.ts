import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { linearizedCovariance } from '../../src/stats/designCovariance.js';
import { domainCovariance, domainDifferenceTest, domainRatios } from '../../src/stats/designDomainRatios.js';
import { DesignTally } from '../../src/stats/designTally.js';
import { twoSidedStudentT } from '../../src/stats/studentTDistribution.js';
import { expectClose } from '../helpers.js';

// The recorded checks against the survey package for R (svyby + svycontrast)
// are in test/cli/bannerDesign.test.ts; these are the identities the
// linearised domain ratio must meet, derived beside each.

/** A 2 × c table of rows (cell = level · c + column), each row its own PSU, one stratum, weight 1. */
function simpleRandomSample(cells: number[][]): { estimate: ReturnType<typeof linearizedCovariance>; c: number } {
  const c = cells[0].length;
  const tally = new DesignTally({ clustered: false });
  cells.forEach((row, i) => row.forEach((count, j) => {
    for (let k = 0; k < count; k++) tally.add({ cell: i * c + j, weight: 1 });
  }));
  return { estimate: linearizedCovariance(tally.totals, { layout: { size: 2 * c } }), c };
}

describe('design-based column shares and their difference (designDomainRatios.ts)', () => {
  it('a simple random sample (each row its own PSU, one stratum, equal weights): Var(p_a) = p(1 − p)/m_a · n/(n − 1), columns uncorrelated, t = the unpooled two-proportion z times √((n − 1)/n)', () => {
    // Derivation: z_i = (y_i − p_a)[i in a]/m_a, V = n/(n − 1) Σ (z_i − z̄)(z_i − z̄)' with z̄ = 0 for a ratio's
    // linearised values; Σ z_i² = m_a p_a(1 − p_a)/m_a², and z_ia z_ib = 0 for a ≠ b (a row is in one column).
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: 1, max: 40 }), fc.integer({ min: 1, max: 40 })), { minLength: 2, maxLength: 4 }), (columns) => {
        const cells = [columns.map((x) => x[0]), columns.map((x) => x[1])];
        const { estimate, c } = simpleRandomSample(cells);
        const n = columns.reduce((s, x) => s + x[0] + x[1], 0);
        const ratios = domainRatios(estimate, 2, c, [1, 0], [1, 1]);
        columns.forEach(([yes, no], a) => {
          const m = yes + no;
          const p = yes / m;
          expectClose(ratios[a].estimate, p, 1e-12);
          expectClose(ratios[a].variance, ((p * (1 - p)) / m) * (n / (n - 1)), 1e-9);
        });
        const test = domainDifferenceTest(estimate, ratios[0], ratios[1]);
        const [p1, m1] = [columns[0][0] / (columns[0][0] + columns[0][1]), columns[0][0] + columns[0][1]];
        const [p2, m2] = [columns[1][0] / (columns[1][0] + columns[1][1]), columns[1][0] + columns[1][1]];
        expect(Math.abs(domainCovariance(estimate, ratios[0], ratios[1]))).toBeLessThan(1e-15);
        const unpooled = (p1 - p2) / Math.sqrt(p1 * (1 - p1) / m1 + p2 * (1 - p2) / m2);
        if (p1 * (1 - p1) + p2 * (1 - p2) === 0) expect(test).toBeNull();
        else {
          expectClose(test!.statistic, unpooled * Math.sqrt((n - 1) / n), 1e-9);
          expect(test!.df).toBe(n - 1);
          expectClose(test!.pValue, twoSidedStudentT(test!.statistic, n - 1), 1e-12);
        }
      }),
      { numRuns: 60, seed: 20261202 },
    );
  });

  it('two columns that share clusters are correlated, and the covariance enters the variance of the difference', () => {
    // Four clusters, each holding respondents of both columns; a cluster's share is the same in both columns,
    // so the two domain shares move together: Cov > 0 and Var(p_a − p_b) < Var(p_a) + Var(p_b).
    const tally = new DesignTally({ clustered: true });
    const shares = [0.2, 0.4, 0.6, 0.8];
    shares.forEach((share, cluster) => {
      for (let column = 0; column < 2; column++)
        for (let k = 0; k < 10; k++) tally.add({ cell: (k < share * 10 ? 0 : 1) * 2 + column, weight: 1, cluster });
    });
    const estimate = linearizedCovariance(tally.totals, { layout: { size: 4 } });
    const [a, b] = domainRatios(estimate, 2, 2, [1, 0], [1, 1]);
    const covariance = domainCovariance(estimate, a, b);
    expect(covariance).toBeGreaterThan(0);
    expectClose(covariance, Math.sqrt(a.variance! * b.variance!), 1e-9); // perfectly correlated here
    // equal shares in every cluster: the difference is exactly 0 with no variance, so no test
    expect(domainDifferenceTest(estimate, a, b)).toBeNull();
  });

  it('a domain mean is the ratio Σ x p / Σ p over scored levels, levels without a score left out', () => {
    const tally = new DesignTally({ clustered: false });
    // one column; levels scored 1, 2 and none: 3 × level 0, 1 × level 1, 5 × level 2 (unscored)
    for (const [cell, count] of [[0, 3], [1, 1], [2, 5]]) for (let k = 0; k < count; k++) tally.add({ cell, weight: 1 });
    const estimate = linearizedCovariance(tally.totals, { layout: { size: 3 } });
    const [mean] = domainRatios(estimate, 3, 1, [1, 2, 0], [1, 1, 0]);
    expectClose(mean.estimate, (3 * 1 + 1 * 2) / 4, 1e-12);
    // Var of a mean of scores 1,1,1,2 in a domain of 4 of 9 rows: s²/m · n/(n − 1) with s² = Σ(x − x̄)²/m
    const s2 = (3 * 0.25 ** 2 + 0.75 ** 2) / 4;
    expectClose(mean.variance, (s2 / 4) * (9 / 8), 1e-12);
  });
});
