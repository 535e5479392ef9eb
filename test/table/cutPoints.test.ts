import { describe, expect, it } from 'vitest';
import { binNumericLevels, cutPointBins, equalFrequencyBins, equalFrequencyBinsFromCounts, parseCuts } from '../../src/table/bins.js';
import { compareNatural } from '../../src/table/naturalOrder.js';
import { TabsightError } from '../../src/errors.js';

// Bins closed on the left, open on the right: the usual reading of age brackets (common practice).
describe('cut-point bins', () => {
  const ages = Float64Array.from([17, 18, 24, 25, 34, 35, 49, 50, 80, Number.NaN]);
  it('puts x < c1, c1 ≤ x < c2, …, x ≥ ck into bins labelled as ranges of whole numbers', () => {
    const binning = cutPointBins(ages, [18, 25, 35, 50]);
    expect(binning.labels).toEqual(['<18', '18–24', '25–34', '35–49', '50+']);
    expect(Array.from(binning.codes)).toEqual([1, 2, 2, 3, 3, 4, 4, 5, 5, 0]);
    expect(binning.empty).toEqual([]);
  });
  it('keeps only occupied bins and names the empty ones', () => {
    const binning = cutPointBins(Float64Array.from([20, 30, 31]), [18, 25, 35, 50]);
    expect(binning.labels).toEqual(['18–24', '25–34']);
    expect(Array.from(binning.codes)).toEqual([1, 2, 2]);
    expect(binning.empty).toEqual(['<18', '35–49', '50+']);
  });
  it('writes "a to <b" when values or cuts are not whole numbers, and a one-number bin as that number', () => {
    expect(cutPointBins(Float64Array.from([1.5, 2.5, 3.5]), [2, 3]).labels).toEqual(['<2', '2 to <3', '3+']);
    expect(cutPointBins(Float64Array.from([4, 5, 6]), [5, 6]).labels).toEqual(['<5', '5', '6+']);
  });
  it('labels of both kinds of bins sort in natural order', () => {
    const cut = cutPointBins(ages, [18, 25, 35, 50]).labels;
    expect([...cut].reverse().sort(compareNatural)).toEqual(cut);
    const values = Float64Array.from({ length: 200 }, (_v, i) => (i * 37) % 101 - 20.5);
    const equal = equalFrequencyBins(values, 5).labels;
    expect([...equal].reverse().sort(compareNatural)).toEqual(equal);
  });
  it('parses --cuts and refuses edges that do not increase or are not numbers', () => {
    expect(parseCuts('age:18,25,35,50')).toEqual({ column: 'age', cuts: [18, 25, 35, 50] });
    expect(parseCuts('time:a:1.5, 2')).toEqual({ column: 'time:a', cuts: [1.5, 2] });
    expect(() => parseCuts('age:18,18')).toThrow(TabsightError);
    expect(() => parseCuts('age:25,18')).toThrow('cut points must increase (25 then 18)');
    expect(() => parseCuts('age:18,x')).toThrow('"x" is not a number');
    expect(() => parseCuts('age')).toThrow('expected column:edge');
    expect(() => parseCuts('age:')).toThrow('at least one cut point');
  });
});

describe('equal-frequency bins from value counts', () => {
  it('equal the bins of the rows they stand for (property: random values with repeats, every k)', async () => {
    const fc = (await import('fast-check')).default;
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.integer({ min: -50, max: 50 }), fc.integer({ min: 1, max: 6 })), { minLength: 1, maxLength: 40 }), fc.integer({ min: 2, max: 8 }), (entries, k) => {
        const byValue = new Map<number, number>();
        for (const [v, c] of entries) byValue.set(v / 4, (byValue.get(v / 4) ?? 0) + c);
        const values = [...byValue.keys()];
        const counts = values.map((v) => byValue.get(v) as number);
        const rows = Float64Array.from(values.flatMap((v, i) => new Array<number>(counts[i]).fill(v)));
        const direct = equalFrequencyBins(rows, k);
        const fromCounts = equalFrequencyBinsFromCounts(values, counts, k);
        expect(fromCounts.labels).toEqual(direct.labels);
        let r = 0;
        values.forEach((_v, i) => {
          for (let c = 0; c < counts[i]; c++) expect(fromCounts.binOf[i]).toBe(direct.codes[r++]);
        });
      }),
      { numRuns: 300 },
    );
  });
});

describe('binning a column\'s levels (the one rule of pair --bins and scan --bins)', () => {
  const apart = (level: string) => level === 'NA' || level === '(missing)';
  it('cuts the numbers as equalFrequencyBins cuts their rows, and keeps levels set apart beside the bins, "(missing)" last', () => {
    const levels = ['34', 'NA', '51', '(missing)', '18', '65', '40', '29'];
    const rows = [3, 2, 4, 1, 2, 5, 3, 1];
    const numbers = Float64Array.from(levels.flatMap((l, i) => (apart(l) ? [] : new Array<number>(rows[i]).fill(Number(l)))));
    const direct = equalFrequencyBins(numbers, 3);
    const binning = binNumericLevels(levels, rows, 3, apart);
    expect(binning).not.toBeNull();
    expect(binning!.order).toEqual([...direct.labels, 'NA', '(missing)']);
    expect(binning!.apart).toEqual(['NA', '(missing)']);
    levels.forEach((level, i) => {
      if (apart(level)) expect(binning!.labelOf[i]).toBe(level);
      else expect(binning!.labelOf[i]).toBe(direct.labels[direct.codes[numbers.indexOf(Number(level))] - 1]);
    });
  });
  it('leaves a column alone that has a level neither a number nor set apart, or at most k numbers with rows', () => {
    expect(binNumericLevels(['1', '2', '3', 'many'], [1, 1, 1, 1], 2, apart)).toBeNull();
    expect(binNumericLevels(['1', '2', '3', 'NA'], [1, 1, 1, 9], 3, apart)).toBeNull();
    expect(binNumericLevels(['1', '2', '3', '4'], [1, 1, 1, 0], 3, apart)).toBeNull();
    expect(binNumericLevels(['NA'], [4], 2, apart)).toBeNull();
    // Four rows, k = 3: edges at the sorted rows ⌈i·4/3⌉ (0-based) = 0, 2, 3, that is 1, 3 and 4.
    expect(binNumericLevels(['1', '2', '3', '4'], [1, 1, 1, 1], 3, apart)?.order).toEqual(['1–2', '3', '4']);
  });
});
