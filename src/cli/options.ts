/**
 * The options several commands share: declared once (add…Options) and
 * parsed once into the parts of a command's plan (…Plan functions), so
 * that every command reads them the same way.
 */
import { readFileSync } from 'node:fs';
import { Command, Option } from 'commander';
import { dataError, usageError } from '../errors.js';
import type { LonelyPsuTreatment, ReplicateMethod } from '../stats/designCovariance.js';
import type { ReplicateColumns, SurveyDesign } from '../table/surveyDesign.js';
import { parseDelimiterOption, ReaderOptions, ReadSummary } from '../io/readRecords.js';
import { AnalysisOptions, DEFAULT_ANALYSIS_OPTIONS, ExactPolicy } from '../analysis/analyzeTable.js';
import { parseRecode, parseWhere, Recode, WhereClause } from '../io/rowRules.js';
import { readCodebook } from '../io/codebookFile.js';
import type { Codebook } from '../table/codebook.js';
import { CutSpec, parseCuts } from '../table/bins.js';
import type { InputSummary } from '../analysis/report.js';
import type { TableRequest } from '../io/counting.js';
import { columnRules } from '../io/countTable.js';
import { binsOf } from '../table/levelRules.js';
import { shellWord } from '../escape/shell.js';
import { CELL_VIEWS } from '../render/pairText.js';
import { CliIo, noteWriter } from './output.js';
import type { OutputGuard } from '../output/guard.js';

/**
 * The options of a command that analyses one pair of columns (pair,
 * compare): the two columns and their level order, the output format, the
 * significance level, what the cells of text tables show, colour.
 */
export function addTableOptions(command: Command, formats: readonly string[], cellTables = true): Command {
  command
    .requiredOption('--rows <column>', 'column whose levels form the rows')
    .requiredOption('--cols <column>', 'column whose levels form the columns')
    .option('--row-order <levels>', 'comma-separated order of the row levels (others follow in natural order)')
    .option('--col-order <levels>', 'comma-separated order of the column levels')
    .addOption(new Option('--format <format>', 'output format').choices(formats).default('text'))
    .option('--alpha <level>', 'significance level of every decision in the report (and of --exit-status)', '0.05')
    .option('--bins <k>', 'cut a numeric side with more than k values into k equal-frequency bins (as scan --bins cuts it)');
  // (a report without cell tables, such as waves, has no --cells)
  if (cellTables) command.addOption(new Option('--cells <view>', 'what the cells of the text tables show: compact (count and row share), counts, row, col, total (shares), expected, residuals').choices(CELL_VIEWS).default('compact'));
  return command.option('--no-color', 'plain text without colour');
}

/** Options every reading command shares, declared once. */
export function addReaderOptions(command: Command): Command {
  return command
    .option('--delimiter <char>', 'field separator (default: detected from the header among , ; tab |)')
    .option('--missing <tokens>', 'comma-separated values that count as missing, besides empty fields (e.g. "NA,n/a,-")')
    .option('--skip-bad-rows', 'count and skip rows with the wrong number of fields instead of stopping')
    .option('--encoding <name>', 'text encoding when not UTF-8 (latin1, windows-1252, utf-16le, …)')
    .option('--no-header', 'the first line is data; columns are named 1, 2, 3, …')
    .option('--max-levels <n>', 'refuse a column with more distinct values than this', '50')
    .addOption(
      new Option('--engine <name>', 'who counts: builtin (this reader), duckdb (embedded engine: Parquet, .gz, patterns of many files), auto (duckdb only where it alone reads the input: Parquet, patterns)')
        .choices(['auto', 'builtin', 'duckdb'])
        .default('auto'),
    )
    .option('--threads <n>', 'threads that read a large plain file: auto (every core, for files of 96 MB or more; scan: 16 MB), or a number (1: one thread)', 'auto');
}

/** The input section of a report, from what the counting step read. */
export function inputSummary(
  label: string,
  counted: { summary: ReadSummary; filtered: number; badWeights: number; badDesign: number },
): InputSummary {
  return {
    file: label,
    engine: counted.summary.engine,
    format: counted.summary.format,
    files: counted.summary.files,
    delimiter: counted.summary.delimiter,
    rowsRead: counted.summary.records,
    blankLines: counted.summary.blankLines,
    badRowsSkipped: counted.summary.badRows,
    filtered: counted.filtered,
    badWeightsSkipped: counted.badWeights,
    badDesignSkipped: counted.badDesign,
  };
}

export function addAnalysisOptions(command: Command): Command {
  return command
    .option('--ordinal', 'both variables are ordered, in the level order in force: adds ordinal measures and the test of a linear trend across the ordered levels (Mantel 1963)')
    .addOption(new Option('--exact <when>', 'exact p-values: auto (when counts are small), always, never').choices(['auto', 'always', 'never']).default('auto'))
    .option('--simulations <n>', 'random tables for a simulated exact p-value (scan: at most this many, fewer once the decision is clear)', String(DEFAULT_ANALYSIS_OPTIONS.simulations))
    .option('--seed <n>', 'seed of the random tables, so runs repeat', String(DEFAULT_ANALYSIS_OPTIONS.seed))
    .option('--confidence <level>', 'confidence level of the intervals', '0.95');
}

export function positiveInteger(value: string, option: string, min = 1): number {
  if (!/^\d+$/.test(value.trim())) throw usageError(`${option} "${value}": expected a whole number`);
  const n = Number(value);
  if (n < min || !Number.isSafeInteger(n)) throw usageError(`${option} "${value}": expected a whole number of at least ${min}`);
  return n;
}

/** Threads a run may be asked for: each is a worker with its own memory, so the number is bounded (README, Limits). */
export const MAX_THREADS = 32;

function threadCount(value: string): number {
  const n = positiveInteger(value, '--threads', 1);
  if (n > MAX_THREADS) throw usageError(`--threads "${value}": at most ${MAX_THREADS} (each thread is a worker with its own memory; auto takes every core up to 8)`);
  return n;
}

export function probability(value: string, option: string): number {
  const x = Number(value);
  if (value.trim() === '' || !(x > 0 && x < 1)) throw usageError(`${option} "${value}": expected a number between 0 and 1 (exclusive)`);
  return x;
}

/** Splits a comma-separated option value, trimming each item; empty items are dropped. */
export function splitList(value: string | undefined): string[] | undefined {
  if (value === undefined) return undefined;
  return value
    .split(',')
    .map((s) => s.trim())
    .filter((s) => s !== '');
}

export interface RawReaderOptions {
  delimiter?: string;
  missing?: string;
  skipBadRows?: boolean;
  encoding?: string;
  header: boolean;
  maxLevels: string;
  engine?: 'auto' | 'builtin' | 'duckdb';
  threads?: string;
}

/** How to read the input: dialect, missing tokens, who counts, and the level cap. */
export type ReaderPlan = ReaderOptions & { maxLevels: number };

/**
 * The reader of a run: the plan's options, notes to the run's standard
 * error, and the engine's module (TABSIGHT_ENGINE_MODULE lets a test stand
 * for a machine without the optional package).
 */
export function readerFor(plan: ReaderPlan, io: CliIo, guard?: OutputGuard): ReaderPlan {
  return { ...plan, onNote: noteWriter(io), engineModule: io.env.TABSIGHT_ENGINE_MODULE, checkInputs: guard ? (files) => guard.checkInputs(files) : undefined };
}

export function readerPlan(raw: RawReaderOptions): ReaderPlan {
  return {
    delimiter: raw.delimiter === undefined ? undefined : parseDelimiterOption(raw.delimiter),
    encoding: raw.encoding,
    missing: splitList(raw.missing) ?? [],
    skipBadRows: raw.skipBadRows === true,
    header: raw.header !== false,
    maxLevels: positiveInteger(raw.maxLevels, '--max-levels', 2),
    engine: raw.engine ?? 'builtin',
    threads: raw.threads === undefined || raw.threads === 'auto' ? 'auto' : threadCount(raw.threads),
  };
}

export interface RawAnalysisOptions {
  ordinal?: boolean;
  exact: string;
  simulations: string;
  seed: string;
  confidence: string;
  alpha: string;
}

/** The analysis options, parsed once; the same exact-test bound in every command, so pair and scan give the same record. */
export function analysisPlan(raw: RawAnalysisOptions, simulation: AnalysisOptions['simulation'] = 'full'): AnalysisOptions {
  return {
    ordinal: raw.ordinal === true,
    exact: raw.exact as ExactPolicy,
    simulations: positiveInteger(raw.simulations, '--simulations', 0),
    seed: positiveInteger(raw.seed, '--seed', 0),
    confidence: probability(raw.confidence, '--confidence'),
    alpha: probability(raw.alpha, '--alpha'),
    exactWorkLimit: DEFAULT_ANALYSIS_OPTIONS.exactWorkLimit,
    simulation,
  };
}

const collect = (value: string, previous: string[] = []) => [...previous, value];

/** Options that shape the rows and levels before counting (the same in pair and scan). */
export function addSurveyOptions(command: Command, withLayer = true): Command {
  command
    .option('--weight <column>', "sampling weights: counts become weighted sums; tests use Kish's effective sample size")
    .option('--freq <column>', 'frequency weights: each row stands for this many observations (aggregated files)')
    .option('--decimal-comma', 'weights and frequencies are written with a decimal comma (1,5)');
  if (withLayer) command.option('--by <column>', 'a layer held fixed: one table per level, plus the pooled layered tests');
  return command
    .option('--recode <spec>', "merge or rename levels before counting: 'column:from=to,from=to' (repeatable)", collect)
    .option('--where <spec>', "keep rows where 'column=v1,v2' or drop them with 'column!=v' (repeatable; all must hold)", collect)
    .option('--keep-missing', 'count missing values as a level of their own, "(missing)"')
    .option('--other <k>', 'merge levels beyond the k most frequent into one level')
    .option('--other-label <label>', 'name of the merged level', 'other')
    .option('--cuts <spec>', "cut a numeric column at these edges: 'column:18,25,35,50' gives <18, 18–24, …, 50+ (repeatable)", collect)
    .option('--codebook <file>', 'value labels, level order, ordered columns, missing codes with reasons and question texts (JSON or CSV; see docs/codebook.md)');
}

export interface RawSurveyOptions {
  weight?: string;
  freq?: string;
  decimalComma?: boolean;
  by?: string;
  recode?: string[];
  where?: string[];
  keepMissing?: boolean;
  other?: string;
  otherLabel: string;
  summedWeights?: string;
  codebook?: string;
  cuts?: string[];
  strata?: string;
  cluster?: string;
  fpc?: string;
  lonelyPsu?: LonelyPsuTreatment;
  replicateWeights?: string;
  replicateMethod?: ReplicateMethod;
  fayRho?: string;
  replicateScales?: string;
  replicateCentre?: 'replicate-mean' | 'full-sample';
}

export interface SurveyPlan {
  weight?: { column: string; kind: 'weight' | 'freq' };
  /** A survey design (--strata, --cluster, --fpc, or --replicate-weights), or undefined. */
  design?: SurveyDesign;
  decimalComma: boolean;
  by?: string;
  recodes: Recode[];
  where: WhereClause[];
  keepMissing: boolean;
  other?: { k: number; label: string };
  /** Cells counted elsewhere with sampling weights: Σw and Σw² columns beside the --freq row count. */
  summedWeights?: { sum: string; squares: string };
  /** --codebook, read and checked (its columns are checked against the data once the header is read). */
  codebook: Codebook | null;
  /** --cuts, by column. */
  cuts: CutSpec[];
}

/** --summed-weights, for reading back the cells that `tabsight sql --weight` counts. */
export function addSummedWeightsOption(command: Command): Command {
  return command.option('--summed-weights <sum,squares>', 'with --freq: each line is a cell counted elsewhere, with the sum of its sampling weights and of their squares in these columns (see tabsight sql)');
}

export function surveyPlan(raw: RawSurveyOptions): SurveyPlan {
  if (raw.weight !== undefined && raw.freq !== undefined) throw usageError('--weight and --freq cannot be combined: a row carries either a sampling weight or a count');
  const weight = raw.weight !== undefined ? { column: raw.weight, kind: 'weight' as const } : raw.freq !== undefined ? { column: raw.freq, kind: 'freq' as const } : undefined;
  if (raw.otherLabel.trim() === '') throw usageError('--other-label: give a non-empty label');
  const design = designPlan(raw);
  if (design) {
    const given = design.kind === 'taylor' ? 'a survey design (--strata, --cluster, --fpc)' : 'replicate weights';
    if (raw.freq !== undefined) throw usageError(`--freq cannot be combined with ${given}: a design needs one row per respondent, with its sampling weight in --weight`);
    if (raw.summedWeights !== undefined) throw usageError(`--summed-weights cannot be combined with ${given}: cells counted elsewhere have lost their PSUs`);
    if (raw.by !== undefined) throw usageError(`--by cannot be combined with ${given}: the layered tests have no design-based form here; analyse one level at a time with --where '${raw.by}=level'`);
  }
  return {
    weight,
    design,
    decimalComma: raw.decimalComma === true,
    by: raw.by,
    recodes: (raw.recode ?? []).map(parseRecode),
    where: (raw.where ?? []).map(parseWhere),
    keepMissing: raw.keepMissing === true,
    other: raw.other === undefined ? undefined : { k: positiveInteger(raw.other, '--other', 1), label: raw.otherLabel.trim() },
    summedWeights: summedWeightsPlan(raw),
    codebook: raw.codebook === undefined ? null : readCodebook(raw.codebook),
    cuts: (raw.cuts ?? []).map((spec) => parseCuts(spec)),
  };
}

/** The options of a survey design (pair, scan, compare and later commands), declared once. */
export function addDesignOptions(command: Command): Command {
  return command
    .option('--strata <column>', 'survey design: the stratum of each row')
    .option('--cluster <column>', 'survey design: the primary sampling unit (PSU) of each row, nested in its stratum (without it, each row is its own PSU)')
    .option('--fpc <column>', 'survey design: finite population correction, the number of PSUs in the stratum\'s population, or the sampling fraction when at most 1')
    .addOption(new Option('--lonely-psu <treatment>', 'a stratum with a single PSU: fail (default), certainty, adjust, average').choices(['fail', 'certainty', 'adjust', 'average']))
    .option('--replicate-weights <columns>', "replicate weights instead of strata and clusters: a pattern over column names ('repw*') or a comma-separated list; --weight is the full-sample weight")
    .addOption(new Option('--replicate-method <method>', 'how the replicate weights were made').choices(['jk1', 'jkn', 'brr', 'fay', 'bootstrap']))
    .option('--fay-rho <rho>', "Fay's rho for --replicate-method fay (default 0.5)")
    .option('--replicate-scales <factors>', 'jkn: one scale factor per replicate column, comma-separated, or a file of them')
    .addOption(new Option('--replicate-centre <centre>', 'centre of the replicate variance: the mean of the replicates (default) or the full-sample estimate').choices(['replicate-mean', 'full-sample']));
}

/** Numbers of a --replicate-scales value: a comma list, or a file holding them (commas, spaces or line breaks between). */
const isScaleList = (value: string) => /^[\s\d.eE+,-]+$/.test(value);

function replicateScales(value: string): number[] {
  const isList = isScaleList(value);
  let text = value;
  let source = '--replicate-scales';
  if (!isList) {
    try {
      text = readFileSync(value, 'utf8');
    } catch {
      throw usageError(`--replicate-scales "${value}": neither a comma-separated list of numbers nor a readable file`);
    }
    source = `--replicate-scales file ${value}`;
  }
  const items = text.split(/[\s,;]+/).filter((item) => item !== '');
  return items.map((item, k) => {
    const x = Number(item);
    if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(item) || !(x >= 0) || !Number.isFinite(x)) {
      const error = `${source}: item ${k + 1}, "${item}", is not a non-negative number`;
      throw isList ? usageError(error) : dataError(error);
    }
    return x;
  });
}

/**
 * The files a run reads besides its data (--codebook, a --replicate-scales
 * file): inputs too, which no --output or --plot may overwrite.
 */
export function sideInputFiles(survey: { codebook?: Codebook | null; design?: SurveyDesign }): string[] {
  const design = survey.design;
  return [...(survey.codebook ? [survey.codebook.file] : []), ...(design?.kind === 'replicate' && design.scalesFile ? [design.scalesFile] : [])];
}

/** The survey design of the options, checked for clashes (usage errors, exit status 2). */
export function designPlan(raw: RawSurveyOptions): SurveyDesign | undefined {
  const taylor = [
    ['--strata', raw.strata],
    ['--cluster', raw.cluster],
    ['--fpc', raw.fpc],
  ].filter(([, v]) => v !== undefined) as [string, string][];
  const replicateOnly = [
    ['--replicate-method', raw.replicateMethod],
    ['--fay-rho', raw.fayRho],
    ['--replicate-scales', raw.replicateScales],
    ['--replicate-centre', raw.replicateCentre],
  ].filter(([, v]) => v !== undefined) as [string, string][];
  if (raw.replicateWeights !== undefined) {
    if (taylor.length > 0) {
      throw usageError(`--replicate-weights cannot be combined with ${taylor.map(([o]) => o).join(' and ')}: replicate weights already carry the strata and clusters; give one or the other`);
    }
    if (raw.lonelyPsu !== undefined) throw usageError('--lonely-psu applies to strata and clusters, not to --replicate-weights');
    const method = raw.replicateMethod;
    if (method === undefined) throw usageError('--replicate-weights needs --replicate-method jk1, jkn, brr, fay or bootstrap: the variance depends on how the replicates were made');
    if (raw.weight === undefined) throw usageError('--replicate-weights needs --weight, the full-sample weight');
    if (raw.fayRho !== undefined && method !== 'fay') throw usageError(`--fay-rho applies to --replicate-method fay, not ${method}`);
    if (raw.replicateScales !== undefined && method !== 'jkn') throw usageError(`--replicate-scales applies to --replicate-method jkn, not ${method}`);
    if (method === 'jkn' && raw.replicateScales === undefined) throw usageError('--replicate-method jkn needs --replicate-scales: one scale factor per replicate, usually (n_h − 1)/n_h of its stratum');
    let rho: number | null = null;
    if (method === 'fay') {
      rho = raw.fayRho === undefined ? 0.5 : Number(raw.fayRho);
      if (raw.fayRho !== undefined && (raw.fayRho.trim() === '' || !(rho >= 0 && rho < 1))) throw usageError(`--fay-rho "${raw.fayRho}": expected a number at least 0 and below 1`);
    }
    const spec = raw.replicateWeights.trim();
    if (spec === '') throw usageError('--replicate-weights: give a pattern or a list of columns');
    const columns: ReplicateColumns = /[*?]/.test(spec) ? { kind: 'pattern', pattern: spec } : { kind: 'list', columns: splitList(spec) ?? [] };
    if (columns.kind === 'list' && new Set(columns.columns).size !== columns.columns.length) throw usageError(`--replicate-weights "${spec}" names a column twice`);
    const scalesFile = raw.replicateScales !== undefined && !isScaleList(raw.replicateScales) ? raw.replicateScales : null;
    return { kind: 'replicate', replicateColumns: columns, method, rho, scales: raw.replicateScales !== undefined ? replicateScales(raw.replicateScales) : null, scalesFile, centre: raw.replicateCentre ?? 'replicate-mean' };
  }
  if (replicateOnly.length > 0) throw usageError(`${replicateOnly.map(([o]) => o).join(' and ')} ${replicateOnly.length === 1 ? 'needs' : 'need'} --replicate-weights`);
  if (taylor.length === 0) {
    if (raw.lonelyPsu !== undefined) throw usageError('--lonely-psu needs a survey design: --strata, --cluster or --fpc');
    return undefined;
  }
  return { kind: 'taylor', strata: raw.strata ?? null, cluster: raw.cluster ?? null, fpc: raw.fpc ?? null, lonelyPsu: raw.lonelyPsu ?? 'fail' };
}

function summedWeightsPlan(raw: RawSurveyOptions): SurveyPlan['summedWeights'] {
  if (raw.summedWeights === undefined) return undefined;
  const parts = splitList(raw.summedWeights) ?? [];
  if (parts.length !== 2) throw usageError(`--summed-weights "${raw.summedWeights}": name two columns, the sum of the weights and the sum of their squares`);
  if (raw.freq === undefined) throw usageError('--summed-weights needs --freq naming the column that counts the rows of each line');
  return { sum: parts[0], squares: parts[1] };
}

/** Options of every reporting command: where the report goes and what the exit status says. */
export function addReportOptions(command: Command): Command {
  return command
    .option('--output <file>', 'write the report to this file (atomically: a failed run never leaves half a file)')
    .option('--plot <file.svg>', 'also write the pictures as a standalone SVG file')
    .option('--exit-status', 'exit with status 3 when no association is found at --alpha (0 when one is)');
}

export interface RawReportOptions {
  output?: string;
  plot?: string;
  exitStatus?: boolean;
  color?: boolean;
  rawCells?: boolean;
}

/** --raw-cells, for the commands with CSV/TSV reports (pair, scan). */
export function addRawCellsOption(command: Command): Command {
  return command.option('--raw-cells', "csv/tsv: write every cell exactly as in the data, for machine use (by default a cell a spreadsheet would run as a formula, starting with = + - @ tab or CR, gets a leading ')");
}

/** Where the report goes and what the exit status says. */
export interface ReportPlan {
  /** --output: write the report to this file (atomically) instead of standard output. */
  output?: string;
  /** --plot: also write the pictures to this SVG file. */
  plot?: string;
  /** --exit-status: status 3 when nothing is found at --alpha. */
  exitStatus: boolean;
  /** False with --no-color; colour is also off for files, pipes and NO_COLOR. */
  color: boolean;
  /** --raw-cells: CSV/TSV cells exactly as in the data (no spreadsheet guard). */
  rawCells: boolean;
}

export function reportPlan(raw: RawReportOptions): ReportPlan {
  return { output: raw.output, plot: raw.plot, exitStatus: raw.exitStatus === true, color: raw.color !== false, rawCells: raw.rawCells === true };
}

/**
 * Equal-frequency bins (--bins, a codebook's bins) are cut at each counted
 * file's own quantiles: over several files (compare's two, waves' many) the
 * files' bins would differ, and their tables could not be laid side by side.
 * Refused before anything is read, with the ways that do give common bins.
 */
export function refuseBinsPerFile(table: TableRequest, files: string): void {
  for (const side of [table.rows, table.cols]) {
    const k = binsOf(columnRules(table, side), table.bins ?? null);
    if (k === null) continue;
    const given = table.bins !== undefined && table.bins !== null && table.codebook?.columns.find((c) => c.name === side)?.bins == null ? `--bins ${k}` : `the codebook's bins for "${side}"`;
    throw usageError(`${given} would cut ${files} each at its own quantiles, into bins that differ; give fixed edges with --cuts ${shellWord(`${side}:…`)} (tabsight profile suggests them), or one file with --period`);
  }
}

/** The options of a command that analyses one pair of columns (pair, compare), parsed once. */
export interface RawTableOptions extends RawReaderOptions, RawAnalysisOptions, RawSurveyOptions {
  rows: string;
  cols: string;
  rowOrder?: string;
  colOrder?: string;
  alpha: string;
  bins?: string;
}

/** The parts of a one-table command's plan (pair, compare), parsed once. */
export interface TablePlan {
  reader: ReaderPlan;
  analysis: AnalysisOptions;
  /** The table to count: its columns, the survey options, the level cap (no level order: see `order`). */
  table: TableRequest;
  /** --row-order and --col-order. */
  order: { rows?: string[]; cols?: string[] };
  alpha: number;
}

export function tablePlan(raw: RawTableOptions): TablePlan {
  const reader = readerPlan(raw);
  const analysis = analysisPlan(raw);
  const survey = surveyPlan(raw);
  return {
    reader,
    analysis,
    table: { rows: raw.rows, cols: raw.cols, maxLevels: reader.maxLevels, ...survey, bins: raw.bins === undefined ? null : positiveInteger(raw.bins, '--bins', 2) },
    order: { rows: splitList(raw.rowOrder), cols: splitList(raw.colOrder) },
    alpha: probability(raw.alpha, '--alpha'),
  };
}
