import { describe, expect, it } from 'vitest';
import { applyRangeRecode, parseRangeRecode, recodeValue, uncoveredNote } from '../../src/table/rangeRecode.js';
import { TabsightError } from '../../src/errors.js';

// Rules stated in src/table/rangeRecode.ts; the brackets are the ones the issue asks for (common practice).
describe('range recodes', () => {
  const ages = parseRangeRecode('age:<18=minor,18-64=adult,>=65=senior');
  it('maps numbers to the label of the range that holds them, bounds included as written', () => {
    expect(applyRangeRecode(ages, ['17', '18', '40', '64', '65', '90', '17.9']).labels).toEqual(['minor', 'adult', 'adult', 'adult', 'senior', 'senior', 'minor']);
  });
  it('lists the new labels in the order of their ranges, not alphabetically', () => {
    expect(ages.order).toEqual(['minor', 'adult', 'senior']);
    expect(parseRangeRecode('income:75k+=high,<25k=low,25k-<75k=middle').order).toEqual(['low', 'middle', 'high']);
  });
  it('a level that looks like a range is still renamed as a level first (plain recodes keep working)', () => {
    const bands = parseRangeRecode('age_band:16-24=young,65+=older');
    expect(recodeValue(bands, '16-24')).toEqual({ label: 'young', rule: 'level' });
    expect(recodeValue(bands, '20')).toEqual({ label: 'young', rule: 'range' });
    expect(recodeValue(bands, 'n/a')).toEqual({ label: 'n/a', rule: 'none' });
  });
  it('numbers that no range covers keep their label and are reported', () => {
    const gap = parseRangeRecode('age:<18=minor,18-64=adult,>=70=senior');
    const result = applyRangeRecode(gap, ['66', '12', '67', 'refused']);
    expect(result.labels).toEqual(['66', 'minor', '67', 'refused']);
    expect(result.uncovered).toEqual(['66', '67']);
    expect(uncoveredNote(gap, result.uncovered)).toBe('--recode "age": "66", "67" fall in no range (under 18; 18 to 64; 70 or more) and keep their own label');
  });
  it('refuses overlapping ranges, naming both rules and a number they share', () => {
    expect(() => parseRangeRecode('age:18-64=adult,>=60=senior')).toThrow(TabsightError);
    expect(() => parseRangeRecode('age:18-64=adult,>=60=senior')).toThrow('"18-64" and ">=60" overlap (both take 60)');
    expect(() => parseRangeRecode('age:<=18=minor,18+=adult')).toThrow('overlap (both take 18)');
  });
  it('reads "<=" and ">=" inside a rule, and refuses rules without both sides', () => {
    expect(parseRangeRecode('x:<=5=low,>5=high').order).toEqual(['low', 'high']);
    expect(() => parseRangeRecode('x:<=5')).toThrow('is not from=to');
    expect(() => parseRangeRecode('age')).toThrow('expected column:from=to');
    expect(() => parseRangeRecode('x:5=')).toThrow('needs a level or range on both sides');
  });
});
