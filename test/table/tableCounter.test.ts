// Counting a table from a stream of value ids (src/table/tableCounter.ts).
import { describe, expect, it } from 'vitest';
import { TabsightError } from '../../src/errors.js';
import { TableCounter } from '../../src/table/tableCounter.js';

describe('table counter', () => {
  it('counts pairs into a table in natural order', () => {
    // ids as the reader gives them: labels[id − 1]
    const rowLabels = ['x', 'y'];
    const colLabels = ['10', '2'];
    const counter = new TableCounter('r', 'c', 50);
    for (const [a, b] of [[1, 2], [2, 1], [1, 1], [1, 2]]) counter.add(a, b, 1, 1, 0, 1, 0);
    const { table } = counter.finish((id) => rowLabels[id - 1], (id) => colLabels[id - 1]);
    expect(table.rowLevels).toEqual(['x', 'y']);
    expect(table.colLevels).toEqual(['2', '10']);
    expect(table.counts).toEqual([[2, 1], [0, 1]]);
  });
  it('refuses a side with more levels than the cap and says how many it has', () => {
    const counter = new TableCounter('id', 'c', 5);
    const labels = Array.from({ length: 120 }, (_v, i) => `v${i}`);
    for (let i = 1; i <= 120; i++) counter.add(i, 1, 1, 1, 0, 1, 0);
    expect(() => counter.finish((id) => labels[id - 1], () => 'a')).toThrow(TabsightError);
    expect(() => counter.finish((id) => labels[id - 1], () => 'a')).toThrow(/"id" has 120 distinct values, more than --max-levels 5/);
  });
});

describe('table counter with weights', () => {
  it('sums the weights and their squares, and counts the rows (Kish 1965: the sums behind the effective sample size)', () => {
    const counter = new TableCounter('r', 'c', 50, true);
    // a group of 3 rows of weight 0.5 each, then one row of weight 2
    counter.add(1, 1, 3, 1.5, 0, 0.75, 0);
    counter.add(1, 2, 1, 2, 0, 4, 0);
    const { table } = counter.finish((id) => `r${id}`, (id) => `c${id}`);
    expect(table.counts).toEqual([[1.5, 2]]);
    expect(counter.weighting('weight')).toEqual({ kind: 'weight', sumWeights: 3.5, sumSquaredWeights: 4.75, unweightedN: 4 });
  });
});
