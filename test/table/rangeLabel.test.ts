import { describe, expect, it } from 'vitest';
import { parseRangeLabel, rangeContains, rangeOverlap } from '../../src/table/rangeLabel.js';

// The grammar of range-like labels is common practice in survey and census tables; no single source.
const range = (label: string) => {
  const r = parseRangeLabel(label);
  return r === null ? null : [r.lowerClosed ? '[' : '(', r.lower, r.upper, r.upperClosed ? ']' : ')', r.unit];
};

describe('range-like labels', () => {
  it('reads the forms of the grammar as intervals', () => {
    expect(range('16')).toEqual(['[', 16, 16, ']', '']);
    expect(range('12-15')).toEqual(['[', 12, 15, ']', '']);
    expect(range('12–15 yrs')).toEqual(['[', 12, 15, ']', 'yrs']);
    expect(range('<12')).toEqual(['(', -Infinity, 12, ')', '']);
    expect(range('<= 12')).toEqual(['(', -Infinity, 12, ']', '']);
    expect(range('≤12')).toEqual(['(', -Infinity, 12, ']', '']);
    expect(range('>16')).toEqual(['(', 16, Infinity, ')', '']);
    expect(range('>=65')).toEqual(['[', 65, Infinity, ')', '']);
    expect(range('65+')).toEqual(['[', 65, Infinity, ')', '']);
    expect(range('under 18')).toEqual(['(', -Infinity, 18, ')', '']);
    expect(range('Under 18 years')).toEqual(['(', -Infinity, 18, ')', 'years']);
    expect(range('75 years and over')).toEqual(['[', 75, Infinity, ')', 'years']);
    expect(range('5 hours or less')).toEqual(['(', -Infinity, 5, ']', 'hours']);
    expect(range('18 to under 25')).toEqual(['[', 18, 25, ')', '']);
    expect(range('25 to <35')).toEqual(['[', 25, 35, ')', '']);
    expect(range('between 5 and 10')).toEqual(['[', 5, 10, ']', '']);
    expect(range('$10,000-$19,999')).toEqual(['[', 10000, 19999, ']', '']);
    expect(range('$10k-$20k')).toEqual(['[', 10000, 20000, ']', '']);
    expect(range('-5–-1')).toEqual(['[', -5, -1, ']', '']);
    expect(range('< -5')).toEqual(['(', -Infinity, -5, ')', '']);
    expect(range('50%')).toEqual(['[', 50, 50, ']', '%']);
  });
  it('leaves names, codes with text, dates and reversed ranges alone', () => {
    for (const label of ['item 2', 'Q3', '1 - Strongly disagree', '2024-06', '15-12', 'a, b', '(missing)', 'NA', '', 'and 5', '5 and', '1.2.3', '12-', '-']) expect(range(label)).toBeNull();
  });
  it('tells whether intervals hold a number and where two overlap', () => {
    const teen = parseRangeLabel('13-19')!;
    expect(rangeContains(teen, 13)).toBe(true);
    expect(rangeContains(teen, 19.5)).toBe(false);
    expect(rangeContains(parseRangeLabel('<18')!, 18)).toBe(false);
    expect(rangeOverlap(parseRangeLabel('18-64')!, parseRangeLabel('>=60')!)).toBe(60);
    expect(rangeOverlap(parseRangeLabel('<18')!, parseRangeLabel('18-64')!)).toBeNull();
    expect(rangeOverlap(parseRangeLabel('18-64')!, parseRangeLabel('>64')!)).toBeNull();
    expect(rangeOverlap(parseRangeLabel('18-64')!, parseRangeLabel('64+')!)).toBe(64);
    expect(rangeOverlap(parseRangeLabel('>10')!, parseRangeLabel('<12')!)).toBe(11);
  });
});
