// The number rule of src/readableNumbers.ts: below 1,000 numbers are rounded by a
// fast path that must give exactly what the locale's formatter gives
// (ECMA-402 Intl.NumberFormat, en-US: the shortest decimal form rounded half
// away from zero), ties of the shortest form included.
import { describe, expect, it } from 'vitest';
import { formatPercent, formatStatistic } from '../src/readableNumbers.js';

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
