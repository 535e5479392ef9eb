/** `tabsight scan`: its options, parsed once into a ScanPlan, and runScan, which encodes the columns in one read and scores every pair. */
import { Command, Option } from 'commander';
import { checkScanSize } from '../table/limits.js';
import type { AnalysisOptions } from '../analysis/analyzeTable.js';
import { prepareColumns, ScanOptions, scorePairs } from '../analysis/scan.js';
import { ColumnsRequest, RECODED_READING_CAP } from '../io/columns.js';
import { encodeColumns } from '../io/counting.js';
import { checkReadable, inputSource } from '../io/source.js';
import { SCAN_RENDERERS, ScanFormat } from '../render/renderers.js';
import type { Adjustment } from '../stats/multipleTesting.js';
import { checkDesign } from '../analysis/design.js';
import { addAnalysisOptions, addDesignOptions, addReaderOptions, addRawCellsOption, addReportOptions, addSurveyOptions, analysisPlan, positiveInteger, probability, RawAnalysisOptions, RawReaderOptions, RawReportOptions, RawSurveyOptions, ReaderPlan, readerPlan, ReportPlan, reportPlan, splitList, SurveyPlan, surveyPlan, inputSummary, readerFor, sideInputFiles } from './options.js';
import { recodesByColumn, unmatchedOfEncoded } from '../io/rowRules.js';
import { unmatchedValueWarnings } from '../analysis/report.js';
import { columnRules, TableRequest } from '../io/countTable.js';
import { codebookColumn, labelColumn, labellingWarnings } from '../table/codebook.js';
import { CliIo, emit, noteWriter, outputGuard, pageWidth, painter, writeSideFile } from './output.js';
import { detectMissingTokens, encodedValues, missingTokenNotes } from '../io/missingTokens.js';
import type { Outcome } from './outcome.js';
import { stackSvg, strengthChart } from '../render/svg.js';

interface RawScanOptions extends RawReaderOptions, RawAnalysisOptions, RawSurveyOptions, RawReportOptions {
  columns?: string;
  exclude?: string;
  bins?: string;
  adjust: Adjustment;
  alpha: string;
  top?: string;
  maxColumns: string;
  full?: boolean;
  keepDerived?: boolean;
  format: ScanFormat;
}

export interface ScanPlan {
  /** A file, a pattern of files, or '-' for standard input. */
  input: string;
  reader: ReaderPlan;
  /** The candidate columns and the rows they are read from. */
  columns: { include?: string[]; exclude?: string[]; maxColumns: number };
  survey: SurveyPlan;
  /** --bins k: numeric columns with many values cut into k equal-frequency bins. */
  bins: number | null;
  adjustment: Adjustment;
  alpha: number;
  top: number | null;
  full: boolean;
  /** --keep-derived: score pairs where one column is a recoding of the other. */
  keepDerived: boolean;
  analysis: AnalysisOptions;
  format: ScanFormat;
  report: ReportPlan;
}

export function scanPlan(file: string | undefined, raw: RawScanOptions): ScanPlan {
  const reader = readerPlan(raw);
  const analysis = { ...analysisPlan(raw, 'deferred'), designPercentages: raw.full === true };
  const bins = raw.bins === undefined ? null : positiveInteger(raw.bins, '--bins', 2);
  const alpha = probability(raw.alpha, '--alpha');
  const top = raw.top === undefined ? null : positiveInteger(raw.top, '--top');
  const survey = surveyPlan(raw);
  return {
    input: file ?? '-',
    reader,
    columns: { include: splitList(raw.columns), exclude: splitList(raw.exclude), maxColumns: positiveInteger(raw.maxColumns, '--max-columns', 2) },
    survey,
    bins,
    adjustment: raw.adjust,
    alpha,
    top,
    full: raw.full === true,
    keepDerived: raw.keepDerived === true,
    analysis,
    format: raw.format,
    report: reportPlan(raw),
  };
}


/** Progress on stderr, only for a terminal and only once the work takes more than a moment. */
function progressReporter(io: CliIo): { tick: (rows: number) => void; done: () => void } {
  const started = Date.now();
  let shown = false;
  const active = io.stderr.isTTY === true;
  return {
    tick: (rows) => {
      if (!active) return;
      const seconds = (Date.now() - started) / 1000;
      if (seconds < 1) return;
      shown = true;
      io.stderr.write(`\rreading: ${rows.toLocaleString('en-US')} rows (${Math.round(rows / seconds).toLocaleString('en-US')} rows/s)   `);
    },
    done: () => {
      if (shown) io.stderr.write('\r\x1b[K');
    },
  };
}

export function scanCommand(accept: (plan: ScanPlan) => void): Command {
  const command = new Command('scan')
    .description('score every pair of columns in one read, strongest first, with multiple-testing control')
    .argument('[file]', 'CSV file, or - (or nothing) for standard input')
    .option('--columns <names>', 'comma-separated candidate columns (default: all)')
    .option('--exclude <names>', 'comma-separated columns to leave out')
    .option('--bins <k>', 'cut numeric columns with many values into k equal-frequency bins')
    .addOption(new Option('--adjust <method>', 'multiple-testing adjustment of the p-values').choices(['bh', 'holm', 'bonferroni', 'none']).default('bh'))
    .option('--alpha <level>', 'a pair passes when its adjusted leading p-value is at most this', '0.05')
    .option('--top <k>', 'keep only the k strongest pairs')
    .option('--max-columns <n>', 'refuse a file with more candidate columns than this', '300')
    .option('--full', 'include each pair\'s counts, expected counts, residuals and percentages (json)')
    .option('--keep-derived', 'score pairs where one column is a recoding of the other (listed apart by default)')
    .addOption(new Option('--format <format>', 'output format').choices(Object.keys(SCAN_RENDERERS)).default('text'))
    .option('--no-color', 'plain text without colour');
  addReaderOptions(command);
  addSurveyOptions(command);
  addDesignOptions(command);
  addAnalysisOptions(command);
  addReportOptions(command);
  addRawCellsOption(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight scan survey.csv
  tabsight scan survey.csv --exclude respondent_id --bins 5 --top 20
  tabsight scan survey.csv --format csv > weekly-pairs.csv

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,\n3 no pair passes at --alpha (only with --exit-status; when no pair could be\ntested: 1, saying why).`,
  );
  command.action((file: string | undefined, raw: RawScanOptions) => accept(scanPlan(file, raw)));
  return command;
}

/** Encodes the columns in one read, scores every pair, writes the report; found = at least one pair passes. */
export async function runScan(plan: ScanPlan, io: CliIo): Promise<Outcome> {
  const source = inputSource(plan.input, io);
  const guard = outputGuard(io, plan.report);
  guard.checkInputs([plan.input, ...sideInputFiles(plan.survey)]);
  const reader = readerFor(plan.reader, io, guard);
  const survey = plan.survey;
  const recodes = recodesByColumn(survey.recodes);
  // Columns relabelled by the codebook or cut by --cuts may hold more raw values than the level cap while reading, as recoded ones do.
  const relabelled = new Map<string, Map<string, string>>(recodes);
  for (const column of survey.codebook?.columns ?? []) if ((column.values.length > 0 || column.cuts) && !relabelled.has(column.name)) relabelled.set(column.name, new Map());
  for (const cut of survey.cuts) if (!relabelled.has(cut.column)) relabelled.set(cut.column, new Map());
  const table = { recodes: survey.recodes, codebook: survey.codebook, cuts: survey.cuts, keepMissing: survey.keepMissing } as TableRequest;
  checkReadable(source);
  const progress = progressReporter(io);
  const request: ColumnsRequest = {
    columns: plan.columns.include,
    exclude: plan.columns.exclude,
    maxLevels: reader.maxLevels,
    // Binning (--bins, or a codebook's bins) keeps numeric columns past the cap; --other merges levels before the cap applies.
    keepNumeric: plan.bins !== null || (survey.codebook?.columns.some((c) => c.bins !== null) ?? false),
    readingCap: survey.other ? Math.max(RECODED_READING_CAP, reader.maxLevels) : undefined,
    maxColumns: plan.columns.maxColumns,
    where: survey.where,
    recodes: relabelled,
    codebook: survey.codebook,
    weight: survey.weight ? { ...survey.weight, decimalComma: survey.decimalComma } : undefined,
    by: survey.by,
    design: survey.design,
    decimalComma: survey.decimalComma,
    progress: plan.format === 'text' ? progress.tick : undefined,
  };
  const options: ScanOptions = {
    maxLevels: reader.maxLevels,
    bins: plan.bins,
    adjustment: plan.adjustment,
    alpha: plan.alpha,
    top: plan.top,
    full: plan.full,
    keepDerived: plan.keepDerived,
    analysis: plan.analysis,
    recodes,
    rules: (name) => columnRules(table, name, recodes),
    ordered: (name) => {
      const entry = codebookColumn(survey.codebook, name);
      return entry !== undefined && (entry.ordered || entry.cuts !== null || entry.bins !== null);
    },
    keepMissing: survey.keepMissing,
    other: survey.other ?? null,
  };
  const report = await encodeColumns(source, reader, request, async (encoded) => {
    progress.done();
    if (encoded.design?.index && survey.design?.kind === 'taylor') checkDesign(encoded.design.index, survey.design.lonelyPsu);
    const declared = new Set([...reader.missing.map((m) => m.trim()), ...(survey.codebook?.columns.flatMap((c) => c.missing.map((m) => m.code)) ?? [])]);
    // With their rows where the codes are kept; a column past the level cap still names its tokens.
    const findings = detectMissingTokens(encoded.columns.map(encodedValues), declared);
    const prepared = prepareColumns(encoded.columns, encoded.layer, encoded.rows, options, encoded.weights?.kind === 'freq' ? encoded.weights.values : undefined);
    // Each note says what became of the values: levels, levels beside a binned column's bins, or looked past in a numeric column left out.
    const binned = new Set(prepared.binned.map((b) => b.column));
    const numeric = new Set(prepared.skipped.filter((s) => s.code === 'numeric').map((s) => s.column));
    for (const note of missingTokenNotes(findings, (column) => (binned.has(column) ? 'binned' : numeric.has(column) ? 'numeric' : 'level'))) noteWriter(io)(note);
    // The work is bounded before any pair is counted (src/table/limits.ts).
    checkScanSize(
      prepared.ordered.map((c) => ({ name: c.name, levels: c.labels.length })),
      prepared.layer ? prepared.layer.labels.length : 1,
    );
    const countPair = await encoded.countPairs(prepared.ordered, prepared.layer);
    const unmatched = unmatchedValueWarnings(unmatchedOfEncoded(survey.where, survey.recodes, encoded, (column) => recodes.get(column), (name) => columnRules(table, name, recodes), reader.missing));
    // The codebook against the values each column holds, as pair checks it (docs/codebook.md); a column whose values were not all kept is not judged.
    const codebook = survey.codebook;
    const codebookWarnings: { code: string; message: string }[] = [];
    if (codebook) {
      for (const column of encoded.columns) {
        const entry = codebookColumn(codebook, column.name);
        if (!entry || column.codes === null || column.distinctCapped) continue;
        for (const w of labellingWarnings(entry, labelColumn(entry, column.labels), codebook.file)) codebookWarnings.push({ code: w.code, message: w.message });
      }
    }
    const warnings = [...unmatched, ...codebookWarnings];
    // CSV and TSV are one line per pair, with no place for notes: said on standard error.
    if (plan.format === 'csv' || plan.format === 'tsv') for (const w of warnings) noteWriter(io)(w.message);
    return scorePairs(prepared, encoded.rows, inputSummary(source.label, encoded), options, countPair, warnings);
  });
  const toFile = plan.report.output !== undefined;
  const text = SCAN_RENDERERS[plan.format](report, { paint: painter(io, plan.report.color, toFile), width: pageWidth(io, toFile), cells: 'compact', rawCells: plan.report.rawCells });
  if (plan.report.plot !== undefined) await writeSideFile(io, plan.report.plot, stackSvg([strengthChart(report)]));
  await emit(io, text, plan.report.output);
  // No pair tested (each untestable, or a recoding of the other): nothing was found, and nothing ruled out either.
  const undecided = report.pairsTested === 0 ? `no pair could be tested (${[report.untestable.length > 0 ? `${report.untestable.length} untestable` : '', report.derived.length > 0 ? `${report.derived.length} a recoding of the other` : ''].filter((w) => w !== '').join(', ') || 'none scored'}), so none was found or ruled out` : null;
  return { found: report.pairsPassing > 0, exitStatusWanted: plan.report.exitStatus, undecided };
}
