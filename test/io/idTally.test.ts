import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { IdTally } from '../../src/io/idTally.js';

/** The tally's entries as [ids joined, rows], in its order. */
function entriesOf(tally: IdTally): [string, number][] {
  const out: [string, number][] = [];
  tally.forEach((ids, rows) => out.push([[...ids].join(','), rows]));
  return out;
}

describe('id tally', () => {
  it('equals a Map of the combinations in order of first appearance, small ids (found by their ids alone) and large or negative ones (hashed) mixed, through growth and clear (property)', () => {
    const id = fc.oneof(fc.integer({ min: 0, max: 5 }), fc.integer({ min: 0, max: 70 }), fc.integer({ min: -1, max: 5000 }));
    fc.assert(
      fc.property(fc.integer({ min: 1, max: 5 }), fc.array(fc.array(id, { minLength: 5, maxLength: 5 }), { maxLength: 600 }), fc.nat(600), (width, rows, clearAt) => {
        const tally = new IdTally(width);
        let reference = new Map<string, number>();
        rows.forEach((row, k) => {
          if (k === clearAt) {
            tally.clear();
            reference = new Map();
          }
          const ids = Int32Array.from(row.slice(0, width));
          const weight = 1 + (k % 3);
          tally.add(ids, weight);
          const key = [...ids].join(',');
          reference.set(key, (reference.get(key) ?? 0) + weight);
        });
        expect(entriesOf(tally)).toEqual([...reference]);
        expect(tally.size).toBe(reference.size);
        const { keys, counts } = tally.entries();
        expect(counts.length).toBe(reference.size);
        expect(keys.length).toBe(reference.size * width);
      }),
      { numRuns: 300 },
    );
  });
});
