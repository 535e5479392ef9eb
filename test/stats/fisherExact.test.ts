import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fisherByEnumeration, fisherExact2x2, fisherFreemanHalton, logHypergeometric, networkSizeEstimate } from '../../src/stats/fisherExact.js';
import { logBinomialCoefficient } from '../../src/stats/gamma.js';
import { contingencyTables, edges, exactP, expectClose, reference } from '../helpers.js';

describe("Fisher's exact test, 2×2", () => {
  it("tea-tasting experiment: two-sided p = 0.4857 (Fisher 1935, The Design of Experiments, §2: 3 of 4 cups right)", () => {
    expect(exactP(fisherExact2x2([[3, 1], [1, 3]]))).toBeCloseTo(0.4857, 4);
  });

  for (const table of reference.tables.filter((t) => t.fisher)) {
    it(`${table.name}: agrees with a 40-digit mpmath sum (1e-10) and scipy.stats.fisher_exact (recorded)`, () => {
      const p = exactP(fisherExact2x2(table.counts));
      expectClose(p, table.fisher!.pValueMpmath, 1e-10);
      // scipy sums in double precision; it drifts by 2.4e-10 at n = 2e6
      expectClose(p, table.fisher!.pValue, 1e-9);
    });
  }

  for (const item of edges.fisher2x2) {
    it(`${item.name}: within 1e-10 of 60-digit mpmath (scripts/record_edges.py)`, () => {
      const outcome = fisherExact2x2(item.counts);
      expect(outcome?.status).toBe('computed');
      expectClose(exactP(outcome), item.pValue, 1e-10);
    });
  }

  it('equals the sum over every table by brute force on random small tables (property)', () => {
    fc.assert(
      fc.property(contingencyTables(2, 2, 40, 2, 2), (t) => {
        const p = exactP(fisherExact2x2(t)) as number;
        const brute = fisherByEnumeration(t);
        expect(Math.abs(p - brute)).toBeLessThanOrEqual(1e-12 * Math.max(brute, 1e-300) + 1e-15);
      }),
      { numRuns: 200, seed: 14 },
    );
  });

  it('keeps its work near 20 standard deviations: about 2.5·10⁵ terms at n = 4·10⁹, not one per table', () => {
    const outcome = fisherExact2x2([[1000000007, 999999937], [999999929, 1000000009]]);
    expect(outcome?.status).toBe('computed');
    if (outcome?.status === 'computed') expect(outcome.work).toBeLessThan(400_000);
  });

  it('declines, with its estimate and bound, above the work bound, and for counts beyond 2^53', () => {
    const big = fisherExact2x2([[1e14, 1e14 + 2], [1e14 + 4, 1e14]]);
    expect(big?.status).toBe('declined');
    if (big?.status === 'declined') {
      expect(big.workEstimate).toBeGreaterThan(big.workBound);
      expect(big.reason).toMatch(/work estimate/);
    }
    const inexact = fisherExact2x2([[4e15, 4e15], [4e15, 4e15]]);
    expect(inexact?.status).toBe('declined');
    if (inexact?.status === 'declined') expect(inexact.reason).toMatch(/2\^53/);
  });

  it('is null (not applicable) for non-2×2 or non-integer tables', () => {
    expect(fisherExact2x2([[1, 2, 3], [3, 2, 1]])).toBeNull();
    expect(fisherExact2x2([[1.5, 2], [3, 4]])).toBeNull();
  });
});

describe('log-probabilities without cancellation (Loader 2000)', () => {
  it('log C(52, 5) = log 2 598 960 (the number of poker hands)', () => {
    expectClose(logBinomialCoefficient(52, 5), Math.log(2598960), 1e-15);
  });
  it('log C(10⁹ + 5, 3) = log of the exact product (BigInt), where log-factorials lose six digits', () => {
    const n = 1_000_000_005n;
    const exact = (n * (n - 1n) * (n - 2n)) / 6n;
    expectClose(logBinomialCoefficient(1_000_000_005, 3), Math.log(Number(exact)), 1e-15);
    expectClose(logBinomialCoefficient(1_000_000_005, 1_000_000_002), Math.log(Number(exact)), 1e-15);
  });
  it('hypergeometric probabilities sum to 1 over the support', () => {
    let total = 0;
    for (let x = 0; x <= 40; x++) total += Math.exp(logHypergeometric(x, 60, 140, 40));
    expectClose(total, 1, 1e-13);
  });
});

describe('Fisher–Freeman–Halton exact test, r×c', () => {
  for (const item of reference.exactRxC) {
    it(`equals full enumeration in exact rational arithmetic (scripts/record_reference.py) for ${JSON.stringify(item.counts)}`, () => {
      expectClose(exactP(fisherFreemanHalton(item.counts)), item.pValue, 1e-10);
    });
  }

  for (const item of edges.exactRxC) {
    it(`equals enumeration of all ${item.tables} tables in exact rational arithmetic (scripts/record_edges.py) for ${JSON.stringify(item.counts)}`, () => {
      expectClose(exactP(fisherFreemanHalton(item.counts)), item.pValue, 1e-10);
    });
  }

  it('equals brute-force enumeration on random small tables (property)', () => {
    fc.assert(
      fc.property(contingencyTables(3, 4, 5), (t) => {
        const network = exactP(fisherFreemanHalton(t)) as number;
        const brute = fisherByEnumeration(t);
        expect(Math.abs(network - brute)).toBeLessThanOrEqual(1e-10 * Math.max(brute, 1e-300) + 1e-15);
      }),
      { numRuns: 150, seed: 15 },
    );
  });

  it('a 2×7 table of n = 267 runs: pruning brings its work far below the estimate made before pruning', () => {
    const t = [
      [19, 20, 19, 18, 20, 19, 18],
      [18, 19, 20, 19, 18, 19, 19],
    ];
    const outcome = fisherFreemanHalton(t);
    expect(outcome?.status).toBe('computed');
    if (outcome?.status === 'computed') expect(outcome.work).toBeLessThan(100_000);
  });

  it('declines at once, before any table is visited, when the partial tables exceed 8 times the bound (women by department, Bickel et al. 1975)', () => {
    const women = [
      [89, 17, 202, 131, 94, 24],
      [19, 8, 391, 244, 299, 317],
    ];
    const outcome = fisherFreemanHalton(women);
    expect(outcome?.status).toBe('declined');
    if (outcome?.status === 'declined') {
      expect(outcome.workEstimate).toBeGreaterThan(8 * outcome.workBound);
      expect(outcome.reason).toMatch(/work estimate .* partial tables\) is above the bound/);
    }
  });

  it('declines when the budget is spent, saying so, where pruning was not enough', () => {
    const outcome = fisherFreemanHalton([[2, 11, 9, 0], [3, 6, 0, 6], [10, 5, 11, 0]], { maxWork: 20_000 });
    expect(outcome?.status).toBe('declined');
    if (outcome?.status === 'declined') expect(outcome.reason).toMatch(/passed the bound/);
    // and with room enough it is computed, equal to brute force
    expectClose(exactP(fisherFreemanHalton([[2, 11, 9, 0], [3, 6, 0, 6], [10, 5, 11, 0]], { maxWork: 1_000_000 })), fisherByEnumeration([[2, 11, 9, 0], [3, 6, 0, 6], [10, 5, 11, 0]]), 1e-10);
  });

  it('declines at once when even the box bound on the network is far beyond the work bound', () => {
    const t = [
      [40, 35, 30, 25, 20],
      [22, 33, 44, 11, 25],
      [30, 30, 30, 30, 30],
      [12, 24, 36, 48, 10],
    ];
    expect(networkSizeEstimate([150, 135, 150, 130], [104, 122, 140, 114, 85])).toBeGreaterThan(64 * 10_000);
    const outcome = fisherFreemanHalton(t, { maxWork: 10_000 });
    expect(outcome?.status).toBe('declined');
  });

  it('declines a very wide table (so the simulated p-value is used) instead of exhausting the stack', () => {
    const counts = [Array.from({ length: 1500 }, (_v, j) => 1 + (j % 3)), Array.from({ length: 1500 }, (_v, j) => 1 + ((j + 1) % 3))];
    expect(fisherFreemanHalton(counts)?.status).toBe('declined');
  });
});
