import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { derivation } from '../../src/table/derived.js';
import { pearsonChiSquare } from '../../src/stats/chiSquareTests.js';
import { cramersV } from '../../src/stats/strength.js';
import { ROOT } from '../helpers.js';

// Cramér (1946), Mathematical Methods of Statistics: V reaches 1 exactly when each level of the larger side occurs with a single level of the other.
describe('derived pairs: one column a recoding of the other', () => {
  const anes = JSON.parse(readFileSync(join(ROOT, 'fixtures', 'anes96', 'reference.json'), 'utf8'));
  const educ = anes.columns.educ.counts as Record<string, number>;
  // educ (1996 ANES codes 1–7) against a grouping of it: 1–2 no diploma, 3 high school, 4–7 college.
  const group = (code: string) => (Number(code) <= 2 ? 0 : Number(code) === 3 ? 1 : 2);
  const table = Object.keys(educ).map((code) => [0, 1, 2].map((g) => (group(code) === g ? educ[code] : 0)));
  it('flags educ × its grouping (each education code in one group), where Cramér\'s V is 1', () => {
    expect(derivation(table)).toEqual({ colsFromRows: true, rowsFromCols: false });
    const x2 = pearsonChiSquare(table).statistic;
    const n = table.flat().reduce((s, v) => s + v, 0);
    expect(cramersV(x2, n, table.length, 3)).toBeCloseTo(1, 12);
  });
  it('either direction, both for a one-to-one renaming, and not for an association with overlap', () => {
    const transposed = table[0].map((_v, j) => table.map((row) => row[j]));
    expect(derivation(transposed)).toEqual({ colsFromRows: false, rowsFromCols: true });
    expect(derivation([[5, 0], [0, 7]])).toEqual({ colsFromRows: true, rowsFromCols: true });
    expect(derivation([[5, 1], [0, 7]])).toBeNull();
  });
  it('ignores empty levels and does not call a one-level table derived', () => {
    expect(derivation([[5, 0, 0], [0, 0, 0], [0, 3, 0]])).toEqual({ colsFromRows: true, rowsFromCols: true });
    expect(derivation([[5, 3]])).toBeNull();
  });
});
