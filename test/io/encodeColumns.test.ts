import { describe, expect, it } from 'vitest';
import { encodeWithReader } from '../../src/io/encodeColumns.js';
import { recodeColumn, remapCodes } from '../../src/table/encodedColumn.js';
import { tempFile } from '../cli/cliHelpers.js';

const reader = { missing: [], skipBadRows: false, header: true };

describe('the scan\'s encoded columns: one byte a cell while a column has at most 255 levels', () => {
  it('keeps 1-byte codes for few levels and widens a column to 2 bytes when its 256th level arrives, codes unchanged (common practice: dictionary encoding)', async () => {
    const lines = ['few,many'];
    for (let i = 0; i < 40_000; i++) lines.push(`${['a', 'b', 'c'][i % 3]},${i < 30_000 ? `v${i % 200}` : `v${i % 300}`}`);
    const file = tempFile('levels.csv', lines.join('\n') + '\n');
    const encoded = await encodeWithReader({ path: file, label: file }, reader, { maxLevels: 400, keepNumeric: false, maxColumns: 10 });
    const [few, many] = encoded.columns;
    expect(few.codes).toBeInstanceOf(Uint8Array);
    expect(many.codes).toBeInstanceOf(Uint16Array);
    expect(encoded.rows).toBe(40_000);
    // Codes are the order of first appearance: row i holds level v(i mod 200 or 300).
    for (const i of [0, 199, 29_999, 30_000, 30_250, 39_999]) {
      expect(few.labels[few.codes![i] - 1]).toBe(['a', 'b', 'c'][i % 3]);
      expect(many.labels[many.codes![i] - 1]).toBe(i < 30_000 ? `v${i % 200}` : `v${i % 300}`);
    }
  });

  it('drops a column past --max-levels while reading when no row can be left out, and reports its distinct values', async () => {
    const lines = ['id,g'];
    for (let i = 0; i < 1000; i++) lines.push(`${i},${i % 2}`);
    const file = tempFile('ids.csv', lines.join('\n') + '\n');
    const encoded = await encodeWithReader({ path: file, label: file }, reader, { maxLevels: 50, keepNumeric: false, maxColumns: 10 });
    expect(encoded.columns[0].codes).toBeNull();
    expect(encoded.columns[0].distinct).toBe(1000);
    expect([...encoded.columns[1].codes!.subarray(0, 4)]).toEqual([1, 2, 1, 2]);
  });

  it('renumbers codes in place where they fit, into a wider array where they do not (--keep-missing on 255 levels makes 256)', () => {
    const codes = Uint8Array.from([1, 2, 0, 255]);
    expect(remapCodes(codes, Uint32Array.from({ length: 256 }, (_v, k) => 255 - k), 255)).toBe(codes);
    expect([...codes]).toEqual([254, 253, 255, 0]);
    const labels = Array.from({ length: 255 }, (_v, k) => `l${k}`);
    const column = { name: 'x', labels, codes: Uint8Array.from([1, 0, 255]), missing: 1, distinct: 255, distinctCapped: false, numeric: false, integer: false, missingLooking: [] };
    const kept = recodeColumn(column, undefined, true);
    expect(kept.codes).toBeInstanceOf(Uint16Array);
    expect([...kept.codes!]).toEqual([1, 256, 255]);
    expect(kept.labels[255]).toBe('(missing)');
  });
});
