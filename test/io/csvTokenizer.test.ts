import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { CsvTokenizer, detectDelimiter } from '../../src/io/csvTokenizer.js';
import { TabsightError } from '../../src/errors.js';

/** Handlers that collect every field as a string, record by record. */
function stringSink(out: string[][]) {
  let values: string[] = [];
  return {
    header: (fields: string[]) => {
      out.push(fields);
      return Int32Array.from({ length: fields.length }, (_v, i) => i);
    },
    fieldBytes: (slot: number, _buf: Uint8Array, view: Buffer, start: number, end: number) => {
      values[slot] = view.toString('utf8', start, end);
    },
    fieldText: (slot: number, value: string) => {
      values[slot] = value;
    },
    record: (fieldCount: number) => {
      out.push(values.slice(0, fieldCount));
      values = [];
    },
  };
}

/** Handlers that want only some field indexes; records keep their field count and the wanted values. */
function partialSink(out: (string | undefined)[][], wanted: (index: number) => boolean) {
  let values: (string | undefined)[] = [];
  let width = 0;
  return {
    header: (fields: string[]) => {
      width = fields.length;
      return Int32Array.from({ length: fields.length }, (_v, i) => (wanted(i) ? i : -1));
    },
    fieldBytes: (slot: number, _buf: Uint8Array, view: Buffer, start: number, end: number) => {
      values[slot] = view.toString('utf8', start, end);
    },
    fieldText: (slot: number, value: string) => {
      values[slot] = value;
    },
    record: (fieldCount: number) => {
      out.push([String(fieldCount), ...Array.from({ length: width }, (_v, i) => (wanted(i) ? values[i] : undefined))]);
      values = [];
    },
  };
}

/** Runs the tokenizer over a document cut into the given chunk sizes; returns every record. */
function tokenize(document: string, delimiter: string, cuts: number[] = []): string[][] {
  const out: string[][] = [];
  feed(new CsvTokenizer(delimiter.charCodeAt(0), stringSink(out), 'test.csv'), document, cuts);
  return out;
}

/** Pushes a document through a tokenizer in chunks of the given sizes, then the rest. */
function feed(tokenizer: CsvTokenizer, document: string, cuts: number[]): void {
  const bytes = Buffer.from(document, 'utf8');
  let at = 0;
  for (const cut of cuts) {
    const end = Math.min(bytes.length, at + cut);
    tokenizer.push(bytes.subarray(at, end));
    at = end;
  }
  tokenizer.push(bytes.subarray(at));
  tokenizer.finish();
}

const fieldText = fc.array(fc.constantFrom('a', 'b', 'Z', '1', ' ', ',', ';', '\t', '|', '"', '\n', '\r\n', 'é', '日', '😀', 'x y'), { maxLength: 6 }).map((parts) => parts.join(''));

const documentArbitrary = fc
  .record({
    delimiter: fc.constantFrom(',', ';', '\t', '|'),
    width: fc.integer({ min: 2, max: 5 }),
    rows: fc.integer({ min: 1, max: 8 }),
    crlf: fc.boolean(),
    finalNewline: fc.boolean(),
    quoteAll: fc.boolean(),
  })
  .chain((shape) =>
    fc.record({
      shape: fc.constant(shape),
      cells: fc.array(fc.array(fieldText, { minLength: shape.width, maxLength: shape.width }), { minLength: shape.rows, maxLength: shape.rows }),
      cuts: fc.array(fc.integer({ min: 1, max: 7 }), { maxLength: 30 }),
    }),
  );

function encodeField(value: string, delimiter: string, quoteAll: boolean): string {
  const needs = value.includes(delimiter) || value.includes('"') || value.includes('\n') || value.includes('\r') || value === '';
  return quoteAll || needs ? `"${value.replace(/"/g, '""')}"` : value;
}

describe('CSV tokenizer', () => {
  it('equals csv-parse field for field on random RFC 4180 documents (random quoting, delimiters, CRLF, embedded newlines, chunk cuts)', () => {
    fc.assert(
      fc.property(documentArbitrary, ({ shape, cells, cuts }) => {
        const eol = shape.crlf ? '\r\n' : '\n';
        const document = cells.map((row) => row.map((v) => encodeField(v, shape.delimiter, shape.quoteAll)).join(shape.delimiter)).join(eol) + (shape.finalNewline ? eol : '');
        const ours = tokenize(document, shape.delimiter, cuts);
        const theirs = parse(document, { delimiter: shape.delimiter, relax_column_count: true, skip_empty_lines: false, bom: true }) as string[][];
        expect(ours).toEqual(theirs);
      }),
      { numRuns: 500 },
    );
  });

  it('with only some columns wanted (the fast path past the last one), field counts and wanted values still equal csv-parse', () => {
    fc.assert(
      fc.property(documentArbitrary, fc.integer({ min: 0, max: 4 }), fc.array(fc.integer({ min: 1, max: 6 }), { maxLength: 3 }), ({ shape, cells, cuts }, lastWanted, extra) => {
        const eol = shape.crlf ? '\r\n' : '\n';
        // ragged rows too: some records get extra trailing fields
        const rows = cells.map((row, k) => (k > 0 && extra[k % (extra.length || 1)] === 1 ? [...row, 'x', 'y'] : row));
        const document = rows.map((row) => row.map((v) => encodeField(v, shape.delimiter, shape.quoteAll)).join(shape.delimiter)).join(eol) + (shape.finalNewline ? eol : '');
        const wanted = (i: number) => i <= lastWanted && i % 2 === 0;
        const out: (string | undefined)[][] = [];
        feed(new CsvTokenizer(shape.delimiter.charCodeAt(0), partialSink(out, wanted), 'test.csv'), document, cuts);
        const theirs = parse(document, { delimiter: shape.delimiter, relax_column_count: true, skip_empty_lines: false, bom: true }) as string[][];
        const width = theirs[0].length;
        const expected = theirs.slice(1).map((r) => [String(r.length), ...Array.from({ length: width }, (_v, i) => (wanted(i) ? r[i] : undefined))]);
        expect(out).toEqual(expected);
      }),
      { numRuns: 500 },
    );
  });

  it('the quote-free path (whole lines before the next quote) equals csv-parse, with each record\'s line: documents with no quote or a few, LF, CRLF and lone CR, empty fields, blank and whitespace-only lines, ragged rows, chunk cuts, some columns wanted', () => {
    const plainValue = fc.array(fc.constantFrom('a', 'b', 'Z', '1', ' ', '\t', 'é', '日', '😀', 'x y', '-', '.', '~'), { maxLength: 4 }).map((parts) => parts.join(''));
    const lineArbitrary = fc.record({
      values: fc.array(plainValue, { minLength: 1, maxLength: 6 }),
      // now and then a quoted field (with the delimiter, a doubled quote and a line feed in it) among plain lines
      quoted: fc.constantFrom(false, false, false, false, false, false, false, true),
      eol: fc.constantFrom('\n', '\n', '\r\n', '\r'),
      blankAfter: fc.constantFrom('', '', '', '', '', '\n', '  \n', '\t\r\n', '\r\n'),
    });
    fc.assert(
      fc.property(
        fc.constantFrom(',', ';', '\t', '|'),
        fc.array(lineArbitrary, { minLength: 1, maxLength: 30 }),
        fc.array(fc.integer({ min: 1, max: 40 }), { maxLength: 20 }),
        fc.array(fc.boolean(), { minLength: 6, maxLength: 6 }),
        fc.boolean(),
        (delimiter, lines, cuts, wantedMask, finalEol) => {
          // A header of 4 fields, then the lines (no delimiter inside a plain value: it would only split it).
          const fieldOf = (v: string) => v.split(delimiter).join('');
          let document = ['h0', 'h1', 'h2', 'h3'].join(delimiter) + '\n';
          const starts: number[] = [];
          lines.forEach((line, k) => {
            const values = line.values.map(fieldOf);
            if (line.quoted) values[values.length - 1] = `"q${delimiter}""x\ny"`;
            // A record that is one blank field is a blank line: skipped, not a record.
            if (values.length === 1 && /^[ \t]*$/.test(values[0])) values[0] = 'v';
            starts.push(document.length);
            document += values.join(delimiter) + (k < lines.length - 1 || finalEol ? line.eol : '');
            // (With a tab delimiter a line of one tab is two empty fields, not a blank line.)
            if (k < lines.length - 1) document += delimiter === '\t' ? line.blankAfter.replace('\t', ' ') : line.blankAfter;
          });
          const wanted = (i: number) => wantedMask[i] === true;
          const out: (string | number | undefined)[][] = [];
          let values: (string | undefined)[] = [];
          const tokenizer = new CsvTokenizer(
            delimiter.charCodeAt(0),
            {
              header: (fields) => Int32Array.from({ length: fields.length }, (_v, i) => (wanted(i) ? i : -1)),
              fieldBytes: (slot, _buf, view, start, end) => {
                values[slot] = view.toString('utf8', start, end);
              },
              fieldText: (slot, value) => {
                values[slot] = value;
              },
              record: (fieldCount, line) => {
                out.push([line, fieldCount, ...Array.from({ length: 4 }, (_v, i) => (wanted(i) && i < fieldCount ? values[i] : undefined))]);
                values = [];
              },
            },
            'test.csv',
          );
          feed(tokenizer, document, cuts);
          const theirs = (parse(document, { delimiter, relax_column_count: true, skip_empty_lines: false, record_delimiter: ['\r\n', '\n', '\r'], relax_quotes: false }) as string[][]).slice(1);
          const blank = (r: string[]) => r.length === 1 && /^[ \t]*$/.test(r[0]);
          const records = theirs.filter((r) => !blank(r));
          // The line of a record: 1 + the line ends before it (a line feed inside quotes counts, as in an editor).
          const lineAt = (offset: number) => 1 + (document.slice(0, offset).match(/\r\n|\n|\r/g) ?? []).length;
          const expected = records.map((r, k) => [lineAt(starts[k]), r.length, ...Array.from({ length: 4 }, (_v, i) => (wanted(i) && i < r.length ? r[i] : undefined))]);
          expect(out).toEqual(expected);
          expect(tokenizer.blankLines).toBe(theirs.length - records.length);
        },
      ),
      { numRuns: 800 },
    );
  });

  it('reads a quoted field holding the delimiter, doubled quotes and a newline (RFC 4180 §2)', () => {
    expect(tokenize('a,b\n"x, ""y""\nz",2\n', ',')).toEqual([
      ['a', 'b'],
      ['x, "y"\nz', '2'],
    ]);
  });

  it('skips blank lines and counts them', () => {
    const out: string[][] = [];
    const t = new CsvTokenizer(44, stringSink(out), 'x');
    t.push(Buffer.from('a,b\n\n1,2\r\n   \n3,4'));
    t.finish();
    expect(out).toEqual([['a', 'b'], ['1', '2'], ['3', '4']]);
    expect(t.blankLines).toBe(2);
  });

  it('names the line of an unterminated quote, a quote inside an unquoted field, and text after a closing quote', () => {
    const message = (doc: string) => {
      try {
        tokenize(doc, ',');
      } catch (error) {
        expect(error).toBeInstanceOf(TabsightError);
        return (error as Error).message;
      }
      return 'no error';
    };
    expect(message('a,b\n1,2\n3,"open\n')).toMatch(/test\.csv, line 3: a quoted field .* never closed/);
    expect(message('a,b\n1,x"y\n')).toMatch(/line 2: a quote inside the unquoted field 2/);
    expect(message('a,b\n"x"y,1\n')).toMatch(/line 2: unexpected character after the closing quote/);
  });

  it('reads one quoted field far larger than its window, pushed in 80 chunks (a quadratic copy would hang past the runner\'s timeout)', () => {
    const big = 'x'.repeat(5_000_000);
    const out = tokenize(`a,b\n"${big}",1\n`, ',', Array.from({ length: 80 }, () => 65536));
    expect(out[1]).toEqual([big, '1']);
  });
});

describe('delimiter detection from the header line', () => {
  it('picks the most frequent of , ; tab | outside quotes', () => {
    expect(detectDelimiter('a,b,c')).toBe(',');
    expect(detectDelimiter('a;b;c')).toBe(';');
    expect(detectDelimiter('a\tb\tc')).toBe('\t');
    expect(detectDelimiter('a|b|c')).toBe('|');
    expect(detectDelimiter('"x,y";b;c')).toBe(';');
    expect(detectDelimiter('single')).toBe(',');
  });
});
