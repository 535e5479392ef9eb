import { describe, expect, it } from 'vitest';
import { logFactorialRatio, monteCarloExactTest, RandomTableSampler } from '../../src/stats/monteCarlo.js';
import { logFactorial } from '../../src/stats/gamma.js';
import { SeededRandom } from '../../src/stats/random.js';
import { edges, expectClose, reference } from '../helpers.js';

const simulatedP = (outcome: ReturnType<typeof monteCarloExactTest>) => (outcome?.status === 'computed' ? outcome : null);

describe("Patefield's (1981) random tables and the simulated exact p-value", () => {
  it('every random table keeps the observed margins, and cell means approach n_i. n_.j / n', () => {
    const rows = [12, 30, 8];
    const cols = [20, 10, 15, 5];
    const sampler = new RandomTableSampler(rows, cols, new SeededRandom(7));
    const sums = new Float64Array(12);
    const draws = 20000;
    for (let s = 0; s < draws; s++) {
      const t = sampler.draw();
      for (let i = 0; i < 3; i++) expect(t[i * 4] + t[i * 4 + 1] + t[i * 4 + 2] + t[i * 4 + 3]).toBe(rows[i]);
      for (let j = 0; j < 4; j++) expect(t[j] + t[4 + j] + t[8 + j]).toBe(cols[j]);
      for (let k = 0; k < 12; k++) sums[k] += t[k];
    }
    for (let i = 0; i < 3; i++) for (let j = 0; j < 4; j++) expect(Math.abs(sums[i * 4 + j] / draws - (rows[i] * cols[j]) / 50)).toBeLessThan(0.1);
  });

  for (const item of [...reference.exactRxC, ...edges.exactRxC]) {
    it(`lands within 4 standard errors of the exact p-value (recorded enumeration) for ${JSON.stringify(item.counts)}`, () => {
      const mc = simulatedP(monteCarloExactTest(item.counts, 20000, 12345));
      expect(mc).not.toBeNull();
      const se = Math.max(mc!.standardError, Math.sqrt((item.pValue * (1 - item.pValue)) / 20000), 1 / 20000);
      expect(Math.abs(mc!.pValue - item.pValue)).toBeLessThan(4 * se);
    });
  }

  it('repeats exactly with the same seed and differs with another', () => {
    const t = [[3, 1, 0], [1, 3, 2], [0, 2, 5]];
    expect(monteCarloExactTest(t, 5000, 99)).toEqual(monteCarloExactTest(t, 5000, 99));
    expect(simulatedP(monteCarloExactTest(t, 5000, 99))?.pValue).not.toBe(simulatedP(monteCarloExactTest(t, 5000, 100))?.pValue);
  });

  it('declines, with its estimate, when simulations × steps per table pass the bound (counts near 10¹²)', () => {
    const outcome = monteCarloExactTest([[1e12, 2e12, 3], [3e12, 1e12, 5]], 100_000, 1);
    expect(outcome?.status).toBe('declined');
    if (outcome?.status === 'declined') expect(outcome.workEstimate).toBeGreaterThan(outcome.workBound);
  });

  it('log(a!/b!) near 10⁹ equals the exact sum of logs, where two log-factorials would lose six digits', () => {
    let s = 0;
    for (let k = 1_000_000_001; k <= 1_000_000_040; k++) s += Math.log(k);
    expectClose(logFactorialRatio(1_000_000_040, 1_000_000_000), s, 1e-14);
    // far apart: agrees with log-gamma where that is accurate (moderate arguments)
    expectClose(logFactorialRatio(5000, 100), logFactorial(5000) - logFactorial(100), 1e-13);
  });
});
