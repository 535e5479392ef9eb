/**
 * Reading a codebook file (JSON or spreadsheet CSV, docs/codebook.md) into
 * one typed codebook, with one-line errors naming the entry.
 */
import { readFileSync, statSync } from 'node:fs';
import { restoreFormula } from '../escape/spreadsheet.js';
import { TabsightError, usageError } from '../errors.js';
import { Codebook, CodebookColumn, CodeEntry, codeKey, MissingCode, Net } from '../table/codebook.js';
import { closestName } from './columns.js';
import { CsvTokenizer, detectDelimiter } from './csvTokenizer.js';

/**
 * Reads a codebook in either of its forms (docs/codebook.md) into one typed
 * Codebook. Every problem with the file itself is an error of one line that
 * names the file and the entry: the JSON pointer (RFC 6901) in the JSON
 * form, the line and column in the CSV form. Problems that only a given
 * week's data can show (a code nobody chose) are warnings raised later
 * (table/codebook.ts), never here.
 */

/** The format version this reader understands (the `codebook` member of the JSON form). */
export const CODEBOOK_VERSION = 1;

/** The CSV form's headings, in the order the writer puts them. */
export const CODEBOOK_CSV_HEADINGS = ['column', 'code', 'label', 'missing', 'nets', 'question', 'ordered', 'cuts', 'bins', 'note'] as const;
type Heading = (typeof CODEBOOK_CSV_HEADINGS)[number];

/** Largest codebook read (a codebook is a small file; this keeps a wrong path from filling memory). */
const MAX_CODEBOOK_BYTES = 64 * 1024 * 1024;

/** Reads and parses a codebook file. */
export function readCodebook(path: string): Codebook {
  let size: number;
  try {
    const stat = statSync(path);
    if (stat.isDirectory()) throw usageError(`--codebook ${path}: is a directory, not a codebook file`);
    size = stat.size;
  } catch (error) {
    if (error instanceof TabsightError) throw error;
    const code = (error as NodeJS.ErrnoException).code;
    throw usageError(`--codebook ${path}: ${code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : `cannot be read (${code ?? String(error)})`}`);
  }
  if (size > MAX_CODEBOOK_BYTES) throw usageError(`--codebook ${path}: ${size.toLocaleString('en-US')} bytes is too large for a codebook (at most ${MAX_CODEBOOK_BYTES.toLocaleString('en-US')})`);
  const bytes = readFileSync(path);
  return parseCodebook(bytes, path);
}

/** Parses a codebook from its bytes: the JSON form when the first character is "{", the CSV form otherwise. */
export function parseCodebook(input: Uint8Array | string, file: string): Codebook {
  let text: string;
  if (typeof input === 'string') text = input;
  else {
    try {
      text = new TextDecoder('utf-8', { fatal: true }).decode(input);
    } catch {
      throw usageError(`${file}: a codebook must be UTF-8 text`);
    }
  }
  if (text.charCodeAt(0) === 0xfeff) text = text.slice(1);
  if (text.trim() === '') throw usageError(`${file}: the codebook is empty`);
  return text.trimStart().startsWith('{') ? parseJsonCodebook(text, file) : parseCsvCodebook(text, file);
}

// ---------------------------------------------------------------- JSON form

type Json = null | boolean | number | string | Json[] | { [key: string]: Json };

function jsonFail(file: string, pointer: string, message: string): never {
  throw usageError(`${file} at ${pointer === '' ? '/' : pointer}: ${message}`);
}

/** Line and column of a character offset, for a JSON syntax error. */
function lineAndColumn(text: string, offset: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let i = 0; i < offset && i < text.length; i++) {
    if (text[i] === '\n') {
      line++;
      start = i + 1;
    }
  }
  return { line, column: offset - start + 1 };
}

/**
 * Where a JSON text first breaks the grammar of RFC 8259, and how: the
 * engine's own message does not always give a position.
 */
export function jsonSyntaxProblem(text: string): { offset: number; reason: string } {
  let i = 0;
  const fail = (reason: string): never => {
    throw { offset: i, reason };
  };
  const space = () => {
    while (i < text.length && ' \t\n\r'.includes(text[i])) i++;
  };
  const what = () => (i >= text.length ? 'the end of the file' : `"${text[i]}"`);
  const value = (): void => {
    space();
    const c = text[i];
    if (c === '{') {
      i++;
      space();
      if (text[i] === '}') {
        i++;
        return;
      }
      for (;;) {
        space();
        if (text[i] !== '"') fail(`expected a member name in double quotes, found ${what()}`);
        string();
        space();
        if (text[i] !== ':') fail(`expected ":" after a member name, found ${what()}`);
        i++;
        value();
        space();
        if (text[i] === ',') {
          i++;
          continue;
        }
        if (text[i] === '}') {
          i++;
          return;
        }
        fail(`expected "," or "}" in an object, found ${what()}`);
      }
    }
    if (c === '[') {
      i++;
      space();
      if (text[i] === ']') {
        i++;
        return;
      }
      for (;;) {
        value();
        space();
        if (text[i] === ',') {
          i++;
          continue;
        }
        if (text[i] === ']') {
          i++;
          return;
        }
        fail(`expected "," or "]" in an array, found ${what()}`);
      }
    }
    if (c === '"') return string();
    const literal = /^(true|false|null|-?(0|[1-9]\d*)(\.\d+)?([eE][+-]?\d+)?)/.exec(text.slice(i, i + 400));
    if (literal) {
      i += literal[0].length;
      return;
    }
    fail(`expected a value, found ${what()}`);
  };
  const string = () => {
    i++;
    while (i < text.length) {
      const c = text[i];
      if (c === '"') {
        i++;
        return;
      }
      if (c === '\\') {
        const next = text[i + 1];
        if (next === 'u' && /^[0-9a-fA-F]{4}$/.test(text.slice(i + 2, i + 6))) i += 6;
        else if (next !== undefined && '"\\/bfnrt'.includes(next)) i += 2;
        else fail('a backslash that starts no escape');
        continue;
      }
      if (c < ' ') fail('a control character (such as a line break) inside a string');
      i++;
    }
    fail('a string that is never closed');
  };
  try {
    value();
    space();
    if (i < text.length) fail(`text after the end of the JSON value: ${what()}`);
  } catch (error) {
    return error as { offset: number; reason: string };
  }
  return { offset: 0, reason: 'the JSON reader refused it' };
}

function kindOf(value: Json | undefined): string {
  if (value === null) return 'null';
  if (Array.isArray(value)) return 'an array';
  if (typeof value === 'object') return 'an object';
  if (typeof value === 'string') return 'a string';
  return `a ${typeof value}`;
}

function only(file: string, pointer: string, object: { [key: string]: Json }, allowed: readonly string[], what: string): void {
  for (const key of Object.keys(object)) {
    if (!allowed.includes(key)) {
      const suggestion = closestName(key, allowed);
      jsonFail(file, `${pointer}/${escapePointer(key)}`, `"${key}" is not a member of ${what}${suggestion ? `; did you mean "${suggestion}"?` : ''} (members: ${allowed.join(', ')})`);
    }
  }
}

function escapePointer(key: string): string {
  return key.replace(/~/g, '~0').replace(/\//g, '~1');
}

function optionalText(file: string, pointer: string, value: Json | undefined, allowEmpty = true): string | null {
  if (value === undefined || value === null) return null;
  if (typeof value !== 'string') jsonFail(file, pointer, `expected a string, found ${kindOf(value)}`);
  if (!allowEmpty && value.trim() === '') jsonFail(file, pointer, 'must not be empty');
  return value;
}

function codeText(file: string, pointer: string, value: Json | undefined): string {
  if (typeof value === 'number' && Number.isFinite(value)) return String(value);
  if (typeof value !== 'string') jsonFail(file, pointer, `a code is a string or a number, found ${value === undefined ? 'nothing' : kindOf(value)}`);
  if (value.trim() === '') jsonFail(file, pointer, 'a code must not be empty (an empty field is always missing)');
  if (value !== value.trim()) jsonFail(file, pointer, `code "${value}" has spaces around it; values are compared after trimming, so write "${value.trim()}"`);
  return value;
}

const TOP_MEMBERS = ['codebook', 'title', 'source', 'columns'];
const COLUMN_MEMBERS = ['name', 'question', 'ordered', 'values', 'nets', 'cuts', 'bins', 'note'];
const VALUE_MEMBERS = ['code', 'label', 'missing'];
const NET_MEMBERS = ['name', 'codes'];

export function parseJsonCodebook(text: string, file: string): Codebook {
  let document: Json;
  try {
    document = JSON.parse(text) as Json;
  } catch {
    const problem = jsonSyntaxProblem(text);
    const where = lineAndColumn(text, problem.offset);
    throw usageError(`${file}, line ${where.line}, column ${where.column}: not valid JSON (${problem.reason})`);
  }
  if (document === null || typeof document !== 'object' || Array.isArray(document)) jsonFail(file, '', `a codebook is a JSON object, found ${kindOf(document)}`);
  only(file, '', document, TOP_MEMBERS, 'a codebook');
  if (document.codebook === undefined) jsonFail(file, '', `not a codebook: the object has no "codebook": ${CODEBOOK_VERSION} member (docs/codebook.md)`);
  if (document.codebook !== CODEBOOK_VERSION) jsonFail(file, '/codebook', `this version reads codebook format ${CODEBOOK_VERSION}, found ${JSON.stringify(document.codebook)}`);
  const title = optionalText(file, '/title', document.title);
  const source = optionalText(file, '/source', document.source);
  const list = document.columns;
  if (!Array.isArray(list)) jsonFail(file, '/columns', `expected an array of columns, found ${list === undefined ? 'nothing' : kindOf(list)}`);
  const columns: CodebookColumn[] = [];
  const names = new Map<string, string>();
  list.forEach((entry, i) => {
    const pointer = `/columns/${i}`;
    const column = jsonColumn(file, pointer, entry);
    const earlier = names.get(column.name);
    if (earlier !== undefined) jsonFail(file, `${pointer}/name`, `column "${column.name}" is described twice (first at ${earlier})`);
    names.set(column.name, pointer);
    columns.push(column);
  });
  return { file, title, source, columns };
}

function jsonColumn(file: string, pointer: string, entry: Json): CodebookColumn {
  if (entry === null || typeof entry !== 'object' || Array.isArray(entry)) jsonFail(file, pointer, `a column is an object, found ${kindOf(entry)}`);
  only(file, pointer, entry, COLUMN_MEMBERS, 'a column');
  if (entry.name === undefined) jsonFail(file, pointer, 'a column needs a "name" (its heading in the data file)');
  const name = optionalText(file, `${pointer}/name`, entry.name, false) as string;
  const question = optionalText(file, `${pointer}/question`, entry.question);
  const note = optionalText(file, `${pointer}/note`, entry.note);
  let ordered = false;
  if (entry.ordered !== undefined && entry.ordered !== null) {
    if (typeof entry.ordered !== 'boolean') jsonFail(file, `${pointer}/ordered`, `expected true or false, found ${kindOf(entry.ordered)}`);
    ordered = entry.ordered;
  }
  const values: CodeEntry[] = [];
  const missing: MissingCode[] = [];
  const codes = new Map<string, string>();
  if (entry.values !== undefined && entry.values !== null) {
    if (!Array.isArray(entry.values)) jsonFail(file, `${pointer}/values`, `expected an array of codes, found ${kindOf(entry.values)}`);
    entry.values.forEach((value, k) => {
      const at = `${pointer}/values/${k}`;
      if (value === null || typeof value !== 'object' || Array.isArray(value)) jsonFail(file, at, `a value is an object such as {"code": "1", "label": "agree"}, found ${kindOf(value)}`);
      only(file, at, value, VALUE_MEMBERS, 'a value');
      const code = codeText(file, `${at}/code`, value.code);
      const earlier = codes.get(codeKey(code));
      if (earlier !== undefined) jsonFail(file, `${at}/code`, `code "${code}" of column "${name}" is listed twice (first at ${earlier})`);
      codes.set(codeKey(code), at);
      const label = optionalText(file, `${at}/label`, value.label, false);
      const reason = optionalText(file, `${at}/missing`, value.missing, false);
      if (reason !== null) missing.push({ code, reason, label, at: `${file} at ${at}` });
      else if (label !== null) values.push({ code, label, at: `${file} at ${at}` });
      else jsonFail(file, at, `code "${code}" needs a "label", or a "missing" reason`);
    });
  }
  const nets = jsonNets(file, pointer, entry.nets, name, values, missing);
  const cuts = jsonCuts(file, `${pointer}/cuts`, entry.cuts);
  let bins: number | null = null;
  if (entry.bins !== undefined && entry.bins !== null) {
    if (typeof entry.bins !== 'number' || !Number.isInteger(entry.bins) || entry.bins < 2) jsonFail(file, `${pointer}/bins`, `expected a whole number of at least 2, found ${JSON.stringify(entry.bins)}`);
    bins = entry.bins;
  }
  checkColumnShape(name, values, cuts, bins, (field, message) => jsonFail(file, `${pointer}/${field}`, message));
  return { name, question, ordered, values, missing, nets, cuts, bins, note, at: `${file} at ${pointer}` };
}

function jsonNets(file: string, pointer: string, nets: Json | undefined, column: string, values: CodeEntry[], missing: MissingCode[]): Net[] {
  if (nets === undefined || nets === null) return [];
  if (!Array.isArray(nets)) jsonFail(file, `${pointer}/nets`, `expected an array of nets, found ${kindOf(nets)}`);
  const out: Net[] = [];
  nets.forEach((net, k) => {
    const at = `${pointer}/nets/${k}`;
    if (net === null || typeof net !== 'object' || Array.isArray(net)) jsonFail(file, at, `a net is an object such as {"name": "agree", "codes": ["4", "5"]}, found ${kindOf(net)}`);
    only(file, at, net, NET_MEMBERS, 'a net');
    if (net.name === undefined) jsonFail(file, at, 'a net needs a "name"');
    const name = optionalText(file, `${at}/name`, net.name, false) as string;
    if (name.includes(';')) jsonFail(file, `${at}/name`, `net "${name}": a net's name may not contain ";" (the CSV form lists nets with it)`);
    if (!Array.isArray(net.codes) || net.codes.length === 0) jsonFail(file, `${at}/codes`, `net "${name}" needs a non-empty array of codes`);
    const codes = net.codes.map((c, j) => codeText(file, `${at}/codes/${j}`, c));
    const problem = netProblem(column, name, codes, values, missing, out);
    if (problem) jsonFail(file, `${at}/${problem.field}${problem.index !== undefined ? `/${problem.index}` : ''}`, problem.message);
    out.push({ name, codes: inValueOrder(codes, values), at: `${file} at ${at}` });
  });
  return inFirstCodeOrder(out, values);
}

function jsonCuts(file: string, pointer: string, cuts: Json | undefined): number[] | null {
  if (cuts === undefined || cuts === null) return null;
  if (!Array.isArray(cuts) || cuts.length === 0) jsonFail(file, pointer, 'expected a non-empty array of increasing numbers');
  const numbers = cuts.map((c, k) => {
    if (typeof c !== 'number' || !Number.isFinite(c)) jsonFail(file, `${pointer}/${k}`, `a cut point is a number, found ${kindOf(c)}`);
    return c;
  });
  const problem = cutsProblem(numbers);
  if (problem !== null) jsonFail(file, `${pointer}/${problem.index}`, problem.message);
  return numbers;
}

// ----------------------------------------------------- rules of both forms

function cutsProblem(cuts: readonly number[]): { index: number; message: string } | null {
  for (let k = 1; k < cuts.length; k++) {
    if (!(cuts[k] > cuts[k - 1])) return { index: k, message: `cut points must increase (${cuts[k - 1]} then ${cuts[k]})` };
  }
  return null;
}

function checkColumnShape(name: string, values: CodeEntry[], cuts: number[] | null, bins: number | null, fail: (field: string, message: string) => never): void {
  if (cuts !== null && bins !== null) fail('bins', `column "${name}" gives both cuts and bins; give one of them`);
  if ((cuts !== null || bins !== null) && values.length > 0) {
    fail(cuts !== null ? 'cuts' : 'bins', `column "${name}" gives labels and ${cuts !== null ? 'cuts' : 'bins'}; a column is either labelled codes or numbers to cut (missing codes may go with either)`);
  }
}

/** A net's codes in the order the column lists them, so that both forms give the same net. */
function inValueOrder(codes: string[], values: readonly CodeEntry[]): string[] {
  const position = new Map(values.map((v, k) => [codeKey(v.code), k]));
  return [...codes].sort((a, b) => (position.get(codeKey(a)) as number) - (position.get(codeKey(b)) as number));
}

/** Nets in the order of their first code (then as given): the order they are reported in. */
function inFirstCodeOrder(nets: Net[], values: readonly CodeEntry[]): Net[] {
  const position = new Map(values.map((v, k) => [codeKey(v.code), k]));
  const first = (net: Net) => position.get(codeKey(net.codes[0])) as number;
  return nets.map((net, k) => ({ net, k })).sort((a, b) => first(a.net) - first(b.net) || a.k - b.k).map((x) => x.net);
}

function netProblem(column: string, name: string, codes: string[], values: CodeEntry[], missing: MissingCode[], earlier: Net[]): { field: string; index?: number; message: string } | null {
  if (earlier.some((n) => n.name === name)) return { field: 'name', message: `net "${name}" of column "${column}" is defined twice` };
  const labelled = new Set(values.map((v) => codeKey(v.code)));
  const missingKeys = new Set(missing.map((v) => codeKey(v.code)));
  const seen = new Set<string>();
  for (let j = 0; j < codes.length; j++) {
    const key = codeKey(codes[j]);
    if (missingKeys.has(key)) return { field: 'codes', index: j, message: `net "${name}" names code "${codes[j]}", a missing code of "${column}"; a net groups answers` };
    if (!labelled.has(key)) return { field: 'codes', index: j, message: `net "${name}" names code "${codes[j]}", which column "${column}" does not list` };
    if (seen.has(key)) return { field: 'codes', index: j, message: `net "${name}" names code "${codes[j]}" twice` };
    seen.add(key);
  }
  return null;
}

// ----------------------------------------------------------------- CSV form

interface CsvRecord {
  line: number;
  fields: string[];
}

function csvRecords(text: string, file: string): { delimiter: string; records: CsvRecord[] } {
  const firstLine = text.split(/\r\n|\n|\r/).find((l) => l.trim() !== '') ?? '';
  const delimiter = detectDelimiter(firstLine);
  const records: CsvRecord[] = [];
  let current: string[] = [];
  const tokenizer = new CsvTokenizer(
    delimiter.charCodeAt(0),
    {
      header: (fields, line) => {
        records.push({ line, fields: fields.map((f) => f) });
        // Every field of every later record is wanted: slots 0..n−1, and more for long rows.
        return new Int32Array(4096).map((_v, i) => i);
      },
      fieldBytes: (slot, _buf, view, start, end) => {
        current[slot] = view.toString('utf8', start, end);
      },
      fieldText: (slot, value) => {
        current[slot] = value;
      },
      record: (fieldCount, line) => {
        const fields = new Array<string>(fieldCount);
        for (let k = 0; k < fieldCount; k++) fields[k] = current[k] ?? '';
        records.push({ line, fields });
        current = [];
      },
    },
    file,
  );
  try {
    tokenizer.push(Buffer.from(text, 'utf8'));
    tokenizer.finish();
  } catch (error) {
    if (error instanceof TabsightError) throw usageError(error.message);
    throw error;
  }
  return { delimiter, records };
}

/**
 * Removes the apostrophe the writer puts before a text that a spreadsheet
 * would run as a formula (render/codebookFormat.ts, spreadsheetCell).
 */
function unguard(value: string): string {
  return restoreFormula(value);
}

const YES = new Set(['yes', 'y', 'true', '1', 'ordered']);
const NO = new Set(['no', 'n', 'false', '0', '']);

export function parseCsvCodebook(text: string, file: string): Codebook {
  const { records } = csvRecords(text, file);
  if (records.length === 0) throw usageError(`${file}: the codebook is empty`);
  const [headerRecord, ...rows] = records;
  const headings = headerRecord.fields.map((h) => h.trim().toLowerCase());
  const position = new Map<Heading, number>();
  headings.forEach((heading, k) => {
    const at = `${file}, line ${headerRecord.line}, column ${k + 1}`;
    if (!(CODEBOOK_CSV_HEADINGS as readonly string[]).includes(heading)) {
      const suggestion = closestName(heading, CODEBOOK_CSV_HEADINGS);
      throw usageError(`${at}: "${headerRecord.fields[k].trim()}" is not a codebook heading${suggestion ? `; did you mean "${suggestion}"?` : ''} (headings: ${CODEBOOK_CSV_HEADINGS.join(', ')})`);
    }
    if (position.has(heading as Heading)) throw usageError(`${at}: the heading "${heading}" appears twice (columns ${(position.get(heading as Heading) as number) + 1} and ${k + 1})`);
    position.set(heading as Heading, k);
  });
  for (const required of ['column', 'code'] as const) {
    if (!position.has(required)) throw usageError(`${file}, line ${headerRecord.line}: the codebook needs a "${required}" heading (headings: ${CODEBOOK_CSV_HEADINGS.join(', ')})`);
  }

  interface Draft {
    column: CodebookColumn;
    codes: Map<string, string>;
    netCodes: Map<string, { codes: string[]; at: string }>;
    /** Where each column-level field was given, for conflicts. */
    given: Map<string, { value: string; line: number; at: string }>;
  }
  const drafts = new Map<string, Draft>();
  const order: Draft[] = [];

  for (const record of rows) {
    const cellAt = (heading: Heading) => `${file}, line ${record.line}, column ${(position.get(heading) as number) + 1} (${heading})`;
    const fail = (heading: Heading, message: string): never => {
      throw usageError(`${cellAt(heading)}: ${message}`);
    };
    if (record.fields.every((f) => f.trim() === '')) continue; // a spreadsheet's empty row
    if (record.fields.length > headings.length && record.fields.slice(headings.length).some((f) => f.trim() !== '')) {
      throw usageError(`${file}, line ${record.line}, column ${headings.length + 1}: a value beyond the last heading`);
    }
    const cell = (heading: Heading) => {
      const k = position.get(heading);
      return k === undefined ? '' : unguard((record.fields[k] ?? '').trim());
    };
    const name = cell('column');
    if (name === '') fail('column', 'every row names its column');
    let draft = drafts.get(name);
    if (!draft) {
      draft = {
        column: { name, question: null, ordered: false, values: [], missing: [], nets: [], cuts: null, bins: null, note: null, at: `${file}, line ${record.line}` },
        codes: new Map(),
        netCodes: new Map(),
        given: new Map(),
      };
      drafts.set(name, draft);
      order.push(draft);
    }
    const d = draft;
    // Column-level cells: on the column's own row (code empty) or on any of its rows, once.
    const columnField = (heading: Heading, apply: (value: string) => void) => {
      const value = cell(heading);
      if (value === '') return;
      const earlier = d.given.get(heading);
      if (earlier && earlier.value !== value) fail(heading, `column "${name}" already has ${heading} "${earlier.value}" (line ${earlier.line}); give it once`);
      if (!earlier) {
        apply(value);
        d.given.set(heading, { value, line: record.line, at: cellAt(heading) });
      }
    };
    columnField('question', (v) => (d.column.question = v));
    columnField('note', (v) => (d.column.note = v));
    columnField('ordered', (v) => {
      const lower = v.toLowerCase();
      if (YES.has(lower)) d.column.ordered = true;
      else if (NO.has(lower)) d.column.ordered = false;
      else fail('ordered', `"${v}" is not yes or no`);
    });
    columnField('cuts', (v) => {
      const parts = v.split(/[;,\s]+/).filter((p) => p !== '');
      const numbers = parts.map((p) => {
        if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(p)) fail('cuts', `"${p}" is not a number (write cut points as 18;25;35)`);
        return Number(p);
      });
      const problem = cutsProblem(numbers);
      if (problem) fail('cuts', problem.message);
      d.column.cuts = numbers;
    });
    columnField('bins', (v) => {
      if (!/^\d+$/.test(v) || Number(v) < 2) fail('bins', `"${v}" is not a whole number of at least 2`);
      d.column.bins = Number(v);
    });
    const code = cell('code');
    const label = cell('label');
    const reason = cell('missing');
    const nets = cell('nets');
    if (code === '') {
      if (label !== '') fail('label', 'a label needs a code in the same row');
      if (reason !== '') fail('missing', 'a missing reason needs a code in the same row');
      if (nets !== '') fail('nets', 'a net needs a code in the same row');
      continue;
    }
    const key = codeKey(code);
    const earlier = d.codes.get(key);
    if (earlier !== undefined) fail('code', `code "${code}" of column "${name}" is listed twice (first on ${earlier})`);
    d.codes.set(key, `line ${record.line}`);
    const at = `${file}, line ${record.line}`;
    if (reason !== '') {
      if (nets !== '') fail('nets', `code "${code}" is a missing code; a net groups answers`);
      d.column.missing.push({ code, reason, label: label === '' ? null : label, at });
    } else if (label !== '') d.column.values.push({ code, label, at });
    else fail('label', `code "${code}" needs a label, or a reason in the missing column`);
    for (const netName of nets.split(';').map((n) => n.trim()).filter((n) => n !== '')) {
      const net = d.netCodes.get(netName) ?? { codes: [], at: cellAt('nets') };
      if (net.codes.some((c) => codeKey(c) === key)) fail('nets', `net "${netName}" names code "${code}" twice`);
      net.codes.push(code);
      d.netCodes.set(netName, net);
    }
  }
  const columns = order.map((d) => {
    const fail = (field: string, message: string): never => {
      throw usageError(`${d.given.get(field)?.at ?? d.column.at}: ${message}`);
    };
    checkColumnShape(d.column.name, d.column.values, d.column.cuts, d.column.bins, fail);
    d.column.nets = inFirstCodeOrder([...d.netCodes].map(([name, net]) => ({ name, codes: inValueOrder(net.codes, d.column.values), at: net.at })), d.column.values);
    return d.column;
  });
  return { file, title: null, source: null, columns };
}

// ----------------------------------------------------- against the data

/**
 * Every column the codebook describes must be in the data file: a codebook
 * that names a column the file lacks was written for another export (or
 * has a typo), and its labels would silently not apply.
 */
export function checkCodebookColumns(codebook: Codebook, header: readonly string[], dataLabel: string): void {
  const present = new Set(header);
  for (const column of codebook.columns) {
    if (present.has(column.name)) continue;
    const folded = header.find((h) => h.toLowerCase() === column.name.toLowerCase());
    const suggestion = folded ?? closestName(column.name, header);
    throw usageError(`${column.at}: column "${column.name}" is not in ${dataLabel}${suggestion ? `; did you mean "${suggestion}"?` : ''}`);
  }
}
