import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import Ajv2020 from 'ajv/dist/2020.js';
import { checkCodebookColumns, parseCodebook, readCodebook } from '../../src/io/codebookFile.js';
import { codebookToCsv, codebookToJson } from '../../src/render/codebookFormat.js';
import type { Codebook } from '../../src/table/codebook.js';
import { TabsightError } from '../../src/errors.js';
import { bareHeaderNames } from '../../src/io/columns.js';
import { ROOT } from '../helpers.js';

const DOC = readFileSync(join(ROOT, 'docs', 'codebook.md'), 'utf8');
const SCHEMA = JSON.parse(readFileSync(join(ROOT, 'docs', 'codebook.schema.json'), 'utf8'));
const ANES = join(ROOT, 'fixtures', 'anes96');
const validate = new Ajv2020({ allErrors: true }).compile(SCHEMA);

function docBlock(language: string, index = 0): string {
  const blocks = [...DOC.matchAll(new RegExp('```' + language + '\\n([\\s\\S]*?)```', 'g'))].map((m) => m[1]);
  return blocks[index];
}

/** The codebook without the positions of its entries, which differ between forms. */
function content(codebook: Codebook) {
  const strip = <T extends { at: string }>(x: T) => {
    const { at: _at, ...rest } = x;
    return rest;
  };
  return codebook.columns.map((c) => ({ ...strip(c), values: c.values.map(strip), missing: c.missing.map(strip), nets: c.nets.map(strip) }));
}

function message(fn: () => unknown): string {
  try {
    fn();
  } catch (error) {
    expect(error).toBeInstanceOf(TabsightError);
    expect((error as TabsightError).exitStatus).toBe(2);
    return (error as Error).message;
  }
  throw new Error('expected an error');
}

describe('the codebook of the 1996 ANES extract (fixtures/anes96, labels from the statsmodels documentation of the data set)', () => {
  const codebook = readCodebook(join(ANES, 'codebook.json'));
  const published = readFileSync(join(ANES, 'published.txt'), 'utf8');
  it('is valid under the JSON Schema and reads into ten columns', () => {
    expect(validate(JSON.parse(readFileSync(join(ANES, 'codebook.json'), 'utf8')))).toBe(true);
    expect(codebook.columns.map((c) => c.name)).toEqual(["popul", "TVnews", "selfLR", "ClinLR", "DoleLR", "PID", "age", "educ", "income", "vote"]);
  });
  it('every code and label is the published "code - label" line, and every question is the published text', () => {
    const lines = published.split('\n').map((l) => l.trim().replace(/\s+/g, ' '));
    for (const column of codebook.columns) {
      for (const value of column.values) expect(lines).toContain(`${value.code} - ${value.label}`);
      const words = published.replace(/\s+/g, ' ');
      expect(words).toContain((column.question as string).replace(/\s+/g, ' '));
    }
  });
  it('matches the columns of the shipped data file', () => {
    // The file writes its headings in single quotes ('PID'); the reader drops them (src/io/columns.ts).
    const raw = readFileSync(join(ANES, 'anes96.csv'), 'utf8').split('\n')[0].split('\t');
    expect(raw[5]).toBe("'PID'");
    expect(() => checkCodebookColumns(codebook, bareHeaderNames(raw), 'anes96.csv')).not.toThrow();
  });
});

describe('the two forms (docs/codebook.md)', () => {
  const json = parseCodebook(docBlock('json'), 'book.json');
  const csv = parseCodebook(docBlock('csv'), 'book.csv');
  it("the documentation's JSON example is valid under the schema, and its CSV example reads as the same codebook", () => {
    expect(validate(JSON.parse(docBlock('json')))).toBe(true);
    expect(content(csv)).toEqual(content(json));
  });
  it('reads labels, order, missing reasons, nets, cuts and bins as documented', () => {
    const [satisfaction, age, minutes, id] = json.columns;
    expect(satisfaction.ordered).toBe(true);
    expect(satisfaction.values.map((v) => [v.code, v.label])).toEqual([['1', 'very dissatisfied'], ['2', 'dissatisfied'], ['3', 'neither'], ['4', 'satisfied'], ['5', 'very satisfied']]);
    expect(satisfaction.missing).toEqual([
      { code: '8', reason: "don't know", label: null, at: 'book.json at /columns/0/values/5' },
      { code: '9', reason: 'refused', label: 'refused to answer', at: 'book.json at /columns/0/values/6' },
    ]);
    expect(satisfaction.nets.map((n) => [n.name, n.codes])).toEqual([['dissatisfied (1-2)', ['1', '2']], ['satisfied (4-5)', ['4', '5']]]);
    expect(age.cuts).toEqual([18, 25, 35, 50, 65]);
    expect(age.missing.map((m) => m.code)).toEqual(['999']);
    expect(minutes.bins).toBe(4);
    expect(id.note).toBe('an identifier; leave out of scans');
  });
  it('what the writer writes reads back as the same codebook, in both forms', () => {
    const anes = readCodebook(join(ANES, 'codebook.json'));
    for (const book of [json, anes]) {
      const again = parseCodebook(codebookToJson(book), 'again.json');
      expect(content(again)).toEqual(content(book));
      expect([again.title, again.source]).toEqual([book.title, book.source]);
      expect(validate(JSON.parse(codebookToJson(book)))).toBe(true);
      expect(content(parseCodebook(codebookToCsv(book), 'again.csv'))).toEqual(content(book));
    }
  });
  it('guards cells a spreadsheet would run as formulas and reads them back unchanged (OWASP, CSV injection)', () => {
    const book = parseCodebook(JSON.stringify({ codebook: 1, columns: [{ name: 'x', values: [{ code: '-1', label: '=HYPERLINK("http://example.invalid")' }, { code: '2', label: '+ve' }, { code: '3', label: '@home' }] }] }), 'f.json');
    const text = codebookToCsv(book);
    expect(text).toContain(`x,-1,"'=HYPERLINK(""http://example.invalid"")"`);
    expect(text).toContain("x,2,'+ve");
    expect(content(parseCodebook(text, 'f.csv'))).toEqual(content(book));
  });
  it('reads the CSV form saved with semicolons, a byte-order mark, CRLF and empty rows, in any heading order', () => {
    const text = '\ufeffCode;Column;Label;Missing\r\n1;q1;yes;\r\n;;;\r\n2;q1;no;\r\n9;q1;;refused\r\n';
    const book = parseCodebook(Buffer.from(text, 'utf8'), 'book.csv');
    expect(book.columns[0].values.map((v) => v.label)).toEqual(['yes', 'no']);
    expect(book.columns[0].missing[0]).toEqual({ code: '9', reason: 'refused', label: null, at: 'book.csv, line 5' });
  });
});

describe('codebook errors: one line naming the file and the entry', () => {
  const j = (value: unknown) => JSON.stringify(value);
  const jsonError = (value: unknown) => message(() => parseCodebook(typeof value === 'string' ? value : j(value), 'book.json'));
  const csvError = (text: string) => message(() => parseCodebook(text, 'book.csv'));
  const col = (extra: object) => ({ codebook: 1, columns: [{ name: 'q', ...extra }] });

  it('JSON form: the pointer of the entry', () => {
    expect(jsonError('{"codebook": 1,\n  "columns": [}')).toMatch(/^book\.json, line 2, column 15: not valid JSON/);
    expect(jsonError('{"codebook": 1, }')).toBe('book.json, line 1, column 17: not valid JSON (expected a member name in double quotes, found "}")');
    expect(jsonError('{"codebook": 1,\n "title": "open\n}')).toBe('book.json, line 2, column 16: not valid JSON (a control character (such as a line break) inside a string)');
    expect(jsonError('{"codebook": 1} x')).toBe('book.json, line 1, column 17: not valid JSON (text after the end of the JSON value: "x")');
    expect(jsonError({ columns: [] })).toBe('book.json at /: not a codebook: the object has no "codebook": 1 member (docs/codebook.md)');
    expect(jsonError({ codebook: 2, columns: [] })).toBe('book.json at /codebook: this version reads codebook format 1, found 2');
    expect(jsonError(col({ qestion: 'x' }))).toBe('book.json at /columns/0/qestion: "qestion" is not a member of a column; did you mean "question"? (members: name, question, ordered, values, nets, cuts, bins, note)');
    expect(jsonError({ codebook: 1, columns: [{ name: 'q' }, { name: 'q' }] })).toBe('book.json at /columns/1/name: column "q" is described twice (first at /columns/0)');
    expect(jsonError(col({ values: [{ code: 1, label: 'a' }, { code: '1.0', label: 'b' }] }))).toBe('book.json at /columns/0/values/1/code: code "1.0" of column "q" is listed twice (first at /columns/0/values/0)');
    expect(jsonError(col({ values: [{ code: 1 }] }))).toBe('book.json at /columns/0/values/0: code "1" needs a "label", or a "missing" reason');
    expect(jsonError(col({ values: [{ code: ' 1', label: 'a' }] }))).toBe('book.json at /columns/0/values/0/code: code " 1" has spaces around it; values are compared after trimming, so write "1"');
    expect(jsonError(col({ values: [{ code: 1, label: 'a' }], nets: [{ name: 'n', codes: [2] }] }))).toBe('book.json at /columns/0/nets/0/codes/0: net "n" names code "2", which column "q" does not list');
    expect(jsonError(col({ values: [{ code: 1, label: 'a' }, { code: 9, missing: 'refused' }], nets: [{ name: 'n', codes: [9] }] }))).toBe('book.json at /columns/0/nets/0/codes/0: net "n" names code "9", a missing code of "q"; a net groups answers');
    expect(jsonError(col({ cuts: [18, 18] }))).toBe('book.json at /columns/0/cuts/1: cut points must increase (18 then 18)');
    expect(jsonError(col({ cuts: [18], bins: 3 }))).toBe('book.json at /columns/0/bins: column "q" gives both cuts and bins; give one of them');
    expect(jsonError(col({ bins: 1 }))).toBe('book.json at /columns/0/bins: expected a whole number of at least 2, found 1');
    expect(jsonError(col({ values: [{ code: 1, label: 'a' }], cuts: [5] }))).toMatch(/^book\.json at \/columns\/0\/cuts: column "q" gives labels and cuts/);
    expect(jsonError(col({ ordered: 'yes' }))).toBe('book.json at /columns/0/ordered: expected true or false, found a string');
  });

  it('CSV form: the line and the column', () => {
    expect(csvError('column,code,lable\nq,1,a\n')).toBe('book.csv, line 1, column 3: "lable" is not a codebook heading; did you mean "label"? (headings: column, code, label, missing, nets, question, ordered, cuts, bins, note)');
    expect(csvError('column,label\nq,a\n')).toBe('book.csv, line 1: the codebook needs a "code" heading (headings: column, code, label, missing, nets, question, ordered, cuts, bins, note)');
    expect(csvError('column,code,label\nq,1,a\nq,01,b\n')).toBe('book.csv, line 3, column 2 (code): code "01" of column "q" is listed twice (first on line 2)');
    expect(csvError('column,code,label\nq,1,\n')).toBe('book.csv, line 2, column 3 (label): code "1" needs a label, or a reason in the missing column');
    expect(csvError('column,code,label\n,1,a\n')).toBe('book.csv, line 2, column 1 (column): every row names its column');
    expect(csvError('column,code,label,question\nq,,,first\nq,1,a,second\n')).toBe('book.csv, line 3, column 4 (question): column "q" already has question "first" (line 2); give it once');
    expect(csvError('column,code,cuts\nq,,18;x\n')).toBe('book.csv, line 2, column 3 (cuts): "x" is not a number (write cut points as 18;25;35)');
    expect(csvError('column,code,ordered\nq,,maybe\n')).toBe('book.csv, line 2, column 3 (ordered): "maybe" is not yes or no');
    expect(csvError('column,code,label,missing,nets\nq,9,,refused,agree\n')).toBe('book.csv, line 2, column 5 (nets): code "9" is a missing code; a net groups answers');
    expect(csvError('column,code,label,cuts\nq,,,18\nq,1,a,\n')).toBe('book.csv, line 2, column 4 (cuts): column "q" gives labels and cuts; a column is either labelled codes or numbers to cut (missing codes may go with either)');
    expect(csvError('column,code,label\nq,"1,a\n')).toMatch(/^book\.csv, line 2: a quoted field/);
  });

  it('a column the data file lacks, with the closest heading', () => {
    const book = parseCodebook(j({ codebook: 1, columns: [{ name: 'statisfaction' }] }), 'book.json');
    expect(message(() => checkCodebookColumns(book, ['satisfaction', 'age'], 'week.csv'))).toBe('book.json at /columns/0: column "statisfaction" is not in week.csv; did you mean "satisfaction"?');
  });

  it('files that are not codebooks', () => {
    expect(message(() => parseCodebook('', 'empty.csv'))).toBe('empty.csv: the codebook is empty');
    expect(message(() => parseCodebook(Uint8Array.from([0x7b, 0xff, 0xfe]), 'bin.json'))).toBe('bin.json: a codebook must be UTF-8 text');
    expect(message(() => readCodebook(join(ROOT, 'no-such-codebook.json')))).toMatch(/no such file$/);
    expect(message(() => readCodebook(ROOT))).toMatch(/is a directory/);
  });
});

describe('the JSON Schema and the reader agree on the shape of a codebook', () => {
  const shapes: unknown[] = [
    { columns: [] },
    { codebook: 1 },
    { codebook: 1, columns: [{ question: 'x' }] },
    { codebook: 1, columns: [{ name: '' }] },
    { codebook: 1, columns: [{ name: 'q', extra: 1 }] },
    { codebook: 1, columns: [{ name: 'q', values: [{ code: 1 }] }] },
    { codebook: 1, columns: [{ name: 'q', values: [{ code: true, label: 'a' }] }] },
    { codebook: 1, columns: [{ name: 'q', values: [{ code: '', label: 'a' }] }] },
    { codebook: 1, columns: [{ name: 'q', values: [{ code: 1, label: '' }] }] },
    { codebook: 1, columns: [{ name: 'q', cuts: [] }] },
    { codebook: 1, columns: [{ name: 'q', cuts: ['18'] }] },
    { codebook: 1, columns: [{ name: 'q', bins: 2.5 }] },
    { codebook: 1, columns: [{ name: 'q', cuts: [1], bins: 2 }] },
    { codebook: 1, columns: [{ name: 'q', nets: [{ name: 'n', codes: [] }] }] },
    { codebook: 1, columns: [{ name: 'q', ordered: 1 }] },
    { codebook: 1, title: 5, columns: [] },
  ];
  it('every shape the schema refuses, the reader refuses too', () => {
    for (const shape of shapes) {
      expect(validate(shape), JSON.stringify(shape)).toBe(false);
      expect(() => parseCodebook(JSON.stringify(shape), 'x.json'), JSON.stringify(shape)).toThrow(TabsightError);
    }
  });
});
