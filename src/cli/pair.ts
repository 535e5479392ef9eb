/** `tabsight pair`: its options, parsed once into a PairPlan, and runPair, which counts, analyses and renders one table. */
import { Command } from 'commander';
import type { AnalysisOptions } from '../analysis/analyzeTable.js';
import { pairReport, unknownOrderWarnings } from '../analysis/report.js';
import { countTable, TableRequest } from '../io/counting.js';
import { checkReadable, inputSource } from '../io/source.js';
import { PAIR_RENDERERS, PairFormat } from '../render/renderers.js';
import { mosaicPlot, residualHeatMap, stackSvg } from '../render/svg.js';
import { addAnalysisOptions, addReaderOptions, addRawCellsOption, addReportOptions, addSummedWeightsOption, addSurveyOptions, addTableOptions, inputSummary, RawReportOptions, RawTableOptions, ReaderPlan, ReportPlan, reportPlan, tablePlan, readerFor } from './options.js';
import { CliIo, emit, noteWriter, outputGuard, pageWidth, painter, writeSideFile } from './output.js';
import type { CellView } from '../render/pairText.js';
import type { Outcome } from './outcome.js';
import { codebookSides, describeSides } from './codebookSides.js';

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
}

interface RawPairOptions extends RawTableOptions, RawReportOptions {
  format: PairFormat;
  cells: CellView;
}

export function pairPlan(file: string | undefined, raw: RawPairOptions): PairPlan {
  const { reader, analysis, table, order, alpha } = tablePlan(raw);
  return { input: file ?? '-', reader, table: { ...table, rowOrder: order.rows, colOrder: order.cols }, analysis, alpha, format: raw.format, cells: raw.cells, report: reportPlan(raw) };
}

export function pairCommand(accept: (plan: PairPlan) => void): Command {
  const command = new Command('pair')
    .description('analyse the two-way table of two columns: tests, strength, where the association sits')
    .argument('[file]', 'CSV file, or - (or nothing) for standard input');
  addTableOptions(command, Object.keys(PAIR_RENDERERS));
  addReaderOptions(command);
  addSurveyOptions(command);
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

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,\n3 no association at --alpha (only with --exit-status): the decision the report shows.`,
  );
  command.action((file: string | undefined, raw: RawPairOptions) => accept(pairPlan(file, raw)));
  return command;
}

/** Counts the table, analyses it, writes the report; found = the record's verdict passes. */
export async function runPair(plan: PairPlan, io: CliIo): Promise<Outcome> {
  const source = inputSource(plan.input, io.stdin);
  const guard = outputGuard(io, plan.report);
  guard.checkInputs([plan.input, ...(plan.table.codebook ? [plan.table.codebook.file] : [])]);
  checkReadable(source);
  const counted = await countTable(source, readerFor(plan.reader, io, guard), plan.table);
  const sides = codebookSides(plan.table, counted.table);
  for (const note of counted.missingTokenNotes) noteWriter(io)(note);
  const report = pairReport(
    counted.table,
    counted.excluded,
    inputSummary(source.label, counted),
    sides.ordered && !plan.analysis.ordinal ? { ...plan.analysis, ordinal: true } : plan.analysis,
    [...unknownOrderWarnings('--row-order', counted.unknownRowLevels), ...unknownOrderWarnings('--col-order', counted.unknownColLevels), ...sides.warnings],
    counted.weighting,
    counted.strata && counted.by ? { by: counted.by, strata: counted.strata } : undefined,
    { rows: plan.table.rowOrder || sides.rows?.ordered ? 'given' : 'natural', cols: plan.table.colOrder || sides.cols?.ordered ? 'given' : 'natural' },
  );
  describeSides(report, sides, counted.excludedBy);
  const toFile = plan.report.output !== undefined;
  const text = PAIR_RENDERERS[plan.format](report, { paint: painter(io, plan.report.color, toFile), width: pageWidth(io, toFile), cells: plan.cells, rawCells: plan.report.rawCells });
  if (plan.report.plot !== undefined) await writeSideFile(io, plan.report.plot, stackSvg([residualHeatMap(report), mosaicPlot(report)]));
  await emit(io, text, plan.report.output);
  return { found: report.verdict.passes, exitStatusWanted: plan.report.exitStatus };
}
