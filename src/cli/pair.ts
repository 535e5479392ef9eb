import { Command, Option } from 'commander';
import { pairReport, unknownOrderWarnings } from '../analysis/report.js';
import { countPair } from '../io/countPair.js';
import { inputSource, checkReadable } from '../io/source.js';
import { toJson } from '../render/json.js';
import { renderPairText } from '../render/pairText.js';
import { addAnalysisOptions, addReaderOptions, analysisPlan, RawAnalysisOptions, RawReaderOptions, readerPlan, splitList } from './options.js';
import { painter, writeOut } from './output.js';

interface RawPairOptions extends RawReaderOptions, RawAnalysisOptions {
  rows: string;
  cols: string;
  rowOrder?: string;
  colOrder?: string;
  format: 'text' | 'json';
  color?: boolean;
}

export function pairCommand(): Command {
  const command = new Command('pair')
    .description('analyse the two-way table of two columns: tests, strength, where the association sits')
    .argument('[file]', 'CSV file, or - (or nothing) for standard input')
    .requiredOption('--rows <column>', 'column whose levels form the rows')
    .requiredOption('--cols <column>', 'column whose levels form the columns')
    .option('--row-order <levels>', 'comma-separated order of the row levels (others follow in natural order)')
    .option('--col-order <levels>', 'comma-separated order of the column levels')
    .addOption(new Option('--format <format>', 'output format').choices(['text', 'json']).default('text'))
    .option('--no-color', 'plain text without colour');
  addReaderOptions(command);
  addAnalysisOptions(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight pair survey.csv --rows age_band --cols preferred_format
  cat survey.csv | tabsight pair - --rows membership --cols visit_frequency --format json
  tabsight pair survey.csv --rows visit_frequency --cols satisfaction --ordinal \\
    --row-order 'rarely,a few times a year,monthly,weekly'

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage.`,
  );
  command.action(async (file: string | undefined, raw: RawPairOptions) => {
    const source = inputSource(file);
    const reader = readerPlan(raw);
    const analysis = analysisPlan(raw);
    const rowOrder = splitList(raw.rowOrder);
    const colOrder = splitList(raw.colOrder);
    checkReadable(source);
    const counted = await countPair(source, reader, { rows: raw.rows, cols: raw.cols, maxLevels: reader.maxLevels, rowOrder, colOrder });
    const report = pairReport(
      counted.table,
      counted.excluded,
      {
        file: source.label,
        delimiter: counted.summary.delimiter,
        rowsRead: counted.summary.records,
        blankLines: counted.summary.blankLines,
        badRowsSkipped: counted.summary.badRows,
      },
      analysis,
      [...unknownOrderWarnings('--row-order', counted.unknownRowLevels), ...unknownOrderWarnings('--col-order', counted.unknownColLevels)],
    );
    await writeOut(raw.format === 'json' ? toJson(report) : renderPairText(report, painter(raw.color)));
  });
  return command;
}
