import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { linearByLinear, ordinalMeasures } from '../../src/stats/ordinal.js';
import {
  goodmanKruskalTauColsGivenRows,
  goodmanKruskalTauRowsGivenCols,
  lambdaColsGivenRows,
  lambdaRowsGivenCols,
  lambdaSymmetric,
  uncertaintyColsGivenRows,
  uncertaintyRowsGivenCols,
  uncertaintySymmetric,
} from '../../src/stats/predictive.js';
import { contingencyTables, edges, expectClose, reference } from '../helpers.js';

const jobSatisfaction = [
  [1, 2, 1, 0],
  [3, 3, 6, 1],
  [10, 10, 14, 9],
  [6, 7, 12, 11],
];

describe('ordinal measures', () => {
  it('job satisfaction by income: gamma ≈ 0.221 with standard error ≈ 0.117, equal to the exact-rational evaluation of Brown & Benedetti (1977) (scripts/record_edges.py)', () => {
    const m = ordinalMeasures(jobSatisfaction);
    const recorded = edges.tables.find((t) => t.name.startsWith('job satisfaction by income'))!.ordinal as Record<string, { estimate: number; standardError: number; z: number }>;
    for (const key of ['gamma', 'kendallTauB', 'kendallTauC', 'somersDColsGivenRows', 'somersDRowsGivenCols'] as const) {
      expectClose(m[key].estimate, recorded[key].estimate, 1e-12);
      expectClose(m[key].standardError, recorded[key].standardError, 1e-12);
      expectClose(m[key].z, recorded[key].z, 1e-12);
    }
    expect(m.gamma.estimate).toBeCloseTo(0.221, 3);
    expect(m.gamma.standardError).toBeCloseTo(0.117, 3);
  });

  for (const table of reference.tables.filter((t) => t.somersDColsGivenRows !== undefined)) {
    it(`${table.name}: Somers' d both ways and Kendall's tau-b, tau-c agree with scipy (recorded)`, () => {
      const m = ordinalMeasures(table.counts);
      expectClose(m.somersDColsGivenRows.estimate, table.somersDColsGivenRows!, 1e-10);
      expectClose(m.somersDRowsGivenCols.estimate, table.somersDRowsGivenCols!, 1e-10);
      expectClose(m.kendallTauB.estimate, table.kendallTauB!, 1e-10);
      expectClose(m.kendallTauC.estimate, table.kendallTauC!, 1e-10);
    });
  }

  it('linear-by-linear M² = (n − 1) r² (Mantel 1963) for integer scores', () => {
    const t = [
      [10, 5],
      [5, 10],
    ];
    // r for a 2×2 table is signed phi = (ad − bc)/√(product of margins)
    const r = (100 - 25) / Math.sqrt(15 * 15 * 15 * 15);
    expectClose(linearByLinear(t)?.statistic, 29 * r * r, 1e-12);
  });

  const ordered = contingencyTables(5, 5, 30);

  it('gamma and tau-b lie in [−1, 1]; reversing one variable flips the sign of every ordinal measure (property)', () => {
    fc.assert(
      fc.property(ordered, (t) => {
        const m = ordinalMeasures(t);
        const flipped = ordinalMeasures([...t].reverse());
        for (const key of ['gamma', 'kendallTauB', 'kendallTauC', 'somersDColsGivenRows', 'somersDRowsGivenCols'] as const) {
          const e = m[key].estimate;
          if (e === null) continue;
          expect(Math.abs(e)).toBeLessThanOrEqual(1 + 1e-12);
          expect(Math.abs((flipped[key].estimate as number) + e)).toBeLessThan(1e-12);
        }
      }),
      { numRuns: 200 },
    );
  });
});

describe('predictive (proportional reduction in error) measures', () => {
  it('lambda by hand (Goodman & Kruskal 1954): rows [[30,10],[5,25]]', () => {
    const t = [
      [30, 10],
      [5, 25],
    ];
    // predicting columns: without the rows guess either column (35 each) → 35 errors;
    // with them guess column 1 in row 1 (10 errors) and column 2 in row 2 (5) → 15 errors
    expectClose(lambdaColsGivenRows(t), (35 - 15) / 35, 1e-15);
    // predicting rows: without the columns guess row 1 (40) → 30 errors; with them
    // guess row 1 in column 1 (5 errors) and row 2 in column 2 (10) → 15 errors
    expectClose(lambdaRowsGivenCols(t), (30 - 15) / 30, 1e-15);
    // symmetric: (35 − 15 + 30 − 15) / (35 + 30)
    expectClose(lambdaSymmetric(t), (35 - 15 + 30 - 15) / (35 + 30), 1e-15);
  });

  it('Goodman–Kruskal tau and the uncertainty coefficient are 0 under independence and 1 under perfect prediction', () => {
    const independent = [
      [10, 20],
      [20, 40],
    ];
    const perfect = [
      [10, 0],
      [0, 20],
    ];
    expect(Math.abs(goodmanKruskalTauColsGivenRows(independent) as number)).toBeLessThan(1e-12);
    expect(Math.abs(uncertaintySymmetric(independent) as number)).toBeLessThan(1e-12);
    expectClose(goodmanKruskalTauRowsGivenCols(perfect), 1, 1e-12);
    expectClose(uncertaintyColsGivenRows(perfect), 1, 1e-12);
    expectClose(uncertaintyRowsGivenCols(perfect), 1, 1e-12);
  });

  it('lambda, tau and U lie in [0, 1] on random tables (property)', () => {
    const tables = contingencyTables(5, 5, 40);
    fc.assert(
      fc.property(tables, (t) => {
        for (const f of [lambdaColsGivenRows, lambdaRowsGivenCols, lambdaSymmetric, goodmanKruskalTauColsGivenRows, goodmanKruskalTauRowsGivenCols, uncertaintyColsGivenRows, uncertaintyRowsGivenCols, uncertaintySymmetric]) {
          const v = f(t);
          if (v === null) continue;
          expect(v).toBeGreaterThanOrEqual(-1e-12);
          expect(v).toBeLessThanOrEqual(1 + 1e-12);
        }
      }),
      { numRuns: 200 },
    );
  });
});
