import { describe, expect, it } from 'vitest';
import { baseName, decimalYear, isoWeekMonday, keyOfLevel, keyOfName, orderOfFiles, orderOfLevels, readYears, waveScores } from '../../src/table/waveKeys.js';

describe('wave keys in file names and period levels', () => {
  it('ISO 8601 weeks: week 1 holds the first Thursday, so 2026-W01 starts on Monday 2025-12-29 and 2021-W01 on 2021-01-04', () => {
    expect(isoWeekMonday(2026, 1)).toEqual({ year: 2025, month: 12, day: 29 });
    expect(isoWeekMonday(2021, 1)).toEqual({ year: 2021, month: 1, day: 4 });
    expect(isoWeekMonday(2026, 5)).toEqual({ year: 2026, month: 1, day: 26 });
  });

  it('ISO 8601: a year has week 53 only when its last Thursday falls in week 53 (2020 and 2026 do, 2021 does not)', () => {
    expect(isoWeekMonday(2020, 53)).toEqual({ year: 2020, month: 12, day: 28 });
    expect(isoWeekMonday(2026, 53)).toEqual({ year: 2026, month: 12, day: 28 });
    expect(isoWeekMonday(2021, 53)).toBeNull();
    expect(keyOfName('export-2021-W53.csv')?.kind).toBe('number');
  });

  it('dates, weeks, months and plain numbers, the last one in the base name, directories and extensions left out', () => {
    expect(keyOfName('exports/2026/export-2026-01-05.csv')).toMatchObject({ kind: 'date', text: '2026-01-05' });
    expect(keyOfName('x_20260105.csv.gz')).toMatchObject({ kind: 'date', text: '20260105' });
    expect(keyOfName('week-2026-W05.parquet')).toMatchObject({ kind: 'week', text: '2026-W05' });
    expect(keyOfName('week-2026w5.csv')).toMatchObject({ kind: 'week', text: '2026w5' });
    expect(keyOfName('sales-2026-03.csv')).toMatchObject({ kind: 'month', text: '2026-03' });
    expect(keyOfName('data/2024-05-01/wave-12.csv')).toMatchObject({ kind: 'number', text: '12' });
    expect(keyOfName('before.csv')).toBeNull();
    expect(baseName('a/b/c.tsv.gz')).toBe('c');
  });

  it('a date that is not a calendar day is not a date (2026-02-30)', () => {
    expect(keyOfName('x-2026-02-30.csv')?.kind).not.toBe('date');
    expect(keyOfName('x-20261345.csv')?.kind).toBe('number');
  });

  it('period levels are keys only as a whole; four-digit numbers from 1800 to 2199 are years', () => {
    expect(keyOfLevel('2026-W05')?.kind).toBe('week');
    expect(keyOfLevel('wave 2026-W05')).toBeNull();
    expect(keyOfLevel('3')).toMatchObject({ kind: 'number', order: 3 });
    expect(readYears(['1974', '2016'].map(keyOfLevel)).map((k) => k?.kind)).toEqual(['year', 'year']);
    expect(readYears(['1974', '12'].map(keyOfLevel)).map((k) => k?.kind)).toEqual(['number', 'number']);
  });

  it('names order the files: weeks across a year end, numbers by value (week-9 before week-10), not by code point', () => {
    const weeks = ['w/2026-W02.csv', 'w/2025-W52.csv', 'w/2026-W01.csv'];
    const byWeek = orderOfFiles(weeks, 'auto');
    expect(byWeek.by).toBe('names');
    expect(byWeek.order.map((k) => weeks[k])).toEqual(['w/2025-W52.csv', 'w/2026-W01.csv', 'w/2026-W02.csv']);
    const numbers = ['week-10.csv', 'week-9.csv', 'week-11.csv'];
    expect(orderOfFiles(numbers, 'names').order.map((k) => numbers[k])).toEqual(['week-9.csv', 'week-10.csv', 'week-11.csv']);
  });

  it('auto keeps the given order when a name has no key; names refuses it; a collision or a mix of kinds is always a problem', () => {
    const named = ['before.csv', 'after.csv'];
    expect(orderOfFiles(named, 'auto')).toMatchObject({ by: 'given', order: [0, 1], problem: null });
    expect(orderOfFiles(named, 'names').problem).toMatch(/before\.csv has no date, week or number/);
    expect(orderOfFiles(['a-2026-W01.csv', 'b-2026-W01.csv'], 'auto').problem).toMatch(/carry the same week \(2026-W01\)/);
    expect(orderOfFiles(['a-2026-W01.csv', 'b-2026-01-12.csv'], 'auto').problem).toMatch(/mix kinds of key/);
    expect(orderOfFiles(['b-2.csv', 'a-1.csv'], 'given')).toMatchObject({ by: 'given', order: [0, 1] });
  });

  it('levels in natural order, or as listed', () => {
    expect(orderOfLevels(['2010', '1974', '1990']).levels).toEqual(['1974', '1990', '2010']);
    expect(orderOfLevels(['a', 'b', 'c'], ['c', 'a'])).toMatchObject({ levels: ['c', 'a'], by: 'listed', kind: null });
  });

  it('scores: dated waves in years (weeks 7/365.2425 of a year apart), other waves 0, 1, 2, …; even spacing on request', () => {
    const weeks = ['2026-W01', '2026-W02', '2026-W04'].map(keyOfLevel);
    const scores = waveScores(weeks, 'week', 'auto');
    expect(scores.unit).toBe('year');
    expect(scores.values[1] - scores.values[0]).toBeCloseTo(7 / 365.2425, 11);
    expect(scores.values[2] - scores.values[1]).toBeCloseTo(14 / 365.2425, 11);
    expect(waveScores(weeks, 'week', 'even')).toEqual({ values: [0, 1, 2], unit: 'wave' });
    const years = readYears(['1974', '1976'].map(keyOfLevel));
    expect(waveScores(years, 'year', 'auto')).toEqual({ values: [1974, 1976], unit: 'year' });
    expect(waveScores(['3', '7'].map(keyOfLevel), 'number', 'auto')).toEqual({ values: [0, 1], unit: 'wave' });
    expect(decimalYear(1970, 1, 1)).toBe(1970);
  });
});
