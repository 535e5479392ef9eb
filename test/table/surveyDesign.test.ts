import { describe, expect, it } from 'vitest';
import { PsuCellTotals } from '../../src/stats/designTally.js';
import { DesignCounter, layoutFor, matchesPattern, type SurveyDesign } from '../../src/table/surveyDesign.js';
import { countPair } from '../../src/table/countPair.js';
import { SampleDesignIndex } from '../../src/stats/designTally.js';

const TAYLOR: SurveyDesign = { kind: 'taylor', strata: 's', cluster: 'c', fpc: null, lonelyPsu: 'fail' };

describe('replicate weight patterns (common practice: shell-style * and ?)', () => {
  it('* any run, ? one character, everything else literal', () => {
    expect(matchesPattern('repwt12', 'repwt*')).toBe(true);
    expect(matchesPattern('repwt', 'repwt*')).toBe(true);
    expect(matchesPattern('xrepwt1', 'repwt*')).toBe(false);
    expect(matchesPattern('w1', 'w?')).toBe(true);
    expect(matchesPattern('w12', 'w?')).toBe(false);
    expect(matchesPattern('a.b1', 'a.b*')).toBe(true);
    expect(matchesPattern('axb1', 'a.b*')).toBe(false);
  });
});

describe('cells numbered while reading, laid out on the final table', () => {
  it('cells follow their labels into any level order; a level the table does not name is a domain row (−1)', () => {
    const counter = new DesignCounter(TAYLOR, 0);
    const labels = ['x', 'y', 'z'];
    counter.add(2, 1, 0, 1, null); // z, y
    counter.add(1, 1, 0, 1, null); // y, y
    counter.add(1, 2, 0, 1, null); // y, z
    const cells = counter.finish('w', [], (id) => labels[id], (id) => labels[id]);
    expect(cells.cellCount).toBe(3);
    const layout = layoutFor(cells, { rowLevels: ['z', 'y'], colLevels: ['y'] });
    expect(layout.size).toBe(2);
    expect(Array.from(layout.position as Int32Array)).toEqual([0, 1, -1]);
  });

  it('after --other, levels the table no longer names go to the merged level', () => {
    const counter = new DesignCounter(TAYLOR, 0);
    const labels = ['a', 'b', 'c', 'd'];
    for (const [r, c] of [
      [0, 0],
      [1, 0],
      [2, 1],
      [3, 1],
    ]) counter.add(r, c, 0, 1, null);
    const cells = counter.finish(null, [], (id) => labels[id], (id) => labels[id]);
    const layout = layoutFor(cells, { rowLevels: ['a', 'other'], colLevels: ['a', 'b'] }, { label: 'other' });
    expect(Array.from(layout.position as Int32Array)).toEqual([0, 2, 3, 3]);
  });

  it("a scan pair's totals, counted with its table on the padded grid, equal the row-by-row totals of the pair path (the same sums in the same order)", () => {
    const index = new SampleDesignIndex({ clustered: true });
    const rows = [
      ['h1', 'p1', 1, 1, 2.5],
      ['h1', 'p2', 2, 1, 1.5],
      ['h2', 'p1', 1, 2, 3],
      ['h2', 'p1', 0, 2, 1], // a missing row value: domain row
      ['h2', 'p3', 2, 2, 0.5],
      ['h1', 'p1', 2, 2, 4],
    ] as const;
    const units = Int32Array.from(rows.map(([h, p]) => index.locate(h, p)));
    const a = Uint16Array.from(rows.map((x) => x[2]));
    const b = Uint16Array.from(rows.map((x) => x[3]));
    const weights = Float64Array.from(rows.map((x) => x[4]));
    const cells = countPair({ name: 'a', labels: ['r1', 'r2'], codes: a }, { name: 'b', labels: ['c1', 'c2'], codes: b }, {
      weights: { values: weights, kind: 'weight' },
      design: { design: TAYLOR, index, units, replicateWeights: null, replicateColumns: [], weightColumn: 'w' },
    }).design!;
    const byRow = new PsuCellTotals(index);
    rows.forEach((x, k) => {
      if (x[2] > 0 && x[3] > 0) byRow.add(units[k], (x[2] - 1) * 2 + (x[3] - 1), x[4]);
    });
    const totals = cells.totals as PsuCellTotals;
    for (let u = 0; u < index.unitCount; u++) expect(Array.from(totals.weightTotals[u]).slice(0, 4)).toEqual(Array.from({ length: 4 }, (_v, j) => byRow.weightTotals[u]?.[j] ?? 0));
    expect(Array.from(totals.counts)).toEqual([1, 1, 1, 2]);
    expect(cells.cellLabels(2)).toEqual(['r2', 'c1']);
  });
});
