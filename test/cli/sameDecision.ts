// One decision, every format: runs a command once per output format on the
// same input and checks that each format shows what the JSON record decided
// and says (the leading p-value and its test, alpha, pass or fail, the
// strength word, every sentence, note and warning, every level), and that
// --exit-status agrees. The words are those of src/render/words.ts, the one
// place the formats take them from; a format that leaves one out fails here.
import { parse } from 'csv-parse/sync';
import ExcelJS from 'exceljs';
import { expect } from 'vitest';
import { formatMeasure, formatP, formatStatistic } from '../../src/readableNumbers.js';
import { associationWords, methodNotes } from '../../src/render/bannerWords.js';
import { changeLine, compareHeadline, compareWarnings, compareWeightingWords, shiftWords, sideBySide } from '../../src/render/compareText.js';
import { acrossTests, latestHeadline, levelsWords, patternHeadline, setupWords, slopeWords, wavesStatementWords } from '../../src/render/wavesWords.js';
import { FLAG_LEGEND, pairFlags, scanSummary } from '../../src/render/scanTable.js';
import { CAUTION, comparison, excludedByWords, headline, reasonSentence, statementWords, strengthPhrase, testName } from '../../src/render/words.js';
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
  expectShown(r, strengthPhrase(record), human, 'the strength, its word and interval');
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

/**
 * `scan`: the setting and count of passing pairs, and for every pair shown its
 * names, leading p-value and test, adjusted p-value, decision, strength and
 * notes, in text, Markdown, HTML and CSV; --exit-status 0 exactly when a pair passes.
 */
export async function expectSameScanDecision(args: string[]): Promise<Renderings> {
  const r = await renderEvery(args, ALL);
  const report = r.json;
  expectShown(r, scanSummary(report), HUMAN, 'the summary (adjustment, alpha, pairs passing)');
  expectShown(r, CAUTION, HUMAN, 'the caution');
  const csv = r.csv!;
  expect(csv).toHaveLength(report.pairs.length);
  for (const p of report.pairs) {
    const what = `${p.rows.name} × ${p.cols.name}`;
    for (const name of [p.rows.name, p.cols.name]) expectShown(r, name, ALL, `the column ${name}`);
    expectShown(r, formatP(p.verdict.pValue), HUMAN, `the leading p of ${what}`);
    expectShown(r, formatP(p.pAdjusted), HUMAN, `the adjusted p of ${what}`);
    // the leading test by name (text: in the notes, exact-p or simulated-p, and the summary for a design or --by)
    expectShown(r, testName(p.verdict.test, p), ['markdown', 'html'], `the leading test of ${what}`);
    expectShown(r, formatMeasure(p.measures.biasCorrectedV), HUMAN, `the bias-corrected V of ${what}`);
    for (const flag of pairFlags(p)) expectShown(r, `${flag} = ${FLAG_LEGEND[flag]}`, HUMAN, `the note ${flag} of ${what}`);
    const line = csv.find((l) => l.rows === p.rows.name && l.cols === p.cols.name)!;
    expect(Number(line.leading_p_value), `CSV leading p of ${what}`).toBe(p.verdict.pValue);
    expect(line.leading_test, `CSV leading test of ${what}`).toBe(p.verdict.test);
    expect(Number(line.p_adjusted), `CSV adjusted p of ${what}`).toBe(p.pAdjusted);
    expect(line.passes, `CSV decision of ${what}`).toBe(String(p.passes));
    expect(line.strength, `CSV strength of ${what}`).toBe(p.verdict.strength ?? '');
    expect(p.passes, `${what}: passes is the verdict's`).toBe(p.verdict.passes);
  }
  // the decision of each pair, row by row: yes in text and Markdown, ✓ in HTML
  const passing = report.pairs.filter((p: any) => p.passes).length;
  expect((r.words.markdown!.match(/\| \d+ \| yes \|/g) ?? []).length, 'Markdown rows marked yes').toBe(passing);
  expect((r.words.html!.match(/✓ passes/g) ?? []).length, 'HTML rows marked as passing').toBe(passing);
  expect((r.words.text!.match(/ \d+ yes /g) ?? []).length, 'text rows marked yes').toBe(passing);
  for (const s of report.skipped) expectShown(r, s.reason, HUMAN, `why ${s.column} was left out`);
  for (const u of report.untestable) expectShown(r, u.reason, HUMAN, `why ${u.rows} × ${u.cols} was not tested`);
  for (const d of report.derived ?? []) expectShown(r, d.reason, HUMAN, `why ${d.rows} × ${d.cols} was not ranked`);
  for (const words of excludedByWords(report.excludedBy ?? [])) expectShown(r, words, HUMAN, 'the rows left out');
  expect(r.exitStatus, '--exit-status').toBe(statusOf(report.pairsPassing > 0));
  return r;
}

/**
 * `compare`: the decision about the change, the change test, each margin's
 * shift, the periods side by side (each period's own decision), every warning
 * (the comparison's and each period's) and every level, in text, Markdown,
 * HTML and CSV; --exit-status 0 exactly when the association changed.
 */
export async function expectSameCompareDecision(args: string[]): Promise<Renderings> {
  const r = await renderEvery(args, ALL);
  const report = r.json;
  for (const phrase of [compareHeadline(report), changeLine(report) ?? '', shiftWords(report, 'rows'), shiftWords(report, 'cols'), compareWeightingWords(report) ?? '']) {
    expectShown(r, phrase, ALL, 'the comparison in words');
  }
  for (const [label, a, b, change] of sideBySide(report)) {
    expectShown(r, `${label.trim()}`, HUMAN, `the row "${label.trim()}" side by side`);
    for (const x of [a, b, change]) if (x !== '') expectShown(r, x, HUMAN, `"${x}" of the row "${label.trim()}" side by side`);
  }
  for (const w of compareWarnings(report)) expectShown(r, w, HUMAN, 'a warning');
  for (const w of report.warnings) expectShown(r, w.message, ['csv'], `the warning ${w.code}`);
  for (const level of [...report.rows.levels, ...report.cols.levels]) expectLevelShown(r, level, ALL);
  for (const period of [report.before, report.after]) {
    expectShown(r, period.label, ALL, 'the period');
    if (!period.testable) continue;
    expectPairRecordShown(r, period, ['markdown', 'html', 'csv'].filter((f) => f !== 'html') as Format[]);
    const v = period.verdict;
    expectShown(r, `${headline(v)}: ${comparison(v.pValue, v.alpha, v.passes)}, ${testName(v.test, period)}`, ['markdown', 'html'], `the decision of ${period.label}`);
    expectPairCsvDecision(r.csv!, period, period.label);
  }
  const v = report.verdict;
  if (v) {
    const changed = r.csv!.find((l) => l.section === 'verdict' && l.name === 'changed' && l.level === '')!;
    expect(changed.value, 'CSV: changed').toBe(v.changed ? '1' : '0');
    expect(Number(changed.p_value), 'CSV: the change p-value').toBe(v.pValue);
    expect(Number(r.csv!.find((l) => l.section === 'verdict' && l.name === 'alpha' && l.level === '')!.value), 'CSV: alpha').toBe(v.alpha);
  }
  expectShown(r, CAUTION, HUMAN, 'the caution');
  // No verdict (no change test can be made): --exit-status has no answer, status 1 (README, Exit statuses).
  expect(r.exitStatus, '--exit-status').toBe(v ? statusOf(v.changed) : 1);
  return r;
}

/**
 * `waves`: the setting, the answer since the wave before and over all waves,
 * every sentence and warning, each wave's leading p-value and decision, the
 * tests across waves with their adjusted p-values, in text, Markdown, HTML and
 * CSV; --exit-status 0 exactly when the association moved.
 */
export async function expectSameWavesDecision(args: string[]): Promise<Renderings> {
  const r = await renderEvery(args, ALL);
  const report = r.json;
  expectShown(r, setupWords(report), HUMAN, 'the setting');
  expectShown(r, latestHeadline(report), HUMAN, 'the answer since the wave before');
  expectShown(r, patternHeadline(report), HUMAN, 'the answer over all waves');
  for (const s of report.statements) if (s.kind !== 'latest') expectShown(r, wavesStatementWords(report, s), HUMAN, `the sentence (${s.kind})`);
  for (const w of report.warnings) expectShown(r, w.message, HUMAN, `the warning ${w.code}`);
  for (const t of acrossTests(report)) {
    expectShown(r, t.name, HUMAN, `the test across waves: ${t.name}`);
    expectShown(r, formatP(t.pValue), HUMAN, `the p-value of ${t.name}`);
    if (t.adjustedPValue !== null) expectShown(r, formatP(t.adjustedPValue), HUMAN, `the adjusted p-value of ${t.name}`);
  }
  const slope = slopeWords(report);
  if (slope) expectShown(r, slope, HUMAN, 'the slope of the trend');
  for (const level of [...report.rows.levels, ...report.cols.levels]) expectLevelShown(r, level, HUMAN);
  expectShown(r, levelsWords(report), HUMAN, 'the levels of the table');
  expectShown(r, CAUTION, HUMAN, 'the caution');
  const csv = r.csv!;
  expect(csv).toHaveLength(report.waves.length);
  report.waves.forEach((w: any, k: number) => {
    expectShown(r, w.key, ALL, 'the wave');
    const line = csv[k];
    expect(line.wave, 'CSV wave order').toBe(w.key);
    expect(line.moved, 'CSV: moved').toBe(String(report.verdict.moved));
    expect(Number(line.alpha), 'CSV: alpha').toBe(report.verdict.alpha);
    if (!w.testable) return;
    expectShown(r, formatP(w.verdict.pValue), HUMAN, `the leading p of wave ${w.key}`);
    expectShown(r, testName(w.verdict.test, w), ['markdown', 'html'], `the leading test of wave ${w.key}`);
    expect(Number(line.leading_p_value), `CSV leading p of wave ${w.key}`).toBe(w.verdict.pValue);
    expect(line.leading_test, `CSV leading test of wave ${w.key}`).toBe(w.verdict.test);
    expect(line.passes, `CSV decision of wave ${w.key}`).toBe(String(w.verdict.passes));
  });
  // each wave's decision: ■/□ in text, yes/no in Markdown and HTML
  const associated = report.waves.filter((w: any) => w.testable && w.verdict.passes).length;
  const waveLines = r.words.text!.split(/ (?=\S+ [\d,]+ \S+ [*]? ?[■□] )/).slice(1);
  expect(waveLines.filter((l) => /^\S+ [\d,]+ \S+ [*]? ?■ /.test(l)).length, 'text: the waves marked ■').toBe(associated);
  expect(r.exitStatus, '--exit-status').toBe(statusOf(report.verdict.moved));
  return r;
}

/** Every text cell of a workbook's sheets, as plain words. */
async function workbookWords(file: string): Promise<string> {
  const workbook = new ExcelJS.Workbook();
  await workbook.xlsx.readFile(file);
  const texts: string[] = [];
  workbook.eachSheet((sheet) => sheet.eachRow((row) => row.eachCell((cell) => texts.push(String(cell.text ?? '')))));
  return plainWords('text', texts.join('\n'));
}

/**
 * `banner`: each question × break variable's overall test in words (its
 * leading p-value, test, alpha and decision), the notes on method, the
 * warnings and columns left out, in text, Markdown, HTML and the spreadsheet;
 * the CSV's test lines carry the same p-value and decision; --exit-status 0
 * exactly when some question × break variable passes.
 */
export async function expectSameBannerDecision(args: string[], xlsxFile: string): Promise<Renderings> {
  const r = await renderEvery(args, ALL);
  const written = await run([...args, '--output', xlsxFile]);
  expect(written.status, written.stderr).toBe(0);
  const xlsx = await workbookWords(xlsxFile);
  const inBook = (phrase: string, what: string) => expect.soft(xlsx.includes(plainWords('text', phrase).trim()), `xlsx shows ${what}: "${phrase}"`).toBe(true);
  const report = r.json;
  let passing = false;
  for (const q of report.questions) {
    expectShown(r, q.name, ALL, 'the question');
    for (const t of q.tests) {
      const words = associationWords(t, report.settings.alpha);
      expectShown(r, words, HUMAN, `the overall test of ${q.name} × ${t.break}`);
      inBook(words, `the overall test of ${q.name} × ${t.break}`);
      const line = r.csv!.find((l) => l.question === q.name && l.row_kind === 'test' && l.break === t.break)!;
      expect(line, `CSV test line of ${q.name} × ${t.break}`).toBeDefined();
      if (t.association) {
        passing ||= t.association.passes;
        expect(Number(line.p_value), `CSV p of ${q.name} × ${t.break}`).toBe(t.association.pValue);
        expect(line.passes, `CSV decision of ${q.name} × ${t.break}`).toBe(String(t.association.passes));
        if (t.association.verdict) expect(line.test, `CSV test of ${q.name} × ${t.break}`).toBe(t.association.verdict.test);
      }
    }
  }
  for (const note of methodNotes(report)) {
    expectShown(r, note, HUMAN, 'a note on method');
    inBook(note, 'a note on method');
  }
  for (const w of report.warnings) {
    expectShown(r, w.message, HUMAN, `the warning ${w.code}`);
    inBook(w.message, `the warning ${w.code}`);
  }
  for (const s of report.skipped ?? []) expectShown(r, s.reason, HUMAN, `why ${s.column} was left out`);
  expect(r.exitStatus, '--exit-status').toBe(statusOf(passing));
  return r;
}
