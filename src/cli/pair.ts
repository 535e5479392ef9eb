/** `tabsight pair`: its options, parsed once into a PairPlan, and runPair, which counts, analyses and renders one table. */
import { Command } from 'commander';
import { usageError } from '../errors.js';
import type { AnalysisOptions } from '../analysis/analyzeTable.js';
import { pairReport, unknownOrderWarnings, unmatchedValueWarnings } from '../analysis/report.js';
import { countTable, TableRequest } from '../io/counting.js';
import { checkReadable, inputSource } from '../io/source.js';
import { PAIR_RENDERERS, PairFormat } from '../render/renderers.js';
import { mosaicPlot, residualHeatMap, stackSvg } from '../render/svg.js';
import { addAnalysisOptions, addDesignOptions, addReaderOptions, addRawCellsOption, addReportOptions, addSummedWeightsOption, addSurveyOptions, addTableOptions, inputSummary, RawReportOptions, RawTableOptions, ReaderPlan, ReportPlan, reportPlan, tablePlan, readerFor, sideInputFiles } from './options.js';
import { CliIo, emit, noteWriter, outputGuard, pageWidth, painter, writeSideFile } from './output.js';
import type { CellView } from '../render/pairText.js';
import type { Outcome } from './outcome.js';
import { codebookSides, describeSides } from './codebookSides.js';
import { BannerPlan, parseMulti, parseMultiSplit, runBanner } from './banner.js';
import { DEFAULT_ANALYSIS_OPTIONS } from '../analysis/analyzeTable.js';

export interface PairPlan {
  /** A file, a pattern of files, or '-' for standard input. */
  input: string;
  reader: ReaderPlan;
  /** The table to count, with the level order of the report. */
  table: TableRequest;
  analysis: AnalysisOptions;
  alpha: number;
  format: PairFormat;
  /** What the cells of the text table show. */
  cells: CellView;
  report: ReportPlan;
  /**
   * --rows names a multiple-response set (--multi, --multi-split): the
   * table is the set's answers by the --cols levels, counted and tested as
   * a banner of that one question (percentages of respondents, column
   * tests per answer, Bilder & Loughin's test).
   */
  multiple: BannerPlan | null;
}

interface RawPairOptions extends RawTableOptions, RawReportOptions {
  format: PairFormat;
  cells: CellView;
  multi?: string[];
  multiSplit?: string[];
}

export function pairPlan(file: string | undefined, raw: RawPairOptions): PairPlan {
  const { reader, analysis, table, order, alpha } = tablePlan(raw);
  const report = reportPlan(raw);
  const sets = [...(raw.multi ?? []).map(parseMulti), ...(raw.multiSplit ?? []).map(parseMultiSplit)];
  const set = sets.find((s) => (s.kind === 'columns' ? s.name : s.column) === raw.rows);
  if (sets.length > 0 && !set) throw usageError(`--rows "${raw.rows}" is not a multiple-response set given with --multi or --multi-split (${sets.map((s) => (s.kind === 'columns' ? s.name : s.column)).join(', ')})`);
  if (set && (table.by !== undefined || table.other || order.rows || raw.ordinal)) throw usageError('a multiple-response --rows takes none of --by, --other, --row-order, --ordinal');
  const multiple: BannerPlan | null = set
    ? {
        input: file ?? '-',
        reader,
        survey: { ...table, codebook: table.codebook ?? null, cuts: table.cuts ?? [] },
        selection: { breaks: [raw.cols], questions: [], means: [], multiple: [set], reserved: table.weight ? [table.weight.column] : [] },
        settings: { cells: ['col', 'count'], confidenceLevels: [0.95], adjustment: 'none', minimumBase: 30, alpha, multipleResponseReferral: 'second-order', analysis: { ...analysis, simulation: DEFAULT_ANALYSIS_OPTIONS.simulation } },
        format: raw.format,
        output: report.output,
        exitStatus: report.exitStatus,
        color: report.color,
        rawCells: report.rawCells,
      }
    : null;
  return { input: file ?? '-', reader, table: { ...table, rowOrder: order.rows, colOrder: order.cols }, analysis, alpha, format: raw.format, cells: raw.cells, report, multiple };
}

export function pairCommand(accept: (plan: PairPlan) => void): Command {
  const command = new Command('pair')
    .description('analyse the two-way table of two columns: tests, strength, where the association sits')
    .argument('[file]', 'CSV file, or - (or nothing) for standard input');
  addTableOptions(command, Object.keys(PAIR_RENDERERS));
  command
    .option('--multi <name:columns>', "a multiple-response set from 0/1 or yes/no columns, e.g. 'services:svc_*'; name it in --rows (repeatable)", (v: string, p: string[] = []) => [...p, v])
    .option('--multi-split <column:separator>', "a multiple-response column of delimited answers, e.g. 'services:;'; name it in --rows (repeatable)", (v: string, p: string[] = []) => [...p, v]);
  addReaderOptions(command);
  addSurveyOptions(command);
  addDesignOptions(command);
  addSummedWeightsOption(command);
  addAnalysisOptions(command);
  addReportOptions(command);
  addRawCellsOption(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight pair survey.csv --rows age_band --cols preferred_format
  cat survey.csv | tabsight pair - --rows membership --cols visit_frequency --format json
  tabsight pair survey.csv --rows visit_frequency --cols satisfaction --ordinal \\
    --row-order 'rarely,a few times a year,monthly,weekly'
  tabsight pair health.csv --rows smoker --cols region --weight wt --strata stratum --cluster psu
  tabsight pair health.csv --rows smoker --cols region --weight wt \\
    --replicate-weights 'repwt*' --replicate-method jk1

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,\n3 no association at --alpha (only with --exit-status): the decision the report shows.`,
  );
  command.action((file: string | undefined, raw: RawPairOptions) => accept(pairPlan(file, raw)));
  return command;
}

/** Counts the table, analyses it, writes the report; found = the record's verdict passes. */
export async function runPair(plan: PairPlan, io: CliIo): Promise<Outcome> {
  if (plan.multiple) return runBanner(plan.multiple, io);
  const source = inputSource(plan.input, io);
  const guard = outputGuard(io, plan.report);
  guard.checkInputs([plan.input, ...sideInputFiles(plan.table)]);
  checkReadable(source);
  const counted = await countTable(source, readerFor(plan.reader, io, guard), plan.table);
  const sides = codebookSides(plan.table, counted.table, counted.rawValues);
  for (const note of counted.missingTokenNotes) noteWriter(io)(note);
  const report = pairReport(
    counted.table,
    counted.excluded,
    inputSummary(source.label, counted),
    sides.ordered && !plan.analysis.ordinal ? { ...plan.analysis, ordinal: true } : plan.analysis,
    [...unmatchedValueWarnings(counted.unmatched), ...unknownOrderWarnings('--row-order', counted.unknownRowLevels), ...unknownOrderWarnings('--col-order', counted.unknownColLevels), ...sides.warnings],
    counted.weighting,
    counted.strata && counted.by ? { by: counted.by, strata: counted.strata } : undefined,
    { rows: plan.table.rowOrder || sides.rows?.ordered ? 'given' : 'natural', cols: plan.table.colOrder || sides.cols?.ordered ? 'given' : 'natural' },
    counted.design ? { cells: counted.design, other: plan.table.other ?? null } : null,
  );
  describeSides(report, sides, counted.excludedBy);
  const toFile = plan.report.output !== undefined;
  const text = PAIR_RENDERERS[plan.format](report, { paint: painter(io, plan.report.color, toFile), width: pageWidth(io, toFile), cells: plan.cells, rawCells: plan.report.rawCells });
  if (plan.report.plot !== undefined) await writeSideFile(io, plan.report.plot, stackSvg([residualHeatMap(report), mosaicPlot(report)]));
  await emit(io, text, plan.report.output);
  return { found: report.verdict.passes, exitStatusWanted: plan.report.exitStatus };
}
