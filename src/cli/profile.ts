/** `tabsight profile`: a first look at a file, one block per column, or a starter codebook. */
import { Command, Option } from 'commander';
import { profileFile } from '../analysis/profile.js';
import type { InputSummary } from '../analysis/report.js';
import { readCodebook } from '../io/codebookFile.js';
import { checkCodebookColumns } from '../io/codebookFile.js';
import { profileColumns } from '../io/profileColumns.js';
import { checkReadable, inputSource } from '../io/source.js';
import { codebookToCsv, codebookToJson } from '../render/codebookFormat.js';
import { toJson } from '../render/json.js';
import { renderProfileMarkdown, renderProfileText } from '../render/profileText.js';
import type { Codebook } from '../table/codebook.js';
import { addReaderOptions, positiveInteger, RawReaderOptions, ReaderPlan, readerFor, readerPlan } from './options.js';
import { CliIo, emit, noteWriter, outputGuard, pageWidth, painter } from './output.js';
import { DONE, Outcome } from './outcome.js';

export const PROFILE_FORMATS = ['text', 'json', 'markdown', 'codebook', 'codebook-csv'] as const;
export type ProfileFormat = (typeof PROFILE_FORMATS)[number];

export interface ProfilePlan {
  /** A file, or '-' for standard input. */
  input: string;
  reader: ReaderPlan;
  format: ProfileFormat;
  /** Most frequent values shown per column. */
  top: number;
  codebook: Codebook | null;
  /** The --codebook path (an --output may not overwrite it). */
  codebookFile?: string;
  output?: string;
  color: boolean;
}

interface RawProfileOptions extends RawReaderOptions {
  format: ProfileFormat;
  top: string;
  codebook?: string;
  output?: string;
  color?: boolean;
}

export function profilePlan(file: string | undefined, raw: RawProfileOptions): ProfilePlan {
  return {
    input: file ?? '-',
    reader: { ...readerPlan(raw), engine: 'builtin' },
    format: raw.format,
    top: positiveInteger(raw.top, '--top'),
    codebook: raw.codebook === undefined ? null : readCodebook(raw.codebook),
    codebookFile: raw.codebook,
    output: raw.output,
    color: raw.color !== false,
  };
}

export function profileCommand(accept: (plan: ProfilePlan) => void): Command {
  const command = new Command('profile')
    .description('a first look at a file: what each column looks like (identifier, categorical, ordered, numeric, constant, free text), its values, missing-looking values, and what to do with it')
    .argument('[file]', 'CSV file, or - (or nothing) for standard input')
    .addOption(new Option('--format <format>', 'text, json, markdown, or a starter codebook: codebook (JSON), codebook-csv').choices([...PROFILE_FORMATS]).default('text'))
    .option('--top <k>', 'most frequent values shown per column', '5')
    .option('--codebook <file>', 'a codebook to apply (labels, missing codes); with --format codebook, the starter keeps its entries and adds what they lack')
    .option('--output <file>', 'write to this file (atomically) instead of standard output')
    .option('--no-color', 'plain text without colour');
  addReaderOptions(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight profile export.csv
  tabsight profile export.csv --format codebook > codebook.json
  tabsight profile export.csv --codebook published.json --format codebook > codebook.json

Exit status: 0 done, 1 the data cannot be read, 2 bad usage.`,
  );
  command.action((file: string | undefined, raw: RawProfileOptions) => accept(profilePlan(file, raw)));
  return command;
}

/** Reads the file once, profiles every column, writes the profile or the starter codebook. */
export async function runProfile(plan: ProfilePlan, io: CliIo): Promise<Outcome> {
  const source = inputSource(plan.input, io);
  const guard = outputGuard(io, { output: plan.output });
  guard.checkInputs([plan.input, ...(plan.codebookFile ? [plan.codebookFile] : [])]);
  checkReadable(source);
  const tallied = await profileColumns(source, { ...readerFor(plan.reader, io, guard), engine: 'builtin' });
  if (plan.codebook) checkCodebookColumns(plan.codebook, tallied.columns.map((c) => c.name), source.label);
  const summary = tallied.summary;
  const input: InputSummary = {
    file: source.label,
    engine: 'builtin',
    format: 'csv',
    files: 1,
    delimiter: summary.delimiter,
    rowsRead: summary.records,
    blankLines: summary.blankLines,
    badRowsSkipped: summary.badRows,
    filtered: 0,
    badWeightsSkipped: 0,
    badDesignSkipped: 0,
  };
  const { report, starter } = profileFile(tallied, input, { maxLevels: plan.reader.maxLevels, missing: plan.reader.missing, top: plan.top, codebook: plan.codebook });
  let text: string;
  switch (plan.format) {
    case 'json':
      text = toJson(report);
      break;
    case 'markdown':
      text = renderProfileMarkdown(report);
      break;
    case 'codebook':
      text = codebookToJson(starter);
      break;
    case 'codebook-csv':
      text = codebookToCsv(starter);
      break;
    default:
      text = renderProfileText(report, painter(io, plan.color, plan.output !== undefined), pageWidth(io, plan.output !== undefined));
  }
  if (plan.format !== 'text' && plan.format !== 'markdown') for (const note of report.notes) noteWriter(io)(note);
  await emit(io, text, plan.output);
  return DONE;
}
