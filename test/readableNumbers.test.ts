// The number rule of src/readableNumbers.ts: numbers are rounded and grouped by a
// fast path that must give exactly what the locale's formatter gives
// (ECMA-402 Intl.NumberFormat, en-US: the shortest decimal form rounded half
// away from zero, thousands grouped by commas), ties of the shortest form included.
import { describe, expect, it } from 'vitest';
import { formatCount, formatPercent, formatStatistic } from '../src/readableNumbers.js';

const byLocale = (x: number, digits: number) => x.toLocaleString('en-US', { minimumFractionDigits: digits, maximumFractionDigits: digits }).replace(/-/g, '−');

describe('numbers below 1,000: the fast rounding equals Intl.NumberFormat (ECMA-402)', () => {
  it('ties of the shortest decimal form round away from zero, as the locale formatter does (1.005 → 1.01, 2.675 → 2.68, −2.5 → −3)', () => {
    expect(formatStatistic(1.005, 2)).toBe('1.01');
    expect(formatStatistic(2.675, 2)).toBe('2.68');
    expect(formatStatistic(-2.5, 0)).toBe('−3');
    expect(formatPercent(99.95, 1)).toBe('100.0%');
    expect(formatStatistic(-0.004, 2)).toBe(byLocale(-0.004, 2));
  });

  it('agrees on 8,000 values of many sizes and 0–3 decimals (seeded)', () => {
    let state = 12345;
    const next = () => ((state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 2 ** 32);
    const values: number[] = [];
    for (let i = 0; i < 1000; i++) values.push((next() - 0.5) * 2000 * next() ** 3, Math.round(next() * 1e5) / 1000);
    for (const x of values) for (const digits of [0, 1, 2, 3]) expect(formatStatistic(x, digits)).toBe(byLocale(x, digits));
  });
});

describe('numbers of every size: the fast rounding and grouping equal Intl.NumberFormat (ECMA-402, en-US)', () => {
  it('groups thousands as the locale formatter does (1,000; 1,234,567.5; −12,345; 9,007,199,254,740,991)', () => {
    expect(formatCount(1000)).toBe('1,000');
    expect(formatCount(1234567.5)).toBe('1,234,567.5');
    expect(formatCount(-12345)).toBe('−12,345');
    expect(formatCount(2 ** 53 - 1)).toBe(byLocale(2 ** 53 - 1, 0));
    expect(formatCount(1e21)).toBe(byLocale(1e21, 0));
  });

  it('agrees on 40,000 values from 1e−7 to 1e22, whole and fractional, with 0–3 decimals (seeded)', () => {
    let state = 777;
    const next = () => ((state = (Math.imul(state, 1103515245) + 12345) >>> 0) / 2 ** 32);
    for (let i = 0; i < 2500; i++) {
      const size = 10 ** (Math.floor(next() * 30) - 7);
      const values = [(next() - 0.5) * 2 * size, Math.round(next() * size), Math.round(next() * size * 10) / 10 + 0.05, -Math.round(next() * size)];
      for (const x of values) {
        expect(formatCount(x)).toBe(byLocale(x, Number.isInteger(x) ? 0 : 1));
        for (const digits of [0, 2, 3]) expect(formatPercent(x, digits)).toBe(`${byLocale(x, digits)}%`);
      }
    }
  });
});
