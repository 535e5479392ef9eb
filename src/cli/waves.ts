/** `tabsight waves`: its options, parsed once into a WavesPlan, and runWaves, which counts every wave and reports the series. */
import { Command, Option } from 'commander';
import type { AnalysisOptions } from '../analysis/analyzeTable.js';
import { analyzeWaves, undecidedWaves, WaveInput, WaveSetup } from '../analysis/waves.js';
import { dataError, usageError } from '../errors.js';
import { CountedInput, countFiles, countTable, TableRequest } from '../io/counting.js';
import { columnRules } from '../io/countTable.js';
import { isPattern } from '../io/engine/files.js';
import { filesOfPattern } from '../io/fileList.js';
import { checkReadable, InputSource, inputSource, refuseRemote } from '../io/source.js';
import { WAVES_RENDERERS, WavesFormat } from '../render/renderers.js';
import { wavesCharts } from '../render/wavesSvg.js';
import { stackSvg } from '../render/svg.js';
import { baseName, orderOfFiles, orderOfLevels, Spacing, WaveKey, WaveOrderMode, waveScores } from '../table/waveKeys.js';
import {
  addAnalysisOptions,
  addDesignOptions,
  addReaderOptions,
  addRawCellsOption,
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
  readerFor,
  splitList,
  tablePlan,
  refuseBinsPerFile,
  sideInputFiles,
} from './options.js';
import { CliIo, emit, noteWriter, outputGuard, pageWidth, painter, writeSideFile } from './output.js';
import type { OutputGuard } from '../output/guard.js';
import { sideOrder } from './compare.js';
import { codebookSides, RawValues, unionOfRawValues } from './codebookSides.js';
import type { Outcome } from './outcome.js';
import { UnmatchedValue, unmatchedInEvery } from '../io/rowRules.js';
import { unmatchedValueWarnings } from '../analysis/report.js';

export interface WavesPlan {
  /** Several files or patterns (one wave per file), or one file whose --period column tells the waves apart. */
  waves: { kind: 'files'; inputs: string[]; order: WaveOrderMode } | { kind: 'column'; input: string; column: string; levels?: string[] };
  /** 'auto': dated waves are placed at their dates for the trend; 'even': evenly spaced. */
  spacing: Spacing;
  reader: ReaderPlan;
  table: TableRequest;
  order: { rows?: string[]; cols?: string[] };
  analysis: AnalysisOptions;
  format: WavesFormat;
  report: ReportPlan;
}

interface RawWavesOptions extends RawTableOptions, RawReportOptions {
  period?: string;
  levels?: string;
  waveOrder: WaveOrderMode;
  spacing: Spacing;
  format: WavesFormat;
}

export function wavesPlan(inputs: string[], raw: RawWavesOptions): WavesPlan {
  const { reader, analysis, table, order } = tablePlan(raw);
  let waves: WavesPlan['waves'];
  if (raw.period !== undefined) {
    if (inputs.length !== 1) throw usageError('--period reads one file: give either several files (one per wave) or one file with --period');
    const levels = splitList(raw.levels);
    if (levels && levels.length < 2) throw usageError(`--levels "${raw.levels}": name at least two levels of ${raw.period}, in wave order`);
    if (levels && new Set(levels).size !== levels.length) throw usageError(`--levels "${raw.levels}": a level is named twice`);
    waves = { kind: 'column', input: inputs[0], column: raw.period, levels };
  } else {
    if (raw.levels !== undefined) throw usageError('--levels chooses levels of --period; give --period too');
    if (inputs.includes('-')) throw usageError('standard input holds one file: use it with --period, or give the waves as files');
    // Bins from each file's own values would cut each wave differently.
    if (table.bins) throw usageError('--bins cuts a side at the quantiles of the rows read, which differ from file to file, so the waves would not share their levels; give fixed cut points with --cuts, or one file with --period');
    waves = { kind: 'files', inputs, order: raw.waveOrder };
    refuseBinsPerFile(table, 'the wave files');
  }
  return { waves, spacing: raw.spacing, reader, table: { ...table, allowDegenerate: true }, order, analysis, format: raw.format, report: reportPlan(raw) };
}

export function wavesCommand(accept: (plan: WavesPlan) => void): Command {
  const command = new Command('waves')
    .description('follow the same pair over many waves (weeks, years): did the association move, grow or fade?')
    .argument('<inputs...>', 'one CSV file per wave, or a quoted pattern of them; or one file with --period')
    .option('--period <column>', 'one file holding every wave: the column that tells them apart')
    .option('--levels <a,b,c>', 'with --period: the levels to follow, in wave order (default: every level, in natural order)')
    .addOption(
      new Option('--wave-order <how>', 'order of files: auto (by the date, ISO week or number in their names when every name has one, else as given), names, given')
        .choices(['auto', 'names', 'given'])
        .default('auto'),
    )
    .addOption(new Option('--spacing <how>', 'the trend\'s scale: auto (per year for dated waves, else per wave), even (per wave)').choices(['auto', 'even']).default('auto'));
  addTableOptions(command, Object.keys(WAVES_RENDERERS), false);
  addReaderOptions(command);
  addSurveyOptions(command, false);
  addDesignOptions(command);
  addSummedWeightsOption(command);
  addAnalysisOptions(command);
  addReportOptions(command);
  addRawCellsOption(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight waves 'exports/2026-W*.csv' --rows region --cols answer
  tabsight waves week01.csv week02.csv week03.csv --rows region --cols answer --wave-order given
  tabsight waves survey.csv --period year --rows education --cols vocabulary --format html --output waves.html
  tabsight waves survey.csv --period year --rows smoker --cols region --weight wt --strata stratum --cluster psu

Files are sorted by the date (2026-01-05, 20260105), ISO week (2026-W05),
month (2026-01) or, failing those, the last number in their names.

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,
3 the association did not move over the waves at --alpha (only with
--exit-status; when no test across the waves can be made: 1, saying why).`,
  );
  command.action((inputs: string[], raw: RawWavesOptions) => accept(wavesPlan(inputs, raw)));
  return command;
}

function waveInput(label: string, key: string, counted: Pick<CountedInput, 'table' | 'weighting' | 'excluded' | 'excludedBy' | 'design'>, input: WaveInput['input'], plan: WavesPlan): WaveInput {
  // With a survey design, each wave is its own sample: its own strata and PSUs (or replicate weights).
  const design = counted.design ? { cells: counted.design, other: plan.table.other ?? null } : null;
  return { label, key, table: counted.table, weighting: counted.weighting, excluded: counted.excluded, excludedBy: counted.excludedBy, input, design };
}

/** The name a wave of a file is shown by: its dated key as written, else its file's base name. */
function fileKey(path: string, key: WaveKey | null): string {
  return key !== null && key.kind !== 'number' ? key.text : baseName(path);
}

async function wavesOfFiles(plan: WavesPlan, inputs: string[], mode: WaveOrderMode, io: CliIo, guard: OutputGuard): Promise<{ waves: WaveInput[]; setup: WaveSetup; unmatched: UnmatchedValue[]; raw: RawValues }> {
  const patterns: string[] = [];
  for (const input of inputs) refuseRemote(input);
  for (const input of inputs) if (await isPattern(input)) patterns.push(input);
  if (inputs.length === 1 && patterns.length === 0) throw usageError('waves needs several files (one per wave), a pattern such as "exports/week-*.csv", or one file with --period');
  const files: string[] = [];
  for (const input of inputs) files.push(...(await filesOfPattern(input)));
  if (files.length < 2) throw dataError(`${inputs.join(' ')}: ${files.length === 1 ? 'only one file' : 'no file'} to follow; waves needs at least two`);
  const ordered = orderOfFiles(files, mode);
  if (ordered.problem !== null) throw usageError(`cannot order the waves by their file names: ${ordered.problem}; name the files by date or ISO week (2026-01-05, 2026-W05), or pass --wave-order given`);
  guard.checkInputs(files);
  const sources: InputSource[] = ordered.order.map((k) => inputSource(files[k], io));
  const counted = await countFiles(sources, readerFor(plan.reader, io, guard), plan.table);
  const keys = ordered.order.map((k) => ordered.keys[k]);
  const waves = sources.map((source, k) => waveInput(source.label, fileKey(source.path, keys[k]), counted[k], inputSummary(source.label, counted[k]), plan));
  const setup: WaveSetup = {
    source: 'files',
    period: null,
    patterns,
    orderedBy: ordered.by,
    keyKind: ordered.kind,
    scores: waveScores(keys, ordered.kind, plan.spacing),
    withoutWave: 0,
  };
  return { waves, setup, unmatched: unmatchedInEvery(counted.map((c) => c.unmatched)), raw: unionOfRawValues(counted) };
}

async function wavesOfColumn(plan: WavesPlan, input: string, column: string, listed: string[] | undefined, io: CliIo, guard: OutputGuard): Promise<{ waves: WaveInput[]; setup: WaveSetup; unmatched: UnmatchedValue[]; raw: RawValues }> {
  const source = inputSource(input, io);
  checkReadable(source);
  guard.checkInputs([input]);
  const counted = await countTable(source, readerFor(plan.reader, io, guard), { ...plan.table, by: column, byOption: '--period' });
  const strata = counted.strata ?? [];
  const available = strata.map((s) => s.level);
  if (listed) {
    for (const l of listed) if (!available.includes(l)) throw usageError(`--levels: "${l}" is not a level of ${column} (levels: ${available.slice(0, 20).join(', ')}${available.length > 20 ? ', …' : ''})`);
  } else if (available.length < 2) {
    throw dataError(`${column} has ${available.length === 0 ? 'no level' : `a single level ("${available[0]}")`} in the counted rows; waves needs at least two`);
  }
  // The layers come in the order of the period column's codebook entry and recodes (io/countTable.ts); natural order is the rule without them.
  const rules = columnRules(plan.table, column);
  const ordered = orderOfLevels(available, listed, (rules.codebook?.values.length ?? 0) > 0 || rules.recode !== null || (rules.cuts ?? null) !== null);
  const summary = inputSummary(source.label, counted);
  const waves = ordered.levels.map((level) => {
    const s = strata.find((x) => x.level === level)!;
    return waveInput(`${column} ${level}`, level, { table: s.table, weighting: s.weighting, excluded: s.excluded ?? 0, excludedBy: s.excludedBy ?? [], design: s.design }, summary, plan);
  });
  const inWaves = strata.reduce((sum, s) => sum + (s.excluded ?? 0), 0);
  const setup: WaveSetup = {
    source: 'column',
    period: column,
    patterns: (await isPattern(input)) ? [input] : [],
    orderedBy: ordered.by,
    keyKind: ordered.kind,
    scores: waveScores(ordered.keys, ordered.kind, plan.spacing),
    withoutWave: counted.excluded - inWaves,
  };
  return { waves, setup, unmatched: counted.unmatched, raw: counted.rawValues };
}

/** Counts every wave, analyses the series, writes the report; found = the association moved over the waves at --alpha. */
export async function runWaves(plan: WavesPlan, io: CliIo): Promise<Outcome> {
  const guard = outputGuard(io, plan.report);
  guard.checkInputs(sideInputFiles(plan.table));
  const { waves, setup, unmatched, raw } =
    plan.waves.kind === 'column'
      ? await wavesOfColumn(plan, plan.waves.input, plan.waves.column, plan.waves.levels, io, guard)
      : await wavesOfFiles(plan, plan.waves.inputs, plan.waves.order, io, guard);
  // Without an order option, the levels follow the codebook and recodes (natural order otherwise), as in compare.
  const order = {
    rows: plan.order.rows ?? sideOrder(plan.table, plan.table.rows, waves, 'rowLevels'),
    cols: plan.order.cols ?? sideOrder(plan.table, plan.table.cols, waves, 'colLevels'),
  };
  // A codebook that marks both columns ordered gives each wave the ordinal measures without --ordinal, as in pair and compare.
  const ordered = codebookSides(plan.table, { rowLevels: [], colLevels: [] }).ordered;
  const report = analyzeWaves(waves, setup, ordered && !plan.analysis.ordinal ? { ...plan.analysis, ordinal: true } : plan.analysis, order, plan.spacing, unmatchedValueWarnings(unmatched));
  const sides = codebookSides(plan.table, { rowLevels: report.rows.levels, colLevels: report.cols.levels }, raw);
  if (sides.rows) Object.assign(report.rows, sides.rows);
  if (sides.cols) Object.assign(report.cols, sides.cols);
  report.warnings.push(...sides.warnings);
  // CSV and TSV are one line per wave, with no place for notes: said on standard error.
  if (plan.format === 'csv' || plan.format === 'tsv') for (const w of unmatchedValueWarnings(unmatched)) noteWriter(io)(w.message);
  const toFile = plan.report.output !== undefined;
  const text = WAVES_RENDERERS[plan.format](report, { paint: painter(io, plan.report.color, toFile), width: pageWidth(io, toFile), cells: 'compact', rawCells: plan.report.rawCells });
  if (plan.report.plot !== undefined) await writeSideFile(io, plan.report.plot, stackSvg(wavesCharts(report)));
  await emit(io, text, plan.report.output);
  return { found: report.verdict.moved, exitStatusWanted: plan.report.exitStatus, undecided: undecidedWaves(report) };
}
