/** `tabsight count` and `tabsight merge`: tables written as long-format counts, and count files added together. */
import { Command } from 'commander';
import { dataError, usageError } from '../errors.js';
import { countTable, TableRequest } from '../io/counting.js';
import { resolveColumn } from '../io/columns.js';
import { readRecords } from '../io/readRecords.js';
import { parseExactCount, unmatchedValueWords } from '../io/rowRules.js';
import { checkReadable, inputSource, refuseStdinTwice } from '../io/source.js';
import { compareNatural } from '../table/naturalOrder.js';
import { delimitedField, looksLikeFormula } from '../escape/spreadsheet.js';
import { addReaderOptions, addSurveyOptions, RawReaderOptions, RawSurveyOptions, ReaderPlan, readerPlan, surveyPlan, readerFor, sideInputFiles } from './options.js';
import { CliIo, emit, noteWriter, outputGuard } from './output.js';
import { DONE, Outcome } from './outcome.js';

/**
 * A note when a label would run as a formula in a spreadsheet: count files
 * are written exactly as the data says, because the tool reads them back
 * (--freq count, merge); a spreadsheet should open them as text.
 */
function noteFormulas(io: CliIo, header: string[], rows: [string[], number | bigint][]): void {
  const labels = new Set([...header, ...rows.flatMap(([key]) => key)].filter(looksLikeFormula));
  if (labels.size === 0) return;
  const [first] = labels;
  noteWriter(io)(
    `${labels.size.toLocaleString('en-US')} label${labels.size === 1 ? '' : 's'} (such as "${first.slice(0, 40)}") start${labels.size === 1 ? 's' : ''} like a spreadsheet formula; count files keep labels exactly for tabsight to read back, so open this file in a spreadsheet only as text`,
  );
}

/** The long count format that `--freq count` reads back: one line per combination. */
function countLines(header: string[], rows: [string[], number | bigint][]): string {
  const out = [header.map((h) => delimitedField(h, ',')).join(',')];
  for (const [key, n] of rows) out.push([...key.map((k) => delimitedField(k, ',')), String(n)].join(','));
  return out.join('\n') + '\n';
}

function sortKeys<T>(rows: [string[], T][]): [string[], T][] {
  return rows.sort((x, y) => {
    for (let k = 0; k < x[0].length; k++) {
      const d = compareNatural(x[0][k], y[0][k]);
      if (d !== 0) return d;
    }
    return 0;
  });
}

interface RawCountOptions extends RawReaderOptions, RawSurveyOptions {
  rows: string;
  cols: string;
  output?: string;
}

export interface CountPlan {
  /** A file, a pattern of files, or '-' for standard input. */
  input: string;
  reader: ReaderPlan;
  table: TableRequest;
  /** --output: write the counts to this file (atomically) instead of standard output. */
  output?: string;
}

export function countPlan(file: string | undefined, raw: RawCountOptions): CountPlan {
  const reader = readerPlan(raw);
  const survey = surveyPlan(raw);
  if (survey.weight?.kind === 'weight') throw usageError('count writes whole counts; --weight is not a count (sum sampling weights in the engine that holds the data, or use --freq to re-count counts)');
  if (survey.other) throw usageError('--other merges levels per table; apply it when analysing the counts, not when writing them');
  return { input: file ?? '-', reader, table: { rows: raw.rows, cols: raw.cols, maxLevels: reader.maxLevels, ...survey, allowDegenerate: true, keepExcludedCells: true }, output: raw.output };
}

export function countCommand(accept: (plan: CountPlan) => void): Command {
  const command = new Command('count')
    .description('write the table as long-format counts (rows,cols,count), the format --freq count reads back')
    .argument('[file]', 'CSV file, or - (or nothing) for standard input')
    .requiredOption('--rows <column>', 'first column of the table')
    .requiredOption('--cols <column>', 'second column of the table')
    .option('--output <file>', 'write the counts to this file (atomically)');
  addReaderOptions(command);
  addSurveyOptions(command);
  command.addHelpText(
    'after',
    `
Counts of chunks, days or machines add up with 'tabsight merge'. Sampling
weights are not counts: --weight is refused here (use --freq to re-count counts).

Examples:
  tabsight count survey.csv --rows branch --cols membership > counts.csv
  tabsight pair counts.csv --rows branch --cols membership --freq count`,
  );
  command.action((file: string | undefined, raw: RawCountOptions) => accept(countPlan(file, raw)));
  return command;
}

/** Counts the table (and its layers) and writes one line per combination that occurs. */
export async function runCount(plan: CountPlan, io: CliIo): Promise<Outcome> {
  const source = inputSource(plan.input, io);
  const guard = outputGuard(io, { output: plan.output });
  guard.checkInputs([plan.input, ...sideInputFiles(plan.table)]);
  checkReadable(source);
  const counted = await countTable(source, readerFor(plan.reader, io, guard), plan.table);
  // A count file has no place for notes: a filter or recode value no row holds is said on standard error.
  for (const u of counted.unmatched) noteWriter(io)(unmatchedValueWords(u));
  const lines: [string[], number][] = [];
  const add = (prefix: string[], t: typeof counted.table) =>
    t.rowLevels.forEach((rl, i) => t.colLevels.forEach((cl, j) => t.counts[i][j] > 0 && lines.push([[...prefix, rl, cl], t.counts[i][j]])));
  if (counted.strata) for (const s of counted.strata) add([s.level], s.table);
  else add([], counted.table);
  // Rows left out for a missing value stay in the count file (empty, or the missing code as written), so pair --freq leaves them out alike.
  for (const [key, rows] of counted.excludedCells) lines.push([key, rows]);
  const header = [...(plan.table.by !== undefined ? [plan.table.by] : []), plan.table.rows, plan.table.cols, 'count'];
  noteFormulas(io, header, lines);
  await emit(io, countLines(header, sortKeys(lines)), plan.output);
  return DONE;
}

export interface MergePlan {
  files: string[];
  output?: string;
}

export function mergeCommand(accept: (plan: MergePlan) => void): Command {
  return new Command('merge')
    .description('add count files of the same columns (from chunks, days or machines) into one')
    .argument('<counts...>', 'count files written by tabsight count (or any CSV whose last column is a count)')
    .option('--output <file>', 'write the merged counts to this file (atomically)')
    .action((files: string[], raw: { output?: string }) => accept({ files, output: raw.output }));
}

/** Adds the counts of files with the same columns, line by line of the same key. */
export async function runMerge(plan: MergePlan, io: CliIo): Promise<Outcome> {
  const files = plan.files;
  refuseStdinTwice(files);
  let header: string[] | null = null;
  const totals = new Map<string, [string[], bigint]>();
  outputGuard(io, { output: plan.output }).checkInputs(files);
  for (const file of files) {
    const source = inputSource(file, io);
    let countIndex = -1;
    let width = 0;
    await readRecords(
      source,
      { missing: [], skipBadRows: false, header: true, delimiter: ',' },
      (names) => {
        if (header === null) header = names;
        else if (names.join('\u0000') !== (header as string[]).join('\u0000')) {
          throw dataError(`${source.label}: its columns (${names.join(', ')}) differ from ${files[0]} (${(header as string[]).join(', ')}); merge only counts of the same columns`);
        }
        countIndex = names.length - 1;
        width = names.length;
        resolveColumn(names[countIndex], names, 'count column', source.label);
        return names.map((_n, i) => i);
      },
      (_ids, line, texts) => {
        // Counts are added exactly (BigInt): partial counts past 2^53 keep every unit.
        const parsed = parseExactCount(texts[countIndex]);
        if (typeof parsed === 'string') throw dataError(`${source.label}, line ${line}: the count ${parsed}`);
        const key = texts.slice(0, width - 1).map((t) => (t ?? '').trim());
        const id = key.join('\u0000');
        const known = totals.get(id);
        if (known) known[1] += parsed;
        else totals.set(id, [key, parsed]);
      },
      undefined,
      'all',
    );
  }
  if (header === null) throw usageError('merge needs at least one count file');
  noteFormulas(io, header, [...totals.values()]);
  await emit(io, countLines(header, sortKeys([...totals.values()])), plan.output);
  return DONE;
}
