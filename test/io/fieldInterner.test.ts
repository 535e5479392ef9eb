import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { FieldInterner, MISSING_ID, OVERFLOW_ID } from '../../src/io/fieldInterner.js';

const intern = (interner: FieldInterner, text: string) => {
  const bytes = Buffer.from(text, 'utf8');
  return interner.intern(bytes, bytes, 0, bytes.length);
};

describe('field interner', () => {
  it('gives equal values equal ids, trims, and maps blanks and missing tokens to 0', () => {
    const interner = new FieldInterner(new Set(['NA']), 100);
    expect(intern(interner, 'x')).toBe(1);
    expect(intern(interner, '  x\t')).toBe(1);
    expect(intern(interner, 'y')).toBe(2);
    expect(intern(interner, '   ')).toBe(MISSING_ID);
    expect(intern(interner, 'NA')).toBe(MISSING_ID);
    expect(interner.internString(' y ')).toBe(2);
    expect(interner.labels).toEqual(['x', 'y']);
  });

  it('agrees with a plain Map on random values, through many rehashes (property)', () => {
    fc.assert(
      fc.property(fc.array(fc.string({ unit: 'grapheme', maxLength: 6 }), { maxLength: 3000 }), (values) => {
        const interner = new FieldInterner(new Set(), 1_000_000);
        const reference = new Map<string, number>();
        for (const v of values) {
          const key = v.trim();
          const id = intern(interner, v);
          if (key === '') expect(id).toBe(0);
          else {
            if (!reference.has(key)) reference.set(key, reference.size + 1);
            expect(interner.labels[id - 1]).toBe(key);
          }
        }
        expect(new Set(interner.labels)).toEqual(new Set(reference.keys()));
      }),
      { numRuns: 60 },
    );
  });

  it('stops remembering new values past its limit (bounded memory) and counts them', () => {
    const interner = new FieldInterner(new Set(), 3);
    for (const v of ['a', 'b', 'c']) intern(interner, v);
    expect(intern(interner, 'd')).toBe(OVERFLOW_ID);
    expect(intern(interner, 'a')).toBe(1);
    expect(interner.overflowed).toBe(1);
  });

  it('keeps apart values that share their length, first and last byte (the look-up cache), before and after the table grows (common practice: a cache is checked byte for byte)', () => {
    const interner = new FieldInterner(new Set(), 100_000);
    const values = ['axc', 'abc', 'a€c', 'ayc', 'abc'];
    const first = values.map((v) => intern(interner, v));
    expect(first).toEqual([1, 2, 3, 4, 2]);
    // Thousands of values make the table grow (its slots move); the early ones keep their ids.
    for (let k = 0; k < 5000; k++) intern(interner, `a${k}c`);
    expect(values.map((v) => intern(interner, v))).toEqual(first);
    expect(intern(interner, 'a4999c')).toBe(5004);
  });
});
