// Every statistic at the numerical edges (issue: "every statistic at 1e-10"):
// tables a few units off independence and with ordinary sampling noise at
// n = 1e6 … 1e12, and tables with a dominant cell (1e9 beside single digits),
// against values recorded by scripts/record_edges.py from each statistic's
// published definition in exact rational arithmetic (fractions.Fraction) and
// mpmath at 80 digits.
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { likelihoodRatioChiSquare, pearsonChiSquare, yatesChiSquare } from '../../src/stats/chiSquareTests.js';
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
import { adjustedResiduals, pearsonResiduals } from '../../src/stats/residuals.js';
import { oddsRatio, relativeRisk } from '../../src/stats/riskMeasures.js';
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
import { edges, expectClose } from '../helpers.js';

const TOLERANCE = 1e-10;

function everyStatistic(counts: number[][]): Record<string, unknown> {
  const r = counts.length;
  const c = counts[0].length;
  const n = counts.flat().reduce((s, v) => s + v, 0);
  const x2 = pearsonChiSquare(counts);
  return {
    pearson: x2,
    likelihoodRatio: likelihoodRatioChiSquare(counts),
    yates: yatesChiSquare(counts),
    phi: phiCoefficient(x2.statistic, n),
    contingencyC: contingencyCoefficient(x2.statistic, n),
    correctedC: correctedContingencyCoefficient(x2.statistic, n, r, c),
    cramersV: cramersV(x2.statistic, n, r, c),
    tschuprowT: tschuprowT(x2.statistic, n, r, c),
    biasCorrectedV: biasCorrectedCramersV(x2.statistic, n, r, c),
    yulesQ: yulesQ(counts),
    yulesY: yulesY(counts),
    signedPhi: signedPhi(counts),
    oddsRatio: oddsRatio(counts, 0.95),
    relativeRisk: relativeRisk(counts, 0.95),
    lambdaColsGivenRows: lambdaColsGivenRows(counts),
    lambdaRowsGivenCols: lambdaRowsGivenCols(counts),
    lambdaSymmetric: lambdaSymmetric(counts),
    gkTauColsGivenRows: goodmanKruskalTauColsGivenRows(counts),
    gkTauRowsGivenCols: goodmanKruskalTauRowsGivenCols(counts),
    uncertaintyColsGivenRows: uncertaintyColsGivenRows(counts),
    uncertaintyRowsGivenCols: uncertaintyRowsGivenCols(counts),
    uncertaintySymmetric: uncertaintySymmetric(counts),
    ordinal: ordinalMeasures(counts),
    linearByLinear: linearByLinear(counts),
    residualsPearson: pearsonResiduals(counts),
    residualsAdjusted: adjustedResiduals(counts),
  };
}

/** Every number the reference holds, with the value at the same place in `actual`. */
function* pairs(reference: unknown, actual: unknown, path: string): Generator<[string, number, unknown]> {
  if (reference === null || reference === undefined) return;
  if (typeof reference === 'number') {
    yield [path, reference, actual];
    return;
  }
  const sub = (key: string | number) => (actual as Record<string | number, unknown> | null | undefined)?.[key];
  if (Array.isArray(reference)) {
    for (let k = 0; k < reference.length; k++) yield* pairs(reference[k], sub(k), `${path}[${k}]`);
    return;
  }
  for (const [key, value] of Object.entries(reference as Record<string, unknown>)) yield* pairs(value, sub(key), `${path}.${key}`);
}

describe('every statistic within 1e-10 of exact rational or 80-digit references (scripts/record_edges.py)', () => {
  it('the fixture covers n = 1e6 … 1e12 near independence and dominant cells', () => {
    const near = edges.tables.filter((t) => t.regime === 'near-independence');
    const totals = near.map((t) => t.counts.flat().reduce((s, v) => s + v, 0));
    expect(Math.min(...totals)).toBeLessThan(2e6);
    expect(Math.max(...totals)).toBeGreaterThan(5e11);
    expect(edges.tables.filter((t) => t.regime === 'dominant-cell').length).toBeGreaterThanOrEqual(5);
  });

  for (const table of edges.tables) {
    it(`${table.name}`, () => {
      const actual = everyStatistic(table.counts);
      let checked = 0;
      for (const key of Object.keys(table)) {
        if (key === 'name' || key === 'regime' || key === 'counts') continue;
        for (const [path, expected, value] of pairs(table[key], actual[key], key)) {
          if (typeof value !== 'number') throw new Error(`${path}: expected ${expected}, got ${String(value)}`);
          try {
            expectClose(value, expected, TOLERANCE);
          } catch (error) {
            throw new Error(`${path}: ${(error as Error).message}`);
          }
          checked++;
        }
      }
      expect(checked).toBeGreaterThan(40);
    });
  }
});

describe('measures that are small stay small, never negative (property)', () => {
  it('tau and U are ≥ 0 on tables at exact independence scaled up to 1e12, plus a nudge', () => {
    const margin = fc.array(fc.integer({ min: 1, max: 9 }), { minLength: 2, maxLength: 4 });
    fc.assert(
      fc.property(margin, margin, fc.integer({ min: 6, max: 12 }), fc.integer({ min: -3, max: 3 }), (p, q, exponent, nudge) => {
        const scale = 10 ** exponent;
        const counts = p.map((pi) => q.map((qj) => pi * qj * scale));
        counts[0][0] += nudge;
        counts[0][1] -= nudge;
        for (const f of [goodmanKruskalTauColsGivenRows, goodmanKruskalTauRowsGivenCols, uncertaintyColsGivenRows, uncertaintyRowsGivenCols, uncertaintySymmetric]) {
          const v = f(counts);
          expect(v).not.toBeNull();
          expect(v).toBeGreaterThanOrEqual(0);
          if (nudge === 0) expect(v).toBe(0);
        }
      }),
      { numRuns: 150, seed: 141 },
    );
  });
});

describe("bias-corrected V (Bergsma 2013) where φ² equals the correction exactly", () => {
  it('is 0 for [[0, 1], [5, 4]], where φ² = 1/(n − 1) exactly, not the 3.95e-9 of rounding noise', () => {
    const t = [
      [0, 1],
      [5, 4],
    ];
    // φ² = (ad − bc)²/(n1. n2. n.1 n.2) = 25/225 = 1/9 and (r − 1)(c − 1)/(n − 1) = 1/9
    expect(biasCorrectedCramersV(pearsonChiSquare(t).statistic, 10, 2, 2)).toBe(0);
  });
});
