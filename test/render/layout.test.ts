import { Chalk } from 'chalk';
import fc from 'fast-check';
import stringWidth from 'string-width';
import { describe, expect, it } from 'vitest';
import { renderGrid } from '../../src/render/grid.js';
import wrapAnsi from 'wrap-ansi';
import { displayWidth, foldLabel, GLUE, glued, shownLabel, SIMPLE_CHARACTERS, wrapText } from '../../src/render/layout.js';
import { formatCount, formatExpected, formatP, formatSigned } from '../../src/readableNumbers.js';

// Display widths as the Unicode East Asian Width property (UAX #11) and the
// emoji presentation rules (UTS #51) give them: a wide character takes two
// columns, a combining mark none, an emoji sequence two.
describe('display width (UAX #11, UTS #51)', () => {
  it('counts CJK as two columns, combining marks as none, an emoji ZWJ sequence and a flag as two', () => {
    expect(displayWidth('日本語')).toBe(6);
    expect(displayWidth('한국어')).toBe(6);
    expect(displayWidth('e\u0301')).toBe(1); // e + combining acute
    expect(displayWidth('👩‍👩‍👧')).toBe(2); // one grapheme
    expect(displayWidth('🇫🇷')).toBe(2);
    expect(displayWidth('👍🏽')).toBe(2);
    expect(displayWidth('\x1b[1mbold\x1b[22m')).toBe(4); // colour codes take no columns
  });

  it('wraps any text within the page, by display width, never splitting a glued value (property)', () => {
    const words = fc.constantFrom('日本語の回答', 'e\u0301te\u0301', '👩‍👩‍👧', 'preferred_format', 'α', glued('p', '8.57e−50'), glued('α', '0.05'), 'x', 'a-very-long-hyphenated-level-label-without-spaces');
    fc.assert(
      fc.property(fc.array(words, { minLength: 1, maxLength: 40 }), fc.integer({ min: 20, max: 100 }), (parts, width) => {
        const lines = wrapText(parts.join(' '), width, '  ', '    ');
        for (const line of lines) expect(stringWidth(line)).toBeLessThanOrEqual(width);
        // a glued value is never split across lines
        expect(lines.some((l) => /(^|\s)p$/.test(l.trimEnd()) || /^\s*8\.57e−50/.test(l))).toBe(false);
        // nothing is lost: the characters come back in order
        // (wrap-ansi gives text in Unicode normal form C: é for e + combining acute)
        expect(lines.join(' ').replace(/\s+/g, '').normalize('NFC')).toBe(parts.join('').replace(/\s|\u00a0/g, '').normalize('NFC'));
      }),
      { numRuns: 200 },
    );
  });

  it('folds a label at spaces and hyphens, and breaks a word only when it must', () => {
    expect(foldLabel('no preference', 10, 3)).toEqual(['no', 'preference']);
    expect(foldLabel('a few times a year', 8, 3)).toEqual(['a few', 'times a', 'year']);
    expect(foldLabel('audiobook', 7, 3, false)).toBeNull();
    expect(foldLabel('日本語日本語', 6, 3)).toEqual(['日本語', '日本語']);
  });

  it('shows a huge label shortened with how much was left out (never silently)', () => {
    const label = 'z'.repeat(1_000_000);
    expect(shownLabel(label)).toMatch(/^z+… \(999,940 more characters\)$/);
    expect(shownLabel('short')).toBe('short');
  });
});

describe('the grid: every label shown whole, within the page (common practice for terminal tables)', () => {
  const plain = new Chalk({ level: 0 });
  const grid = (colLabels: string[], rowLabels: string[], page: number) =>
    renderGrid(
      {
        rowTitle: '地域',
        colTitle: 'réponse →',
        rowLabels,
        colLabels,
        cells: rowLabels.map((_r, i) => colLabels.map((_c, j) => formatCount(1000 * i + j))),
        rowMargin: { title: 'all', cells: rowLabels.map(() => '9,999') },
        colMargin: { title: 'all', cells: colLabels.map(() => '9,999'), corner: '99,999' },
        strong: (s) => plain.bold(s),
        faint: (s) => plain.dim(s),
      },
      page,
    );

  it('fits 80 columns with CJK, emoji and combining labels, and every label character appears', () => {
    const cols = ['東京都', 'e\u0301cole primaire', '👩‍👩‍👧 famille', 'no preference at all', 'oui'];
    const rows = ['北海道', 'Île-de-France région', '🇫🇷 métropole'];
    const lines = grid(cols, rows, 80);
    for (const line of lines) expect(stringWidth(line)).toBeLessThanOrEqual(80);
    // a label may be folded over the header lines (whole words) or given in the legend: each of its words appears
    const text = lines.join(' ').normalize('NFC');
    for (const label of [...cols, ...rows]) for (const word of label.normalize('NFC').split(/\s+/)) expect(text).toContain(word);
  });

  it('splits a wide table into blocks of columns, each within the page', () => {
    const cols = Array.from({ length: 14 }, (_v, j) => `level ${j + 1}`);
    const lines = grid(cols, ['a', 'b'], 60);
    for (const line of lines) expect(stringWidth(line)).toBeLessThanOrEqual(60);
    expect(lines.filter((l) => /^columns \d+–\d+ of 14$/.test(l)).length).toBeGreaterThan(1);
  });

  it('replaces labels too long to fold into three lines by keys, listed whole in a legend', () => {
    const long = 'a label far too long to fold into three narrow header lines of a numeric column';
    const lines = grid([long, 'short'], ['x', 'y'], 80);
    for (const line of lines) expect(stringWidth(line)).toBeLessThanOrEqual(80);
    expect(lines.join('\n').replace(/\s+/g, ' ')).toContain(`A ${long}`);
  });
});

describe('one rule for numbers (docs: src/readableNumbers.ts)', () => {
  it('p-values: three significant digits, exponent form below 0.001 with the minus sign, a floor at 1e−300 that covers subnormals and zero', () => {
    expect(formatP(0.04567)).toBe('0.0457');
    expect(formatP(0.5)).toBe('0.500');
    expect(formatP(8.57e-50)).toBe('8.57e−50');
    expect(formatP(1e-300)).toBe('1.00e−300');
    expect(formatP(9e-301)).toBe('< 1e−300');
    expect(formatP(5e-324)).toBe('< 1e−300'); // the smallest subnormal
    expect(formatP(0)).toBe('< 1e−300');
    expect(formatP(1)).toBe('1');
  });

  it('thousands separators on counts and expected counts; the minus sign and a sign on signed measures', () => {
    expect(formatCount(1234567)).toBe('1,234,567');
    expect(formatExpected(1234.56)).toBe('1,234.6');
    expect(formatExpected(0.042)).toBe('0.042');
    expect(formatSigned(-0.25)).toBe('−0.250');
    expect(formatSigned(0.25)).toBe('+0.250');
    expect(formatSigned(0)).toBe('0.000');
  });
});

describe('simple characters: measured by their length and wrapped without the segmenter (src/render/layout.ts)', () => {
  const simple = new RegExp(`^[${SIMPLE_CHARACTERS}]$`);
  const characters: string[] = [];
  for (let code = 0; code <= 0xffff; code++) if (simple.test(String.fromCharCode(code))) characters.push(String.fromCharCode(code));
  const graphemes = new Intl.Segmenter('en', { granularity: 'grapheme' });

  it('each takes one column by string-width (UAX #11 with ambiguous characters narrow) and is a grapheme of its own (UAX #29)', () => {
    expect(characters.length).toBeGreaterThan(1000);
    for (const c of characters) {
      expect([c, stringWidth(c)]).toEqual([c, 1]);
      expect([c, [...graphemes.segment(`a${c}b${c}${c}`)].length]).toEqual([c, 5]);
    }
  });

  it('a text of them wraps exactly as wrap-ansi wraps it (property)', () => {
    // The glue (a no-break space) is drawn often: wrap-ansi trims one that starts a row.
    const word = fc.array(fc.constantFrom(GLUE, GLUE, GLUE, ...characters.filter((c) => c !== ' ')), { minLength: 1, maxLength: 14 }).map((cs) => cs.join(''));
    fc.assert(
      fc.property(fc.array(word, { minLength: 1, maxLength: 30 }), fc.integer({ min: 8, max: 60 }), (words, width) => {
        const text = words.join(' ');
        // wrapText wraps the text trimmed (of the glue too).
        const expected = wrapAnsi(text.trim(), width, { hard: true, trim: true, wordWrap: true })
          .split('\n')
          .filter((l) => l !== '')
          .map((l) => l.replace(/\u00a0/g, ' '));
        expect(wrapText(text, width)).toEqual(expected);
        expect(displayWidth(text)).toBe(stringWidth(text));
      }),
      { numRuns: 1000 },
    );
  });
});
