import { describe, expect, it } from 'vitest';
import { betaDensity, betaQuantile, betaTails, logBeta, regularizedBeta, regularizedBetaComplement, upperQuantileBeta } from '../../src/stats/incompleteBeta.js';
import { expectClose } from '../helpers.js';
import { distributions, worstRelativeError } from './distributionFixtures.js';

// Reference library: mpmath (Debian package python3-mpmath, version recorded in the fixture) at 80 digits,
// through scripts/record_f_t_distributions.py.
describe('regularized incomplete beta function', () => {
  it(`both tails agree with mpmath (80 digits, recorded) to 1e-10 relative on ${distributions.beta.length} points, a and b from 0.05 to 1e7, tails down to 1e-300`, () => {
    const pairs: [number, number][] = [];
    for (const p of distributions.beta) {
      const tails = betaTails(p.x, p.a, p.b);
      pairs.push([tails.lower, p.lower], [tails.upper, p.upper]);
    }
    expect(worstRelativeError(pairs)).toBeLessThan(1e-10);
    expect(distributions.beta.filter((p) => Math.min(p.lower, p.upper) < 1e-290).length).toBeGreaterThan(10);
  });

  it('has the closed forms of integer parameters: I_x(1, b) = 1 − (1−x)^b, I_x(a, 1) = x^a, I_0.5(2, 3) = 11/16 (A&S 26.5.4–26.5.6)', () => {
    for (const x of [1e-12, 0.01, 0.3, 0.9]) {
      for (const b of [0.5, 2, 7.5, 300]) expectClose(regularizedBetaComplement(x, 1, b), Math.pow(1 - x, b), 1e-13);
      for (const a of [0.5, 2, 7.5, 300]) expectClose(regularizedBeta(x, a, 1), Math.pow(x, a), 1e-13);
    }
    expectClose(regularizedBeta(0.5, 2, 3), 11 / 16, 1e-15);
  });

  it('is symmetric: I_x(a, b) = 1 − I_(1−x)(b, a) (A&S 26.5.2)', () => {
    for (const [a, b, x] of [[2.5, 7, 0.2], [40, 40, 0.55], [0.3, 9, 0.01]]) {
      expectClose(regularizedBeta(x, a, b), regularizedBetaComplement(1 - x, b, a), 1e-14);
    }
  });

  it('log B(a, b) keeps its digits when a parameter is huge (mpmath.log(mpmath.beta), 40 digits)', () => {
    // values from mpmath at 40 digits: log B(5e9, 0.5), log B(20, 30), log B(1e7, 2e7)
    expectClose(logBeta(5e9, 0.5), -10.59398693174055567830962753701624506481, 1e-14);
    expectClose(logBeta(20, 30), -33.96882079197738296261938362583051376927, 1e-14);
    expectClose(logBeta(1e7, 2e7), -19095431.98622111305169545374992683693252, 1e-15);
  });

  it('the density integrates to the tail: d/dx I_x(a, b) = density (central difference)', () => {
    const [a, b, x, h] = [3.5, 8.25, 0.3, 1e-6];
    expectClose((regularizedBeta(x + h, a, b) - regularizedBeta(x - h, a, b)) / (2 * h), betaDensity(x, a, b), 1e-8);
  });

  it(`quantiles agree with the mpmath root (recorded) to 1e-12 in x or in 1 − x, ${distributions.betaQuantiles.length} points`, () => {
    for (const p of distributions.betaQuantiles) {
      const x = p.side === 'lower' ? betaQuantile(p.p, p.a, p.b) : upperQuantileBeta(p.p, p.a, p.b);
      const error = Math.min(Math.abs(x - p.x) / p.x, Math.abs(x - p.x) / p.oneMinusX);
      expect(error, `${p.side} ${p.p} of Beta(${p.a}, ${p.b})`).toBeLessThan(1e-12);
    }
  });

  it('degenerate limits used by the Clopper–Pearson interval: a = 0 gives 0, b = 0 gives 1', () => {
    expect(betaQuantile(0.025, 0, 5)).toBe(0);
    expect(upperQuantileBeta(0.025, 5, 0)).toBe(1);
  });
});
