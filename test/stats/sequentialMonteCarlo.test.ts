import { describe, expect, it } from 'vitest';
import { monteCarloExactTest } from '../../src/stats/monteCarlo.js';
import { adjustPValues } from '../../src/stats/multipleTesting.js';
import { binomialDivergenceBounds, GrowingSimulation, sequentialDecisions } from '../../src/stats/sequentialMonteCarlo.js';
import { fisherByEnumeration } from '../../src/stats/fisherExact.js';

describe('sequential simulated p-values', () => {
  it('a simulation grown in steps gives exactly the p-value of a fixed run of as many tables (same seed)', () => {
    const counts = [[3, 1, 0, 2], [1, 4, 2, 0], [0, 2, 5, 1]];
    const grown = new GrowingSimulation(counts, 7);
    grown.extendTo(128);
    grown.extendTo(1000);
    const fixed = monteCarloExactTest(counts, 1000, 7);
    expect(grown.result().pValue).toBe(fixed?.pValue);
  });

  it('Chernoff–Hoeffding bounds (Hoeffding 1963): 0 of 1000 gives an upper bound log(1/risk)/1000 to first order; bounds bracket b/N', () => {
    const { lower, upper } = binomialDivergenceBounds(0, 1000, Math.log(1000));
    expect(lower).toBe(0);
    // N·D(0‖p) = −N log(1 − p) = L  ⇒  p = 1 − e^(−L/N)
    expect(upper).toBeCloseTo(1 - Math.exp(-Math.log(1000) / 1000), 10);
    for (const [b, n] of [[5, 100], [50, 100], [99, 100], [1, 10_000]]) {
      const x = binomialDivergenceBounds(b, n, 8);
      expect(x.lower).toBeLessThanOrEqual(b / n);
      expect(x.upper).toBeGreaterThanOrEqual(b / n);
    }
  });

  it('decides a family as the exact p-values would, drawing few tables where the answer is clear (exact reference: enumeration)', () => {
    // Four sparse tables with exact p-values far from and near the thresholds, and fixed p-values for the rest of a family of 20.
    const tables = [
      [[3, 0, 0], [0, 3, 0], [0, 0, 3]], // exact p small
      [[1, 1, 1], [1, 1, 1], [1, 1, 2]], // exact p near 1
      [[2, 1, 0], [1, 2, 1], [0, 1, 3]],
      [[4, 0, 1], [0, 4, 0], [1, 0, 4]],
    ];
    const exact = tables.map((t) => fisherByEnumeration(t));
    const fixed: (number | null)[] = [null, null, null, null, ...Array.from({ length: 16 }, (_v, k) => (k < 3 ? 1e-6 * (k + 1) : 0.2 + k / 40))];
    const sims = [...tables.map((t) => new GrowingSimulation(t, 11)), ...Array.from({ length: 16 }, () => null)];
    const outcomes = sequentialDecisions(fixed, sims, 'bh', 0.05, { firstLook: 128, maxDraws: 200_000, risk: 1e-3 });
    const truth = adjustPValues([...exact, ...(fixed.slice(4) as number[])], 'bh').map((p) => p <= 0.05);
    tables.forEach((_t, k) => {
      const outcome = outcomes[k]!;
      if (outcome.stop === 'clearly-passes') expect(truth[k]).toBe(true);
      if (outcome.stop === 'clearly-fails') expect(truth[k]).toBe(false);
    });
    // the table whose exact p-value is near 1 stops at the first look
    expect(outcomes[1]).toEqual({ stop: 'clearly-fails', draws: 128 });
  });
});
