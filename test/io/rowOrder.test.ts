import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countTable } from '../../src/io/counting.js';
import { inputSource } from '../../src/io/source.js';
import { shuffle } from '../helpers.js';

const dir = mkdtempSync(join(tmpdir(), 'tabsight-order-'));
const reader = { missing: [], skipBadRows: false, header: true };
const plan = { rows: 'a', cols: 'b', decimalComma: false, where: [], recodes: [], keepMissing: false, maxLevels: 50 };

describe('row order does not matter (property)', () => {
  it('any permutation of the data rows gives the same table', async () => {
    let k = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.tuple(fc.constantFrom('p', 'q', 'r', ''), fc.constantFrom('1', '2', '3')), { minLength: 4, maxLength: 60 }),
        fc.integer(),
        async (rows, seed) => {
          const complete = rows.filter(([a]) => a !== '');
          fc.pre(new Set(complete.map(([a]) => a)).size >= 2 && new Set(complete.map(([, b]) => b)).size >= 2);
          const shuffled = shuffle(rows, seed);
          const write = (lines: [string, string][]) => {
            const path = join(dir, `t${k++}.csv`);
            writeFileSync(path, ['a,b', ...lines.map(([a, b]) => `${a},${b}`)].join('\n') + '\n');
            return path;
          };
          const one = await countTable(inputSource(write(rows)), reader, plan);
          const two = await countTable(inputSource(write(shuffled)), reader, plan);
          expect(two.table).toEqual(one.table);
          expect(two.excluded).toBe(one.excluded);
        },
      ),
      { numRuns: 60 },
    );
  });
});
