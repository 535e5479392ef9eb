import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { firstNonBlankLine } from '../../src/io/readRecords.js';

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
