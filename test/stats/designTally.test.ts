import { describe, expect, it } from 'vitest';
import { DesignTally, ReplicateCellTotals, SampleDesignIndex, PsuCellTotals } from '../../src/stats/designTally.js';

describe('design tally', () => {
  it('clusters are nested in strata: the same cluster id in two strata is two PSUs (conventions §2)', () => {
    const index = new SampleDesignIndex({ clustered: true });
    expect(index.locate('north', 1)).toBe(0);
    expect(index.locate('south', 1)).toBe(1);
    expect(index.locate('north', 1)).toBe(0);
    expect(index.locate('north', 2)).toBe(2);
    expect(index.psuCount).toBe(3);
    expect(index.stratumCount).toBe(2);
    expect(index.strataSummary().map((s) => s.psus)).toEqual([2, 1]);
  });

  it('without clusters every row is a PSU and the unit is its stratum', () => {
    const index = new SampleDesignIndex({ clustered: false });
    expect([index.locate('a', undefined), index.locate('b', undefined), index.locate('a', undefined)]).toEqual([0, 1, 0]);
    expect(index.psuCount).toBe(3);
    expect(index.strataSummary().map((s) => s.psus)).toEqual([2, 1]);
  });

  it('rows outside the domain count their PSU but add nothing; memory is units × cells, not rows', () => {
    const tally = new DesignTally({ clustered: true });
    for (let i = 0; i < 10_000; i++) tally.add({ cell: i % 7 === 0 ? -1 : i % 3, weight: 1 + (i % 5), stratum: i % 2, cluster: i % 10 });
    expect(tally.index.psuCount).toBe(10);
    expect(tally.totals.weightTotals.length).toBe(10);
    expect(tally.totals.weightTotals.every((t) => t.length <= 4)).toBe(true);
    expect(tally.totals.counts.reduce((a, b) => a + b, 0)).toBe(10_000 - Math.ceil(10_000 / 7));
  });

  it('totals can be fed by a shared index (one read, many tables)', () => {
    const index = new SampleDesignIndex({ clustered: true });
    const first = new PsuCellTotals(index);
    const second = new PsuCellTotals(index);
    const unit = index.locate('s', 'c');
    first.add(unit, 1, 2);
    second.add(unit, 0, 3);
    expect(first.weightTotals[0][1]).toBe(2);
    expect(second.weightTotals[0][0]).toBe(3);
  });

  it('replicate totals check the number of replicate weights and count domain rows', () => {
    const totals = new ReplicateCellTotals(2);
    totals.add(-1, 1, [1, 1]);
    totals.add(0, 2, [1, 3]);
    expect(totals.rowsOutsideDomain).toBe(1);
    expect(Array.from(totals.totals[1].slice(0, 1))).toEqual([3]);
    expect(() => totals.add(0, 1, [1])).toThrow(/1 replicate weights, expected 2/);
  });
});
