import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { fisherByEnumeration, fisherExact2x2, fisherFreemanHalton } from '../../src/stats/fisherExact.js';
import { monteCarloExactTest, RandomTableSampler } from '../../src/stats/monteCarlo.js';
import { SeededRandom } from '../../src/stats/random.js';
import { contingencyTables, expectClose, reference } from '../helpers.js';

describe("Fisher's exact test, 2×2", () => {
  it("tea-tasting experiment: two-sided p = 0.4857 (Fisher 1935, The Design of Experiments; Agresti 2013 §3.5.2)", () => {
    expect(fisherExact2x2([[3, 1], [1, 3]])?.pValue).toBeCloseTo(0.4857, 4);
  });

  for (const table of reference.tables.filter((t) => t.fisher)) {
    it(`${table.name}: agrees with a 40-digit mpmath sum (1e-10) and scipy.stats.fisher_exact (1e-9; recorded)`, () => {
      const p = fisherExact2x2(table.counts)?.pValue;
      expectClose(p, table.fisher!.pValueMpmath, 1e-10);
      expectClose(p, table.fisher!.pValue, 1e-9);
    });
  }

  it('is null for non-2×2 or non-integer tables', () => {
    expect(fisherExact2x2([[1, 2, 3], [3, 2, 1]])).toBeNull();
    expect(fisherExact2x2([[1.5, 2], [3, 4]])).toBeNull();
  });
});

describe('Fisher–Freeman–Halton exact test, r×c', () => {
  for (const item of reference.exactRxC) {
    it(`equals full enumeration in exact rational arithmetic (recorded by scripts/record_reference.py) for ${JSON.stringify(item.counts)}`, () => {
      expectClose(fisherFreemanHalton(item.counts)?.pValue, item.pValue, 1e-10);
    });
  }

  it('equals brute-force enumeration on random small tables (property)', () => {
    const small = contingencyTables(3, 4, 5);
    fc.assert(
      fc.property(small, (t) => {
        const network = fisherFreemanHalton(t)?.pValue as number;
        const brute = fisherByEnumeration(t);
        expect(Math.abs(network - brute)).toBeLessThanOrEqual(1e-10 * Math.max(brute, 1e-300) + 1e-15);
      }),
      { numRuns: 150 },
    );
  });

  it('gives up (null) rather than running past its work bound', () => {
    const big = [
      [40, 35, 30, 25, 20],
      [22, 33, 44, 11, 25],
      [30, 30, 30, 30, 30],
      [12, 24, 36, 48, 10],
    ];
    expect(fisherFreemanHalton(big, { maxWork: 10_000 })).toBeNull();
  });
});

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

  for (const item of reference.exactRxC) {
    it(`lands within 4 standard errors of the exact p-value for ${JSON.stringify(item.counts)}`, () => {
      const mc = monteCarloExactTest(item.counts, 20000, 12345);
      expect(mc).not.toBeNull();
      const se = Math.max(mc!.standardError, Math.sqrt((item.pValue * (1 - item.pValue)) / 20000), 1 / 20000);
      expect(Math.abs(mc!.pValue - item.pValue)).toBeLessThan(4 * se);
    });
  }

  it('repeats exactly with the same seed and differs with another', () => {
    const t = [[3, 1, 0], [1, 3, 2], [0, 2, 5]];
    expect(monteCarloExactTest(t, 5000, 99)).toEqual(monteCarloExactTest(t, 5000, 99));
    expect(monteCarloExactTest(t, 5000, 99)?.pValue).not.toBe(monteCarloExactTest(t, 5000, 100)?.pValue);
  });
});
