/** `tabsight compare`: its options, parsed once into a ComparePlan, and runCompare, which counts two periods and compares them. */
import { Command } from 'commander';
import type { AnalysisOptions } from '../analysis/analyzeTable.js';
import { compareReport, PeriodInput, undecidedComparison } from '../analysis/compare.js';
import { columnRules } from '../io/countTable.js';
import { levelOrder } from '../table/levelRules.js';
import { usageError } from '../errors.js';
import { CountedInput, countTable, TableRequest } from '../io/counting.js';
import { checkReadable, InputSource, inputSource, refuseStdinTwice } from '../io/source.js';
import { COMPARE_RENDERERS, CompareFormat } from '../render/renderers.js';
import { residualHeatMap, stackSvg } from '../render/svg.js';
import {
  addAnalysisOptions,
  addDesignOptions,
  addReaderOptions,
  addReportOptions,
  addSummedWeightsOption,
  addSurveyOptions,
  addTableOptions,
  inputSummary,
  RawReportOptions,
  RawTableOptions,
  ReaderPlan,
  ReportPlan,
  reportPlan,
  splitList,
  readerFor,
  tablePlan,
  refuseBinsPerFile,
  sideInputFiles,
} from './options.js';
import type { CellView } from '../render/pairText.js';
import { CliIo, emit, noteWriter, outputGuard, pageWidth, painter, writeSideFile } from './output.js';
import type { OutputGuard } from '../output/guard.js';
import type { Outcome } from './outcome.js';
import { UnmatchedValue, unmatchedInEvery } from '../io/rowRules.js';
import { unmatchedValueWarnings } from '../analysis/report.js';
import { codebookSides, RawValues, unionOfRawValues } from './codebookSides.js';

export interface ComparePlan {
  /** Two files (before, after), or one file whose --period column tells the periods apart. */
  periods: { kind: 'files'; before: string; after: string } | { kind: 'column'; input: string; column: string; levels?: [string, string] };
  reader: ReaderPlan;
  /** The table to count in each period (levels kept even when one-sided). */
  table: TableRequest;
  order: { rows?: string[]; cols?: string[] };
  analysis: AnalysisOptions;
  alpha: number;
  format: CompareFormat;
  /** What the cells of the text tables show. */
  cells: CellView;
  report: ReportPlan;
}

interface RawCompareOptions extends RawTableOptions, RawReportOptions {
  period?: string;
  levels?: string;
  format: CompareFormat;
  cells: CellView;
}

export function comparePlan(beforeFile: string, afterFile: string | undefined, raw: RawCompareOptions): ComparePlan {
  const { reader, analysis, table, order, alpha } = tablePlan(raw);
  let periods: ComparePlan['periods'];
  if (raw.period !== undefined) {
    if (afterFile !== undefined) throw usageError('--period reads one file: give either two files or one file with --period');
    const wanted = splitList(raw.levels);
    if (wanted && wanted.length !== 2) throw usageError(`--levels "${raw.levels}": name exactly two levels of ${raw.period}, before and after`);
    periods = { kind: 'column', input: beforeFile, column: raw.period, levels: wanted as [string, string] | undefined };
  } else {
    if (afterFile === undefined) throw usageError('compare needs two files (before and after), or one file with --period');
    periods = { kind: 'files', before: beforeFile, after: afterFile };
    refuseBinsPerFile(table, 'the two files');
  }
  return { periods, reader, table: { ...table, allowDegenerate: true }, order, analysis, alpha, format: raw.format, cells: raw.cells, report: reportPlan(raw) };
}

export function compareCommand(accept: (plan: ComparePlan) => void): Command {
  const command = new Command('compare')
    .description('compare the same pair in two periods: did the association or the margins change?')
    .argument('<before>', 'CSV of the earlier period (or the only file, with --period)')
    .argument('[after]', 'CSV of the later period')
    .option('--period <column>', 'one file holding both periods: the column that tells them apart')
    .option('--levels <before,after>', 'with --period: the two levels to compare (default: the two levels, in natural order)');
  addTableOptions(command, Object.keys(COMPARE_RENDERERS));
  addReaderOptions(command);
  addSurveyOptions(command, false);
  addDesignOptions(command);
  addSummedWeightsOption(command);
  addAnalysisOptions(command);
  addReportOptions(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight compare week47.csv week48.csv --rows membership --cols preferred_format
  tabsight compare survey.csv --period wave --levels 2025,2026 --rows age_band --cols preferred_format
  tabsight compare 2023.csv 2025.csv --rows smoker --cols region --weight wt --strata stratum --cluster psu

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,
3 the association did not change at --alpha (only with --exit-status; when
the periods share no level or the change cannot be tested: 1, saying why).`,
  );
  command.action((beforeFile: string, afterFile: string | undefined, raw: RawCompareOptions) => accept(comparePlan(beforeFile, afterFile, raw)));
  return command;
}

function period(label: string, counted: Pick<CountedInput, 'table' | 'weighting' | 'excluded' | 'excludedBy' | 'design'>, input: PeriodInput['input'], plan: ComparePlan): PeriodInput {
  const design = counted.design ? { cells: counted.design, other: plan.table.other ?? null } : null;
  return { label, table: counted.table, weighting: counted.weighting, excluded: counted.excluded, excludedBy: counted.excludedBy, input, design };
}

/** The two periods of one file, told apart by a column: its two levels, or the two named by --levels. */
async function periodsOfColumn(source: InputSource, plan: ComparePlan, column: string, levels: [string, string] | undefined, io: CliIo, guard: OutputGuard): Promise<[PeriodInput, PeriodInput, UnmatchedValue[], RawValues]> {
  const counted = await countTable(source, readerFor(plan.reader, io, guard), { ...plan.table, by: column, byOption: '--period' });
  const strata = counted.strata ?? [];
  const available = strata.map((s) => s.level);
  let pick: string[];
  if (levels) {
    for (const l of levels) if (!available.includes(l)) throw usageError(`--levels: "${l}" is not a level of ${column} (levels: ${available.join(', ')})`);
    pick = levels;
  } else {
    if (available.length !== 2) throw usageError(`${column} has ${available.length} levels (${available.slice(0, 10).join(', ')}); choose two with --levels before,after`);
    pick = available;
  }
  const input = inputSummary(source.label, counted);
  const [b, a] = pick.map((l) => strata.find((s) => s.level === l)!);
  for (const note of counted.missingTokenNotes) noteWriter(io)(note);
  return [
    period(`${column} ${b.level}`, { table: b.table, weighting: b.weighting, excluded: b.excluded ?? 0, excludedBy: b.excludedBy ?? [], design: b.design }, input, plan),
    period(`${column} ${a.level}`, { table: a.table, weighting: a.weighting, excluded: a.excluded ?? 0, excludedBy: a.excludedBy ?? [], design: a.design }, input, plan),
    counted.unmatched,
    counted.rawValues,
  ];
}

/** The order of a side from its codebook and recodes (undefined without them: natural order). */
export function sideOrder(request: TableRequest, name: string, periods: PeriodInput[], side: 'rowLevels' | 'colLevels'): string[] | undefined {
  const rules = columnRules(request, name);
  if (!rules.codebook && !rules.recode && !rules.cuts) return undefined;
  const levels = [...new Set(periods.flatMap((p) => p.table[side]))];
  return levelOrder(rules, levels);
}

/** Counts both periods, compares them, writes the report; found = the association changed at --alpha. */
export async function runCompare(plan: ComparePlan, io: CliIo): Promise<Outcome> {
  let before: PeriodInput;
  let after: PeriodInput;
  let unmatched: UnmatchedValue[];
  let raw: RawValues;
  const guard = outputGuard(io, plan.report);
  guard.checkInputs([...(plan.periods.kind === 'column' ? [plan.periods.input] : [plan.periods.before, plan.periods.after]), ...sideInputFiles(plan.table)]);
  if (plan.periods.kind === 'column') {
    const source = inputSource(plan.periods.input, io);
    checkReadable(source);
    [before, after, unmatched, raw] = await periodsOfColumn(source, plan, plan.periods.column, plan.periods.levels, io, guard);
  } else {
    refuseStdinTwice([plan.periods.before, plan.periods.after]);
    const sources = [inputSource(plan.periods.before, io), inputSource(plan.periods.after, io)];
    const counted: CountedInput[] = [];
    for (const source of sources) counted.push(await countTable(source, readerFor(plan.reader, io, guard), plan.table));
    // A note said once when both files give it.
    for (const note of new Set(counted.flatMap((c) => c.missingTokenNotes))) noteWriter(io)(note);
    unmatched = unmatchedInEvery(counted.map((c) => c.unmatched));
    before = period(sources[0].label, counted[0], inputSummary(sources[0].label, counted[0]), plan);
    after = period(sources[1].label, counted[1], inputSummary(sources[1].label, counted[1]), plan);
    raw = unionOfRawValues(counted);
  }
  // Without an order option, both periods' levels follow the codebook and recodes (natural order otherwise).
  const order = {
    rows: plan.order.rows ?? sideOrder(plan.table, plan.table.rows, [before, after], 'rowLevels'),
    cols: plan.order.cols ?? sideOrder(plan.table, plan.table.cols, [before, after], 'colLevels'),
  };
  // A codebook that marks both columns ordered gives each period the ordinal measures without --ordinal, as in pair.
  const ordered = codebookSides(plan.table, { rowLevels: [], colLevels: [] }).ordered;
  const report = compareReport(before, after, ordered && !plan.analysis.ordinal ? { ...plan.analysis, ordinal: true } : plan.analysis, order, unmatchedValueWarnings(unmatched));
  const sides = codebookSides(plan.table, { rowLevels: report.rows.levels, colLevels: report.cols.levels }, raw);
  if (sides.rows) Object.assign(report.rows, sides.rows);
  if (sides.cols) Object.assign(report.cols, sides.cols);
  report.warnings.push(...sides.warnings);
  const toFile = plan.report.output !== undefined;
  const text = COMPARE_RENDERERS[plan.format](report, { paint: painter(io, plan.report.color, toFile), width: pageWidth(io, toFile), cells: plan.cells });
  if (plan.report.plot !== undefined) {
    const pictures = [report.before, report.after].filter((r) => r.testable).map((r) => residualHeatMap(r as never, `Adjusted residuals, ${r.label}`));
    await writeSideFile(io, plan.report.plot, stackSvg(pictures));
  }
  await emit(io, text, plan.report.output);
  return { found: report.verdict?.changed === true, exitStatusWanted: plan.report.exitStatus, undecided: undecidedComparison(report) };
}
