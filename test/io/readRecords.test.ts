import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { firstNonBlankLine, readRecords } from '../../src/io/readRecords.js';
import { tallyInParallel } from '../../src/io/parallelCount.js';

describe('the line the delimiter is detected from', () => {
  // The rule as stated (README, options: the delimiter is "detected from the header line"): the first line that is not blank, lines ending at CR LF, LF or CR.
  it('is the first non-blank line of the decoded sample, found without decoding the rest (property, against splitting the whole text)', () => {
    const piece = fc.constantFrom('a', ',', ';', ' ', '\t', '\n', '\r', '\r\n', 'é', '日', '😀', '\u00a0', '"');
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 40 }), (pieces) => {
        const text = pieces.join('');
        const expected = text.split(/\r\n|\n|\r/).find((l) => l.trim() !== '') ?? '';
        expect(firstNonBlankLine(Buffer.from(text, 'utf8'))).toBe(expected);
      }),
      { numRuns: 2000 },
    );
  });
});

describe('a row of the wrong length in a file of several blocks', () => {
  // Most of such a file is read by the quote-free path; the message must name the physical line as an editor counts it.
  it('is named by its line, past blank lines, CRLF or LF line ends and a quoted field with line feeds, wherever it falls (property); the threaded route gives up and the single reader names it', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tabsight-ragged-'));
    await fc.assert(
      fc.asyncProperty(fc.boolean(), fc.integer({ min: 1, max: 90_000 }), fc.integer({ min: 1, max: 89_999 }), fc.constantFrom(3, 5), async (crlf, raggedAt, quotedAt, fields) => {
        const eol = crlf ? '\r\n' : '\n';
        const lines = ['id,region,segment,answer'];
        let line = 1; // the physical line of the last entry
        let raggedLine = 0;
        for (let i = 1; i <= 90_000; i++) {
          if (i % 997 === 0) {
            lines.push('   ');
            line++;
          }
          if (i === raggedAt) {
            lines.push(fields === 3 ? `${i},r${i % 7},s${i % 3}` : `${i},r${i % 7},s${i % 3},yes,extra`);
            raggedLine = ++line;
          } else if (i === quotedAt) {
            lines.push(`${i},r1,"two${eol}lines, quoted",no`);
            line += 2;
          } else {
            lines.push(`${i},r${i % 7},s${i % 3},${i % 2 ? 'yes' : 'no'}`);
            line++;
          }
        }
        const path = join(dir, `ragged-${crlf ? 'crlf' : 'lf'}.csv`);
        writeFileSync(path, lines.join(eol) + eol);
        const reader = { missing: [], skipBadRows: false, header: true };
        const expected = `${path}, line ${raggedLine}: ${fields} fields where the header has 4; fix the row or pass --skip-bad-rows to count and skip such rows`;
        await expect(readRecords({ path, label: path }, reader, () => [1, 2], () => undefined)).rejects.toThrow(expected);
        expect(await tallyInParallel({ path, label: path }, reader, () => [1, 2], 2, { cuts: [1_000_000, 1_500_000] })).toBeNull();
        // Skipped instead, it is counted as one bad row.
        const read = await readRecords({ path, label: path }, { ...reader, skipBadRows: true }, () => [1, 2], () => undefined);
        expect([read.records, read.badRows, read.blankLines]).toEqual([90_000, 1, 90]);
      }),
      { numRuns: 12 },
    );
  });
});
