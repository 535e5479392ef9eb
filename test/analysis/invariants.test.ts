import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeTable } from '../../src/analysis/analyzeTable.js';
import { contingencyTables } from '../helpers.js';

const table = (counts: number[][]) => ({
  rowName: 'r',
  colName: 'c',
  rowLevels: counts.map((_r, i) => `r${i}`),
  colLevels: counts[0].map((_c, j) => `c${j}`),
  counts,
});

describe('invariants of the analysis record on random tables (property)', () => {
  it('statistics are non-negative, p-values lie in [0, 1], shares sum to 1 and percentages to 100', () => {
    fc.assert(
      fc.property(contingencyTables(5, 5, 25), (counts) => {
        const record = analyzeTable(table(counts), 0, { ordinal: true, confidence: 0.95, exact: 'auto', simulations: 200, seed: 1, exactWorkLimit: 20_000 });
        const { tests } = record;
        for (const t of [tests.pearson, tests.likelihoodRatio, tests.yates, tests.linearByLinear]) {
          if (t === null) continue;
          expect(t.statistic).toBeGreaterThanOrEqual(0);
          expect(t.pValue).toBeGreaterThanOrEqual(0);
          expect(t.pValue).toBeLessThanOrEqual(1);
        }
        for (const p of [tests.fisher?.pValue, tests.monteCarlo?.pValue]) {
          if (p === undefined) continue;
          expect(p).toBeGreaterThan(0);
          expect(p).toBeLessThanOrEqual(1);
        }
        if (record.tests.pearson.statistic > 0) {
          expect(Math.abs(record.contributions.flat().reduce((s, v) => s + v, 0) - 1)).toBeLessThan(1e-12);
        }
        for (const row of record.percentages.row) expect(Math.abs(row.reduce((s, v) => s + v, 0) - 100)).toBeLessThan(1e-9);
        expect(Math.abs(record.percentages.total.flat().reduce((s, v) => s + v, 0) - 100)).toBeLessThan(1e-9);
        const vi = record.measures.cramersVInterval;
        if (vi) {
          expect(vi.lower).toBeLessThanOrEqual(vi.upper);
          expect(vi.upper).toBeLessThanOrEqual(1);
        }
        expect(record.expected.flat().reduce((s, v) => s + v, 0)).toBeCloseTo(record.n, 9);
      }),
      { numRuns: 150 },
    );
  });
});
