/** `tabsight banner`: its options, parsed once into a BannerPlan, and runBanner, which reads the columns once and writes every question against every break variable. */
import { Command, Option } from 'commander';
import { usageError } from '../errors.js';
import type { AnalysisOptions } from '../analysis/analyzeTable.js';
import { BannerCellPart, bannerReport, BannerSettings, ColumnAdjustment, MultipleResponseReferral } from '../analysis/banner.js';
import { BannerSelection, bannerColumnsOf, MultipleSpec, prepareBanner } from '../analysis/bannerQuestions.js';
import { columnRules, TableRequest } from '../io/countTable.js';
import { detectMissingTokens, encodedValues, missingTokenNotes } from '../io/missingTokens.js';
import type { ColumnsRequest } from '../io/columns.js';
import { encodeRows } from '../io/counting.js';
import { recodesByColumn, unmatchedOfEncoded } from '../io/rowRules.js';
import { unmatchedValueWarnings } from '../analysis/report.js';
import { checkReadable, inputSource } from '../io/source.js';
import { BANNER_RENDERERS, BannerFormat } from '../render/renderers.js';
import { addDesignOptions, addRawCellsOption, addReaderOptions, addSurveyOptions, analysisPlan, inputSummary, positiveInteger, probability, RawReaderOptions, RawSurveyOptions, ReaderPlan, readerFor, readerPlan, splitList, SurveyPlan, surveyPlan, sideInputFiles } from './options.js';
import { checkDesign } from '../analysis/design.js';
import { designColumns } from '../table/surveyDesign.js';
import { CliIo, emit, emitBytes, noteWriter, outputGuard, pageWidth, painter } from './output.js';
import type { Outcome } from './outcome.js';

const collect = (value: string, previous: string[] = []) => [...previous, value];

export const BANNER_FORMATS = [...Object.keys(BANNER_RENDERERS), 'xlsx'] as const;
export type BannerOutputFormat = BannerFormat | 'xlsx';

interface RawBannerOptions extends RawReaderOptions, RawSurveyOptions {
  break: string;
  questions?: string;
  means?: string;
  multi?: string[];
  multiSplit?: string[];
  cells: string;
  markLevels: string;
  columnAdjust: ColumnAdjustment;
  minBase: string;
  multiTest: MultipleResponseReferral;
  alpha: string;
  exact: string;
  simulations: string;
  seed: string;
  format?: BannerOutputFormat;
  output?: string;
  exitStatus?: boolean;
  color?: boolean;
  rawCells?: boolean;
}

export interface BannerPlan {
  /** A file, or '-' for standard input. */
  input: string;
  reader: ReaderPlan;
  survey: SurveyPlan;
  selection: BannerSelection;
  settings: BannerSettings;
  format: BannerOutputFormat;
  output?: string;
  exitStatus: boolean;
  color: boolean;
  /** --raw-cells: CSV/TSV cells exactly as in the data (no spreadsheet guard). */
  rawCells: boolean;
}

const CELL_PARTS: BannerCellPart[] = ['col', 'row', 'count', 'se'];

function parseCells(value: string): BannerCellPart[] {
  const parts = splitList(value) ?? [];
  const aliases: Record<string, BannerCellPart> = { col: 'col', column: 'col', row: 'row', count: 'count', counts: 'count', se: 'se' };
  const out: BannerCellPart[] = [];
  for (const p of parts) {
    const part = aliases[p.toLowerCase()];
    if (!part) throw usageError(`--cells "${value}": "${p}" is not one of ${CELL_PARTS.join(', ')}`);
    if (!out.includes(part)) out.push(part);
  }
  if (out.length === 0) throw usageError(`--cells "${value}": name at least one of ${CELL_PARTS.join(', ')}`);
  return out;
}

function parseMarkLevels(value: string): number[] {
  const levels = (splitList(value) ?? []).map((v) => {
    const x = Number(v.replace(/%$/, ''));
    const level = v.endsWith('%') || x > 1 ? x / 100 : x;
    if (!(level > 0 && level < 1)) throw usageError(`--mark-levels "${value}": "${v}" is not a confidence level between 0 and 1 (or 0% and 100%)`);
    return level;
  });
  if (levels.length < 1 || levels.length > 2) throw usageError(`--mark-levels "${value}": give one or two confidence levels (e.g. 0.95 or 0.95,0.90)`);
  if (levels.length === 2 && levels[0] === levels[1]) throw usageError(`--mark-levels "${value}": the two levels must differ`);
  return levels.sort((a, b) => b - a);
}

export function parseMulti(spec: string): MultipleSpec {
  const colon = spec.indexOf(':');
  if (colon <= 0 || colon === spec.length - 1) throw usageError(`--multi "${spec}": expected name:columns, e.g. 'services:svc_*' or 'services:svc_bus,svc_train'`);
  return { kind: 'columns', name: spec.slice(0, colon).trim(), patterns: splitList(spec.slice(colon + 1)) ?? [] };
}

export function parseMultiSplit(spec: string): MultipleSpec {
  const colon = spec.lastIndexOf(':');
  if (colon <= 0 || colon === spec.length - 1) throw usageError(`--multi-split "${spec}": expected column:separator, e.g. 'services:;'`);
  return { kind: 'split', column: spec.slice(0, colon), separator: spec.slice(colon + 1) };
}

export function bannerPlan(file: string | undefined, raw: RawBannerOptions): BannerPlan {
  const reader = readerPlan(raw);
  const survey = surveyPlan(raw);
  if (survey.other) throw usageError('--other is not available in banner: merge levels with --recode or a codebook');
  if (raw.by !== undefined) throw usageError('--by is not available in banner: add the variable to --break');
  const analysis: AnalysisOptions = analysisPlan({ ordinal: false, exact: raw.exact, simulations: raw.simulations, seed: raw.seed, confidence: '0.95', alpha: raw.alpha });
  const breaks = splitList(raw.break) ?? [];
  if (breaks.length === 0) throw usageError('--break: name at least one break variable');
  const multiple = [...(raw.multi ?? []).map(parseMulti), ...(raw.multiSplit ?? []).map(parseMultiSplit)];
  const format = raw.format ?? (raw.output?.toLowerCase().endsWith('.xlsx') ? 'xlsx' : 'text');
  return {
    input: file ?? '-',
    reader,
    survey,
    selection: {
      breaks,
      questions: splitList(raw.questions) ?? null,
      means: splitList(raw.means) ?? [],
      multiple,
      // The weight describes the sample: never a question; the design's columns are not questions unless named (a stratum may well be a break).
      reserved: survey.weight ? [survey.weight.column] : [],
      sampleColumns: survey.design ? designColumns(survey.design).map((c) => c.column) : [],
    },
    settings: {
      cells: parseCells(raw.cells),
      confidenceLevels: parseMarkLevels(raw.markLevels),
      adjustment: raw.columnAdjust,
      minimumBase: positiveInteger(raw.minBase, '--min-base', 0),
      alpha: probability(raw.alpha, '--alpha'),
      multipleResponseReferral: raw.multiTest,
      analysis,
    },
    format,
    output: raw.output,
    exitStatus: raw.exitStatus === true,
    color: raw.color !== false,
    rawCells: raw.rawCells === true,
  };
}

export function bannerCommand(accept: (plan: BannerPlan) => void): Command {
  const command = new Command('banner')
    .description('every question against the break variables: bases, percentages, significant differences between columns')
    .argument('[file]', 'CSV file, or - (or nothing) for standard input')
    .requiredOption('--break <columns>', 'comma-separated break variables (the banner\'s columns; * patterns allowed)')
    .option('--questions <columns>', 'comma-separated questions (the rows; * patterns allowed); default: every other column that qualifies')
    .option('--means <columns>', 'numeric questions shown by their mean, SD and base per column (Welch t tests)')
    .option('--multi <name:columns>', "a multiple-response question from 0/1 or yes/no columns, e.g. 'services:svc_*' (repeatable)", collect)
    .option('--multi-split <column:separator>', "a multiple-response question from one column of delimited answers, e.g. 'services:;' (repeatable)", collect)
    .option('--cells <parts>', 'what each cell shows: col (column %), row (row %), count, se (standard error of the column %, with a survey design); comma-separated', 'col')
    .option('--mark-levels <levels>', 'confidence levels of the column marks: one, or two (upper-case keys at the higher, lower-case at the lower)', '0.95')
    .addOption(new Option('--column-adjust <method>', "adjustment of the column tests over each row's comparisons").choices(['none', 'bonferroni', 'holm']).default('none'))
    .option('--min-base <n>', 'columns with fewer respondents than this (unweighted) are shown but not tested', '30')
    .addOption(new Option('--multi-test <order>', 'Rao–Scott-type correction of the multiple-response test (Bilder & Loughin): first-order or second-order Rao–Scott-type').choices(['first-order', 'second-order']).default('second-order'))
    .option('--alpha <level>', 'significance level of the overall test of each question × break variable', '0.05')
    .addOption(new Option('--exact <when>', 'exact p-values of the overall tests: auto (when counts are small), always, never').choices(['auto', 'always', 'never']).default('auto'))
    .option('--simulations <n>', 'random tables for a simulated exact p-value', '10000')
    .option('--seed <n>', 'seed of the random tables, so runs repeat', '20240601')
    .addOption(new Option('--format <format>', 'output format (default: xlsx when --output ends in .xlsx, else text)').choices([...BANNER_FORMATS]))
    .option('--output <file>', 'write the report to this file (atomically: a failed run never leaves half a file)')
    .option('--exit-status', 'exit with status 3 when no question × break variable shows an association at --alpha')
    .option('--no-color', 'plain text without colour');
  addReaderOptions(command);
  addSurveyOptions(command, false);
  addDesignOptions(command);
  addRawCellsOption(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight banner survey.csv --break age_band,region,membership
  tabsight banner survey.csv --break age_band,region --codebook book.json --output week-23.xlsx
  tabsight banner survey.csv --break region --multi 'services:svc_*' --mark-levels 0.95,0.90 --weight w
  tabsight banner survey.csv --break age_band,region --weight w --strata stratum --cluster psu

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,\n3 no association at --alpha (only with --exit-status; when no question ×\nbreak variable has a test of association: 1, saying why).`,
  );
  command.action((file: string | undefined, raw: RawBannerOptions) => accept(bannerPlan(file, raw)));
  return command;
}


/** Reads the columns once (built-in reader), builds the banner record and writes it; found = some overall test passes. */
export async function runBanner(plan: BannerPlan, io: CliIo): Promise<Outcome> {
  if (plan.format === 'xlsx' && plan.output === undefined && io.stdout.isTTY === true) throw usageError('--format xlsx writes a binary file: give --output week.xlsx (or redirect standard output to a file)');
  const source = inputSource(plan.input, io);
  const guard = outputGuard(io, { output: plan.output });
  guard.checkInputs([plan.input, ...sideInputFiles(plan.survey)]);
  const reader = readerFor(plan.reader, io, guard);
  checkReadable(source);
  const survey = plan.survey;
  const codebook = survey.codebook;
  const recodes = recodesByColumn(survey.recodes);
  // Columns relabelled by the codebook or cut by --cuts may hold more raw values than the level cap while reading, as recoded ones do (as in scan).
  const relabelled = new Map<string, Map<string, string>>(recodes);
  for (const column of codebook?.columns ?? []) if ((column.values.length > 0 || column.cuts) && !relabelled.has(column.name)) relabelled.set(column.name, new Map());
  for (const cut of survey.cuts) if (!relabelled.has(cut.column)) relabelled.set(cut.column, new Map());
  const table = { recodes: survey.recodes, codebook, cuts: survey.cuts, keepMissing: survey.keepMissing } as TableRequest;
  let sets = new Map<string, string[]>();
  const wide = new Set<string>();
  const request: ColumnsRequest = {
    maxLevels: reader.maxLevels,
    keepNumeric: false,
    maxColumns: Number.MAX_SAFE_INTEGER,
    minColumns: 1,
    where: survey.where,
    recodes: relabelled,
    codebook,
    weight: survey.weight ? { ...survey.weight, decimalComma: survey.decimalComma } : undefined,
    design: survey.design,
    decimalComma: survey.decimalComma,
    select: (header) => {
      const chosen = bannerColumnsOf(plan.selection, header, source.label);
      sets = chosen.sets;
      for (const name of chosen.wide) wide.add(name);
      return chosen.names;
    },
    wide,
  };
  const report = await encodeRows(source, reader, request, async (encoded) => {
    if (encoded.design?.index && survey.design?.kind === 'taylor') checkDesign(encoded.design.index, survey.design.lonelyPsu);
    const declared = new Set([...reader.missing.map((m) => m.trim()), ...(codebook?.columns.flatMap((c) => c.missing.map((m) => m.code)) ?? [])]);
    for (const note of missingTokenNotes(detectMissingTokens(encoded.columns.map(encodedValues), declared))) noteWriter(io)(note);
    const prepared = prepareBanner(encoded.columns, encoded.rows, { selection: plan.selection, sets, rules: (name) => columnRules(table, name, recodes), maxLevels: reader.maxLevels, codebook, label: source.label });
    if (prepared.questions.length === 0) throw usageError(`no question to tabulate in ${source.label}: ${prepared.skipped.length ? `left out ${prepared.skipped.map((s) => `${s.column} (${s.reason})`).join('; ')}` : 'name some with --questions'}`);
    const unmatched = unmatchedValueWarnings(unmatchedOfEncoded(survey.where, survey.recodes, encoded, (column) => recodes.get(column), (name) => columnRules(table, name, recodes), reader.missing));
    // CSV and TSV are one line per cell, with no place for notes: said on standard error.
    if (plan.format === 'csv' || plan.format === 'tsv') for (const w of unmatched) noteWriter(io)(w.message);
    return bannerReport({ input: inputSummary(source.label, encoded), respondents: encoded.rows, weights: encoded.weights, design: encoded.design, ...prepared, warnings: [...unmatched, ...prepared.warnings] }, plan.settings);
  });
  if (plan.format === 'xlsx') {
    // The spreadsheet library is loaded only when a spreadsheet is asked for.
    const { bannerWorkbook } = await import('../render/bannerXlsx.js');
    await emitBytes(io, await bannerWorkbook(report, { created: new Date() }), plan.output);
  } else {
    const toFile = plan.output !== undefined;
    const text = BANNER_RENDERERS[plan.format](report, { paint: painter(io, plan.color, toFile), width: pageWidth(io, toFile), cells: 'compact', rawCells: plan.rawCells });
    await emit(io, text, plan.output);
  }
  const found = report.questions.some((q) => q.tests.some((t) => t.association?.passes === true));
  // No question × break variable with a test of association (means only, too few levels): nothing found, and nothing ruled out either.
  const tested = report.questions.some((q) => q.tests.some((t) => t.association !== null));
  return { found, exitStatusWanted: plan.exitStatus, undecided: tested ? null : 'no question × break variable has a test of association (each test in the report says why), so none was found or ruled out' };
}
