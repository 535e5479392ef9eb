import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { pearsonChiSquare } from '../../src/stats/chiSquareTests.js';
import { transpose } from '../../src/stats/contingency.js';
import {
  biasCorrectedCramersV,
  contingencyCoefficient,
  correctedContingencyCoefficient,
  cramersV,
  phiCoefficient,
  signedPhi,
  tschuprowT,
  yulesQ,
  yulesY,
} from '../../src/stats/strength.js';
import { contingencyTables, expectClose, reference } from '../helpers.js';

function measuresOf(counts: number[][]) {
  const x2 = pearsonChiSquare(counts).statistic;
  const n = counts.flat().reduce((s, v) => s + v, 0);
  const r = counts.length;
  const c = counts[0].length;
  return {
    phi: phiCoefficient(x2, n),
    C: contingencyCoefficient(x2, n),
    correctedC: correctedContingencyCoefficient(x2, n, r, c),
    V: cramersV(x2, n, r, c),
    T: tschuprowT(x2, n, r, c),
    biasCorrectedV: biasCorrectedCramersV(x2, n, r, c),
  };
}

describe('against scipy.stats.contingency.association (recorded fixture)', () => {
  for (const table of reference.tables) {
    it(`${table.name}: Cramér's V, Tschuprow's T, Pearson's C`, () => {
      const m = measuresOf(table.counts);
      expectClose(m.V, table.cramersV, 1e-10);
      expectClose(m.T, table.tschuprowT, 1e-10);
      expectClose(m.C, table.contingencyC, 1e-10);
    });
  }
});

describe('published definitions', () => {
  it("Yule's Q = (ad − bc)/(ad + bc) and Yule's Y (Yule 1900, 1912)", () => {
    const t = [
      [10, 20],
      [30, 40],
    ];
    expectClose(yulesQ(t), (400 - 600) / (400 + 600), 1e-15);
    expectClose(yulesY(t), (Math.sqrt(400) - Math.sqrt(600)) / (Math.sqrt(400) + Math.sqrt(600)), 1e-15);
    expect(yulesQ([[1, 2, 3], [4, 5, 6]])).toBeNull();
  });

  it('for 2×2 tables |signed phi| = phi = V (Cramér 1946 §21.9)', () => {
    const t = [
      [25, 10],
      [8, 30],
    ];
    const m = measuresOf(t);
    expectClose(Math.abs(signedPhi(t) as number), m.phi as number, 1e-12);
    expectClose(m.V, m.phi as number, 1e-12);
  });

  it('corrected C reaches 1 for a perfect square association (Sakoda 1977)', () => {
    const t = [
      [10, 0, 0],
      [0, 10, 0],
      [0, 0, 10],
    ];
    expectClose(measuresOf(t).correctedC, 1, 1e-12);
    expectClose(measuresOf(t).V, 1, 1e-12);
  });

  it('bias-corrected V follows Bergsma (2013) term by term', () => {
    const t = [
      [20, 15, 5],
      [10, 25, 30],
    ];
    const x2 = pearsonChiSquare(t).statistic;
    const n = 105;
    const phi2 = Math.max(0, x2 / n - (1 * 2) / (n - 1));
    const rTilde = 2 - 1 / (n - 1);
    const cTilde = 3 - 4 / (n - 1);
    expectClose(biasCorrectedCramersV(x2, n, 2, 3), Math.sqrt(phi2 / Math.min(rTilde - 1, cTilde - 1)), 1e-14);
  });

  it('measures are null, not NaN, when undefined', () => {
    expect(cramersV(0, 0, 2, 2)).toBeNull();
    expect(yulesQ([[0, 1], [0, 1]])).toBeNull();
  });
});

const tableArbitrary = contingencyTables(5, 5, 60);

describe('properties on random tables (fast-check)', () => {
  it('0 ≤ V, T, corrected C, bias-corrected V ≤ 1 and |Q| ≤ 1', () => {
    fc.assert(
      fc.property(tableArbitrary, (t) => {
        const m = measuresOf(t);
        for (const v of [m.V, m.T, m.correctedC, m.biasCorrectedV]) {
          if (v !== null) {
            expect(v).toBeGreaterThanOrEqual(0);
            expect(v).toBeLessThanOrEqual(1 + 1e-12);
          }
        }
        const q = yulesQ(t);
        if (q !== null) expect(Math.abs(q)).toBeLessThanOrEqual(1);
      }),
      { numRuns: 300 },
    );
  });

  it('swapping rows and columns, or reordering levels, leaves every nominal measure unchanged', () => {
    fc.assert(
      fc.property(tableArbitrary, fc.integer(), (t, seed) => {
        const base = measuresOf(t);
        const swapped = measuresOf(transpose(t));
        // a permutation of the columns drawn from the seed (Fisher–Yates), and the rows reversed
        const order = t[0].map((_v, j) => j);
        let s = seed >>> 0;
        for (let k = order.length - 1; k > 0; k--) {
          s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
          const pick = s % (k + 1);
          [order[k], order[pick]] = [order[pick], order[k]];
        }
        const reordered = measuresOf([...t].reverse().map((row) => order.map((j) => row[j])));
        const rotatedMeasures = measuresOf([...t.slice(1), t[0]]);
        for (const key of Object.keys(base) as (keyof typeof base)[]) {
          for (const other of [swapped, reordered, rotatedMeasures]) {
            if (base[key] === null) expect(other[key]).toBeNull();
            else expect(Math.abs((other[key] as number) - (base[key] as number))).toBeLessThan(1e-9);
          }
        }
      }),
      { numRuns: 200 },
    );
  });
});
