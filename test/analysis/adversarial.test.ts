// No valid table may end in an internal error: the whole analysis runs on
// tables built to sit at the numerical edges (huge counts up to and past
// 2^53, a dominant cell beside single digits, exact independence scaled up,
// zeros, fractional weighted sums, weights near the range of doubles), and
// must return a record whose numbers are finite or null, an infinite
// interval bound aside (null in JSON; docs/json.md) (common practice:
// "never a stack trace, a hang or a silent loss").
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeTable, DEFAULT_ANALYSIS_OPTIONS } from '../../src/analysis/analyzeTable.js';
import type { Weighting } from '../../src/table/weighting.js';

const table = (counts: number[][]) => ({
  rowName: 'r',
  colName: 'c',
  rowLevels: counts.map((_r, i) => `r${i}`),
  colLevels: counts[0].map((_c, j) => `c${j}`),
  counts,
});

const magnitude = fc.oneof(
  fc.integer({ min: 0, max: 9 }),
  fc.integer({ min: 6, max: 16 }).chain((e) => fc.integer({ min: -5, max: 5 }).map((d) => Math.max(0, 10 ** e + d))),
  fc.constantFrom(2 ** 53 - 1, 2 ** 53, 2 ** 53 + 2, 1e15 + 1, 9.007e15, 4e15),
  // weighted sums: fractional, from a thousandth up (a cell of 1e-320 beside 1e15 is not a table anyone has)
  fc.double({ min: 1e-3, max: 1e12, noNaN: true, noDefaultInfinity: true }),
);

const counts = fc
  .tuple(fc.integer({ min: 2, max: 4 }), fc.integer({ min: 2, max: 4 }))
  .chain(([r, c]) => fc.array(fc.array(magnitude, { minLength: c, maxLength: c }), { minLength: r, maxLength: r }))
  .filter((t) => t.every((row) => row.some((v) => v > 0)) && t[0].every((_v, j) => t.some((row) => row[j] > 0)));

/** Independence built in: n p_i q_j at a large scale, one cell nudged. */
const nearIndependence = fc
  .tuple(
    fc.array(fc.integer({ min: 1, max: 9 }), { minLength: 2, maxLength: 4 }),
    fc.array(fc.integer({ min: 1, max: 9 }), { minLength: 2, maxLength: 4 }),
    fc.integer({ min: 3, max: 15 }),
    fc.integer({ min: -2, max: 2 }),
  )
  .map(([p, q, e, nudge]) => {
    const t = p.map((pi) => q.map((qj) => pi * qj * 10 ** e));
    t[0][0] += nudge;
    t[0][1] -= nudge;
    return t;
  });

const dominant = fc
  .tuple(fc.integer({ min: 2, max: 4 }), fc.integer({ min: 2, max: 4 }), fc.integer({ min: 6, max: 15 }), fc.nat(15))
  .map(([r, c, e, seed]) => Array.from({ length: r }, (_x, i) => Array.from({ length: c }, (_y, j) => (i === 0 && j === 0 ? 10 ** e : 1 + ((seed + 3 * i + 5 * j) % 9)))));

const weighting = fc.constantFrom<'none' | 'freq' | 'weight'>('none', 'freq', 'weight');

function weightingFor(kind: 'none' | 'freq' | 'weight', t: number[][]): Weighting {
  const cells = t.flat();
  const n = cells.reduce((s, v) => s + v, 0);
  if (kind === 'none') return { kind, sumWeights: n, sumSquaredWeights: n, unweightedN: n };
  // as if each cell were one row of that weight
  const squares = cells.reduce((s, v) => s + v * v, 0);
  return { kind, sumWeights: n, sumSquaredWeights: kind === 'weight' ? squares : n, unweightedN: cells.length };
}

function* numbersIn(value: unknown, path: string): Generator<[string, number]> {
  if (typeof value === 'number') yield [path, value];
  else if (Array.isArray(value)) for (let k = 0; k < value.length; k++) yield* numbersIn(value[k], `${path}[${k}]`);
  else if (value !== null && typeof value === 'object') for (const [key, v] of Object.entries(value)) yield* numbersIn(v, `${path}.${key}`);
}

const options = { ...DEFAULT_ANALYSIS_OPTIONS, ordinal: true, simulations: 200, seed: 1, exactWorkLimit: 20_000 };

describe('the whole analysis on adversarial tables (property)', () => {
  it('returns a record with no NaN and finite numbers (bar interval bounds) for every table, weighted or not', () => {
    fc.assert(
      fc.property(fc.oneof(counts, nearIndependence, dominant), weighting, (t, kind) => {
        const w = weightingFor(kind, t);
        if (kind === 'freq' && t.flat().some((v) => !Number.isInteger(v))) return; // frequencies are whole numbers
        if (kind === 'weight' && !(Number.isFinite(w.sumSquaredWeights) && w.sumSquaredWeights > 0)) return; // refused in one line (tested below)
        const record = analyzeTable(table(t), 0, options, w);
        for (const [path, v] of numbersIn(record, 'record')) {
          // an interval bound or a ratio may be infinite (null in JSON, as docs/json.md says); nothing is NaN
          const mayBeInfinite = /^record\.measures\.(oddsRatio|relativeRisk)\./.test(path);
          if (Number.isNaN(v) || (!mayBeInfinite && !Number.isFinite(v))) throw new Error(`${path} is ${v} for ${JSON.stringify(t)} (${kind})`);
        }
        const p = record.findings.primaryTest.pValue;
        expect(p).toBeGreaterThanOrEqual(0);
        expect(p).toBeLessThanOrEqual(1);
      }),
      { numRuns: 300, seed: 13 },
    );
  });

  it('refuses weights whose sums or squares leave the range of doubles, in one line (never a dropped level)', () => {
    const huge = [
      [1e308, 1e308],
      [1, 2],
    ];
    huge[0][0] = Infinity; // what 1e308 + 1e308 becomes
    expect(() => analyzeTable(table(huge), 0, options, { kind: 'weight', sumWeights: Infinity, sumSquaredWeights: Infinity, unweightedN: 5 })).toThrow(/add up beyond the largest number/);
    const squares = [
      [2e160, 1e160],
      [1e160, 2e160],
    ];
    expect(() => analyzeTable(table(squares), 0, options, { kind: 'weight', sumWeights: 6e160, sumSquaredWeights: Infinity, unweightedN: 6 })).toThrow(/squares of the --weight values overflow/);
    // weights near 1e150: Σw² is finite, (Σw)² alone would overflow; the effective size is scale-free
    const large = analyzeTable(table([[1e150, 2e150], [1e150, 3e150]]), 0, options, { kind: 'weight', sumWeights: 7e150, sumSquaredWeights: 15e300, unweightedN: 4 });
    expect(large.effectiveN).toBeCloseTo(49 / 15, 12);
  });
});
