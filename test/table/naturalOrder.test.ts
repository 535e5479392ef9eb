import { describe, expect, it } from 'vitest';
import { compareNatural } from '../../src/table/naturalOrder.js';
import { orderLevels, TableCounter } from '../../src/table/twoWayTable.js';
import { TabsightError } from '../../src/errors.js';

describe('natural level order (common practice, locale-free)', () => {
  it('orders numbers numerically, "item 2" before "item 10", others by code point', () => {
    const levels = ['item 10', '10', 'item 2', '2', 'b', 'B', '-1.5', 'item 1', 'Ä', 'a'];
    expect([...levels].sort(compareNatural)).toEqual(['-1.5', '2', '10', 'B', 'a', 'b', 'item 1', 'item 2', 'item 10', 'Ä']);
  });
  it('keeps a requested order and appends the rest naturally; reports unknown levels', () => {
    expect(orderLevels(['low', 'high', 'mid', 'other'], ['low', 'mid', 'high', 'typo'])).toEqual({ order: ['low', 'mid', 'high', 'other'], unknown: ['typo'] });
  });
});

describe('table counter', () => {
  it('counts pairs into a table in natural order', () => {
    // ids as the reader gives them: labels[id − 1]
    const rowLabels = ['x', 'y'];
    const colLabels = ['10', '2'];
    const counter = new TableCounter('r', 'c', 50);
    for (const [a, b] of [[1, 2], [2, 1], [1, 1], [1, 2]]) counter.add(a, b);
    const { table } = counter.finish((id) => rowLabels[id - 1], (id) => colLabels[id - 1]);
    expect(table.rowLevels).toEqual(['x', 'y']);
    expect(table.colLevels).toEqual(['2', '10']);
    expect(table.counts).toEqual([[2, 1], [0, 1]]);
  });
  it('refuses a side with more levels than the cap and says how many it has', () => {
    const counter = new TableCounter('id', 'c', 5);
    const labels = Array.from({ length: 120 }, (_v, i) => `v${i}`);
    for (let i = 1; i <= 120; i++) counter.add(i, 1);
    expect(() => counter.finish((id) => labels[id - 1], () => 'a')).toThrow(TabsightError);
    expect(() => counter.finish((id) => labels[id - 1], () => 'a')).toThrow(/"id" has 120 distinct values, more than --max-levels 5/);
  });
});
