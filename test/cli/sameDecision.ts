// One decision, every format: runs a command once per output format on the
// same input and checks that each format shows what the JSON record decided
// and says (the leading p-value and its test, alpha, pass or fail, the
// strength word, every sentence, note and warning, every level), and that
// --exit-status agrees. The words are those of src/render/words.ts, the one
// place the formats take them from; a format that leaves one out fails here.
import { parse } from 'csv-parse/sync';
import { expect } from 'vitest';
import { formatMeasure, formatP, formatStatistic } from '../../src/readableNumbers.js';
import { CAUTION, comparison, headline, reasonSentence, statementWords, testName } from '../../src/render/words.js';
import { run } from './cliHelpers.js';

export type HumanFormat = 'text' | 'markdown' | 'html';
export type Format = HumanFormat | 'csv';

export interface Renderings {
  json: any;
  /** Each format's output read as plain words (see `plainWords`). */
  words: Partial<Record<Format, string>>;
  /** The CSV output parsed under its header. */
  csv: Record<string, string>[] | null;
  /** The exit status of the same run with --exit-status. */
  exitStatus: number;
}

const ENTITIES: Record<string, string> = { amp: '&', lt: '<', gt: '>', quot: '"', '#39': "'", '#x27': "'", nbsp: ' ' };

/**
 * A format's output as plain words, for looking a phrase up: glue and line
 * breaks (text wraps its paragraphs) become single spaces; HTML loses its tags
 * and entities; Markdown its escapes and emphasis.
 */
export function plainWords(format: Format, output: string): string {
  let s = output;
  if (format === 'html') {
    s = s.replace(/<style>[\s\S]*?<\/style>/g, ' ').replace(/<[^>]*>/g, ' ').replace(/&(#?\w+);/g, (m, name: string) => ENTITIES[name] ?? m);
  }
  if (format === 'markdown') s = s.replace(/\\([\\`*_[\]<|&~])/g, '$1').replace(/\*\*/g, ' ').replace(/(^|\s)_|_(\s|$)/g, '$1$2');
  if (format === 'text') s = s.replace(/\x1b\[[0-9;]*m/g, '').replace(/\n\s*[–•]\s/g, ' ');
  return s.replace(/\u00a0/g, ' ').replace(/\s+/g, ' ');
}

/** Runs `args` in JSON and in each of `formats`, and once more with --exit-status. */
export async function renderEvery(args: string[], formats: readonly Format[]): Promise<Renderings> {
  const json = await run([...args, '--format', 'json']);
  if (json.status !== 0) throw new Error(`exit ${json.status}: ${json.stderr}`);
  const words: Partial<Record<Format, string>> = {};
  let csv: Record<string, string>[] | null = null;
  for (const format of formats) {
    const out = await run([...args, '--format', format]);
    if (out.status !== 0) throw new Error(`${format}: exit ${out.status}: ${out.stderr}`);
    words[format] = plainWords(format, out.stdout);
    if (format === 'csv') {
      csv = parse(out.stdout, { columns: true }) as Record<string, string>[];
      // CSV is read field by field (quotes undone), each field as plain words.
      words.csv = plainWords('csv', csv.map((line) => Object.values(line).join(' | ')).join('\n'));
    }
  }
  const status = (await run([...args, '--exit-status'])).status ?? -1;
  return { json: JSON.parse(json.stdout), words, csv, exitStatus: status };
}

/** Every one of `formats` shows `phrase` (read as plain words). */
export function expectShown(r: Renderings, phrase: string, formats: readonly Format[], what: string): void {
  const wanted = plainWords('text', phrase).trim();
  for (const format of formats) {
    const words = r.words[format];
    if (words === undefined) continue;
    expect.soft(words.includes(wanted), `${format} shows ${what}: "${wanted}"`).toBe(true);
  }
}

/** A level in every format; in text a long label may wrap over the lines of a column heading, so there each of its words. */
export function expectLevelShown(r: Renderings, level: string, formats: readonly Format[], what = `the level ${level}`): void {
  expectShown(r, level, formats.filter((f) => f !== 'text'), what);
  if (formats.includes('text') && r.words.text !== undefined) {
    for (const word of level.split(/\s+/)) expect.soft(r.words.text.includes(word), `text shows ${what}: "${word}"`).toBe(true);
  }
}

const HUMAN: HumanFormat[] = ['text', 'markdown', 'html'];
const ALL: Format[] = ['text', 'markdown', 'html', 'csv'];

/** The exit status --exit-status documents: 0 when the decision passes, 3 when it does not. */
export function statusOf(passes: boolean): number {
  return passes ? 0 : 3;
}

/**
 * A pair record (the whole table, or one level of --by): its decision line,
 * why its test leads, its sentences, warnings and levels, in every human
 * format; the levels and warnings in CSV too.
 */
export function expectPairRecordShown(r: Renderings, record: any, formats: readonly Format[], by?: string): void {
  const v = record.verdict;
  const human = formats.filter((f): f is HumanFormat => f !== 'csv');
  const decision = `${headline(v, by)}: ${comparison(v.adjustment ? v.decidingPValue : v.pValue, v.alpha, v.passes, v.adjustment !== null)}, ${testName(v.test, record)}`;
  expectShown(r, decision, human, 'the decision');
  expectShown(r, reasonSentence(record, by), human, 'why the test leads');
  if (v.strength !== null) expectShown(r, `${v.strength}`, human, 'the strength word');
  for (const s of record.findings.statements) expectShown(r, statementWords(record, s), formats, `the sentence (${s.kind})`);
  for (const w of record.warnings) expectShown(r, w.message, formats, `the warning ${w.code}`);
  for (const level of [...record.rows.levels, ...record.cols.levels]) expectLevelShown(r, level, formats);
  for (const [name, t] of Object.entries(record.tests) as [string, any][]) {
    if (t && typeof t.pValue === 'number') expectShown(r, formatP(t.pValue), human, `the p-value of ${name}`);
    if (t && typeof t.statistic === 'number' && name !== 'designPearson' && name !== 'designLikelihoodRatio') expectShown(r, formatStatistic(t.statistic), human, `the statistic of ${name}`);
  }
  for (const [name, x] of Object.entries(record.measures) as [string, any][]) {
    if (typeof x === 'number') expectShown(r, formatMeasure(x).replace(/^-/, '−'), human, `the measure ${name}`);
  }
  for (const [name, x] of Object.entries(record.ordinal ?? {}) as [string, any][]) {
    expectShown(r, formatP(x.pValue), human, `the p-value of the ordinal measure ${name}`);
  }
}

/** The CSV lines of a pair record carry the record's decision (whole table: level ''). */
export function expectPairCsvDecision(csv: Record<string, string>[], record: any, level = ''): void {
  const v = record.verdict;
  const line = (name: string) => csv.find((l) => l.section === 'verdict' && l.name === name && l.level === level);
  expect(Number(line('leading_p_value')!.p_value), 'CSV leading p').toBe(v.pValue);
  expect(line('leading_p_value')!.text, 'CSV leading test').toBe(v.test);
  expect(Number(line('deciding_p_value')!.p_value), 'CSV deciding p').toBe(v.decidingPValue);
  expect(Number(line('alpha')!.value), 'CSV alpha').toBe(v.alpha);
  expect(line('passes')!.text, 'CSV passes').toBe(String(v.passes));
  expect(line('strength')!.text, 'CSV strength').toBe(v.strength ?? '');
}

/**
 * `pair`: the whole record and, with --by, each level and the layered test,
 * in text, Markdown, HTML and CSV, and --exit-status from the same decision.
 */
export async function expectSamePairDecision(args: string[]): Promise<Renderings> {
  const r = await renderEvery(args, ALL);
  const record = r.json;
  const by = record.stratified?.by;
  expectPairRecordShown(r, record, ALL, by);
  expectPairCsvDecision(r.csv!, record);
  expectShown(r, CAUTION, HUMAN, 'the caution');
  if (record.stratified) {
    const s = record.stratified;
    if (s.cmh) expectShown(r, formatP(s.cmh.pValue), ALL.slice(0, 3), 'the layered test');
    if (s.breslowDay) expectShown(r, formatP(s.breslowDay.pValue), HUMAN, 'the equal-odds test');
    for (const w of record.strata) {
      expectLevelShown(r, w.level, ALL, `the level ${w.level} of ${by}`);
      if (w.testable) {
        expectShown(r, formatP(w.verdict.pValue), HUMAN, `the leading p of ${by} ${w.level}`);
        expectPairCsvDecision(r.csv!, w, w.level);
      }
    }
  }
  expect(r.exitStatus, '--exit-status').toBe(statusOf(record.verdict.passes));
  return r;
}
