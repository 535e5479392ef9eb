import { describe, expect, it } from 'vitest';
import { compareNatural } from '../../src/table/naturalOrder.js';
import { orderLevels } from '../../src/table/twoWayTable.js';

describe('natural level order (common practice, locale-free)', () => {
  it('orders numbers numerically, "item 2" before "item 10", others by code point', () => {
    const levels = ['item 10', '10', 'item 2', '2', 'b', 'B', '-1.5', 'item 1', 'Ä', 'a'];
    expect([...levels].sort(compareNatural)).toEqual(['-1.5', '2', '10', 'B', 'a', 'b', 'item 1', 'item 2', 'item 10', 'Ä']);
  });
  it('keeps a requested order and appends the rest naturally; reports unknown levels', () => {
    expect(orderLevels(['low', 'high', 'mid', 'other'], ['low', 'mid', 'high', 'typo'])).toEqual({ order: ['low', 'mid', 'high', 'other'], unknown: ['typo'] });
  });
});

describe('natural order of range-like labels (common practice: age and income brackets of survey and census tables)', () => {
  const sorted = (levels: string[]) => [...levels].sort(compareNatural);
  it('the rule: numbers and ranges by their place on the number line, a closed bound before an open one, then everything else', () => {
    expect(sorted(['16 yrs', '>16 yrs', '<12 yrs', '12-15 yrs'])).toEqual(['<12 yrs', '12-15 yrs', '16 yrs', '>16 yrs']);
    expect(sorted(['65+', '18-24', 'under 18', '25-64'])).toEqual(['under 18', '18-24', '25-64', '65+']);
    expect(sorted(['>16', '16', '12-15', '<12'])).toEqual(['<12', '12-15', '16', '>16']);
  });
  it('words around the numbers: "under", "to", "and over", units after the number', () => {
    expect(sorted(['75 years and over', '18 to 24 years', 'Under 18 years', '25 to 74 years'])).toEqual(['Under 18 years', '18 to 24 years', '25 to 74 years', '75 years and over']);
    expect(sorted(['more than 10 hours', 'up to 2 hours', '3-10 hours'])).toEqual(['up to 2 hours', '3-10 hours', 'more than 10 hours']);
  });
  it('money brackets with thousands separators and currency signs (the 1996 ANES income codes, statsmodels anes96 documentation)', () => {
    const brackets = ['$105,000 and over', '$20,000-$21,999', '$3,000-$4,999', 'None or less than $2,999', '$9,000-$9,999', '$10,000-$10,999'];
    expect(sorted(brackets)).toEqual(['None or less than $2,999', '$3,000-$4,999', '$9,000-$9,999', '$10,000-$10,999', '$20,000-$21,999', '$105,000 and over']);
  });
  it('labels that are not ranges keep the run-by-run order and come after the ranges', () => {
    expect(sorted(["don't know", '65+', 'refused', '<18', '18-64'])).toEqual(['<18', '18-64', '65+', "don't know", 'refused']);
    expect(sorted(['item 10', 'item 2', 'Q3', 'Q10'])).toEqual(['Q3', 'Q10', 'item 2', 'item 10']);
  });
  it('the bins tabsight writes sort naturally: equal-frequency "a–b" and cut-point labels', () => {
    expect(sorted(['10–19', '2–9', '-5–-1', '20–40'])).toEqual(['-5–-1', '2–9', '10–19', '20–40']);
    expect(sorted(['50+', '18–24', '<18', '25 to <35'])).toEqual(['<18', '18–24', '25 to <35', '50+']);
  });
  it('is a total order: antisymmetric and transitive on a mixed set (every triple checked)', () => {
    const labels = ['<12', '12-15', '16', '>16', '65+', 'under 18', '16 yrs', '16', 'abc', 'item 2', '-3', '2024-06', '$5', '10k', '1e3', 'NA', '', '<=12', '12'];
    for (const a of labels) {
      expect(compareNatural(a, a)).toBe(0);
      for (const b of labels) {
        expect(Math.sign(compareNatural(a, b)) + Math.sign(compareNatural(b, a))).toBe(0);
        for (const c of labels) {
          if (compareNatural(a, b) <= 0 && compareNatural(b, c) <= 0) expect(compareNatural(a, c)).toBeLessThanOrEqual(0);
        }
      }
    }
  });
});
