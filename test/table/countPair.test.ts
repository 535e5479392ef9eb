// Counting a pair's table from coded columns (src/table/countPair.ts), the
// shaping of encoded columns (recodes, --keep-missing, report order) and
// the --other merge (src/table/countedTable.ts). The table is Agresti's
// party identification by gender (GSS), as recorded in
// fixtures/reference/reference.json.
import { describe, expect, it } from 'vitest';
import { countPair } from '../../src/table/countPair.js';
import { mergeRareLevels } from '../../src/table/countedTable.js';
import { EncodedColumn, recodeColumn } from '../../src/table/encodedColumn.js';
import { OrderedColumn, orderColumn } from '../../src/table/orderedColumn.js';
import { reference } from '../helpers.js';

const party = reference.tables.find((t) => t.name.startsWith('party identification'))!;
const genders = ['female', 'male'];
const parties = ['democrat', 'independent', 'republican'];

/** The table expanded to one code per respondent (codes 1-based, in report order). */
function expanded(counts: number[][]): { rows: OrderedColumn; cols: OrderedColumn } {
  const a: number[] = [];
  const b: number[] = [];
  counts.forEach((row, i) => row.forEach((n, j) => {
    for (let k = 0; k < n; k++) {
      a.push(i + 1);
      b.push(j + 1);
    }
  }));
  return { rows: { name: 'gender', labels: genders, codes: Uint16Array.from(a) }, cols: { name: 'party', labels: parties, codes: Uint16Array.from(b) } };
}

describe('countPair', () => {
  it('counts the published table back from one code per respondent', () => {
    const { rows, cols } = expanded(party.counts);
    const counted = countPair(rows, cols);
    expect(counted.table.counts).toEqual(party.counts);
    expect(counted.table.rowLevels).toEqual(genders);
    expect(counted.weighting).toEqual({ kind: 'none', sumWeights: 2757, sumSquaredWeights: 2757, unweightedN: 2757 });
    expect(counted.excluded).toBe(0);
    expect(counted.strata).toBeNull();
  });

  it('grouped entries (the engine\'s way: one entry per cell with its number of rows) give the same table', () => {
    const rows: number[] = [];
    const cols: number[] = [];
    const n: number[] = [];
    party.counts.forEach((row, i) => row.forEach((count, j) => {
      rows.push(i + 1);
      cols.push(j + 1);
      n.push(count);
    }));
    const counted = countPair({ name: 'gender', labels: genders, codes: Uint16Array.from(rows) }, { name: 'party', labels: parties, codes: Uint16Array.from(cols) }, { rowsPerEntry: Float64Array.from(n) });
    expect(counted.table.counts).toEqual(party.counts);
    expect(counted.weighting.unweightedN).toBe(2757);
  });

  it('rows with a missing code are left out and counted; a level seen only beside a missing value is dropped', () => {
    const rows: OrderedColumn = { name: 'r', labels: ['x', 'y', 'z'], codes: Uint16Array.from([1, 2, 3, 0, 1]) };
    const cols: OrderedColumn = { name: 'c', labels: ['p', 'q'], codes: Uint16Array.from([1, 2, 0, 1, 2]) };
    const counted = countPair(rows, cols);
    expect(counted.excluded).toBe(2);
    expect(counted.table.rowLevels).toEqual(['x', 'y']);
    expect(counted.table.counts).toEqual([[1, 1], [0, 1]]);
  });

  it('weights: cells are weighted sums, with Σw and Σw² for the effective sample size (Kish 1965)', () => {
    const rows: OrderedColumn = { name: 'r', labels: ['x', 'y'], codes: Uint16Array.from([1, 1, 2, 2]) };
    const cols: OrderedColumn = { name: 'c', labels: ['p', 'q'], codes: Uint16Array.from([1, 2, 1, 1]) };
    const counted = countPair(rows, cols, { weights: { values: Float64Array.from([0.5, 2, 1.5, 1]), kind: 'weight' } });
    expect(counted.table.counts).toEqual([[0.5, 2], [2.5, 0]]);
    expect(counted.weighting).toEqual({ kind: 'weight', sumWeights: 5, sumSquaredWeights: 0.25 + 4 + 2.25 + 1, unweightedN: 4 });
  });

  it('a layer: one table per level on the pooled levels, natural order, which add up to the pooled table', () => {
    const rows: OrderedColumn = { name: 'r', labels: ['x', 'y'], codes: Uint16Array.from([1, 2, 1, 2, 1, 2]) };
    const cols: OrderedColumn = { name: 'c', labels: ['p', 'q'], codes: Uint16Array.from([1, 2, 2, 1, 1, 2]) };
    const layer: OrderedColumn = { name: 'l', labels: ['w2', 'w10'], codes: Uint16Array.from([2, 2, 1, 1, 1, 0]) };
    const counted = countPair(rows, cols, { strata: layer });
    expect(counted.strata!.map((s) => s.level)).toEqual(['w2', 'w10']);
    expect(counted.excluded).toBe(1);
    const sum = counted.strata!.reduce((t, s) => t.map((row, i) => row.map((v, j) => v + s.table.counts[i][j])), [[0, 0], [0, 0]]);
    expect(sum).toEqual(counted.table.counts);
  });
});

describe('shaping an encoded column', () => {
  // A fresh column for each use: recoding and ordering renumber the codes in place.
  const column = (): EncodedColumn => ({ name: 'size', labels: ['S', 'M', 'L', 'XL'], codes: Uint8Array.from([1, 2, 0, 3, 4, 1]), missing: 1, distinct: 4, distinctCapped: false, numeric: false, integer: false, missingLooking: [] });

  it('--recode merges levels recoded alike; --keep-missing makes missing the level "(missing)"', () => {
    const recoded = recodeColumn(column(), new Map([['S', 'small'], ['M', 'small'], ['L', 'large'], ['XL', 'large']]), true);
    expect(recoded.labels).toEqual(['small', 'large', '(missing)']);
    expect([...recoded.codes!]).toEqual([1, 1, 3, 2, 2, 1]);
    expect(recoded.missing).toBe(0);
  });

  it('report order is natural order, codes renumbered to match', () => {
    const ordered = orderColumn({ ...column(), labels: ['item 10', 'item 2', 'b', 'a'] });
    expect(ordered.labels).toEqual(['a', 'b', 'item 2', 'item 10']);
    expect([...ordered.codes]).toEqual([4, 3, 0, 2, 1, 4]);
  });
});

describe('--other: the k most frequent levels kept, the rest merged', () => {
  it('keeps democrat (the larger party) and merges the others, in the pooled table and in each layer', () => {
    const { rows, cols } = expanded(party.counts);
    const counted = countPair(rows, cols);
    const merged = mergeRareLevels(counted.table, [{ level: 'all', table: counted.table, weighting: counted.weighting }], 1, 'rest');
    // female: 762 democrats, 327 + 468 others; male: 484, 239 + 477
    expect(merged.table.colLevels).toEqual(['democrat', 'rest']);
    expect(merged.table.counts).toEqual([[762, 795], [484, 716]]);
    expect(merged.strata![0].table.counts).toEqual(merged.table.counts);
    // a side with at most k + 1 levels stays as it is
    expect(merged.table.rowLevels).toEqual(genders);
  });
});
