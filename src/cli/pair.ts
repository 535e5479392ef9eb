import { Command, Option } from 'commander';
import { pairReport, unknownOrderWarnings } from '../analysis/report.js';
import { countTables } from '../io/countTables.js';
import { inputSource, checkReadable } from '../io/source.js';
import { toJson } from '../render/json.js';
import { renderPairText } from '../render/pairText.js';
import { addAnalysisOptions, addReaderOptions, addReportOptions, addSurveyOptions, RawReportOptions, RawTableOptions, tablePlan, inputSummary, addSummedWeightsOption } from './options.js';
import { emit, painter, writeFileAtomically } from './output.js';
import { setOutcome } from './outcome.js';
import { renderPairDelimited, renderPairMarkdown } from '../render/pairDelimited.js';
import { renderPairHtml } from '../render/html.js';
import { mosaicPlot, residualHeatMap, stackSvg } from '../render/svg.js';

interface RawPairOptions extends RawTableOptions, RawReportOptions {
  format: 'text' | 'json' | 'csv' | 'tsv' | 'markdown' | 'html';
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
    .addOption(new Option('--format <format>', 'output format').choices(['text', 'json', 'csv', 'tsv', 'markdown', 'html']).default('text'))
    .option('--alpha <level>', 'significance level for --exit-status', '0.05')
    .option('--no-color', 'plain text without colour');
  addReaderOptions(command);
  addSurveyOptions(command);
  addSummedWeightsOption(command);
  addAnalysisOptions(command);
  addReportOptions(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight pair survey.csv --rows age_band --cols preferred_format
  cat survey.csv | tabsight pair - --rows membership --cols visit_frequency --format json
  tabsight pair survey.csv --rows visit_frequency --cols satisfaction --ordinal \\
    --row-order 'rarely,a few times a year,monthly,weekly'

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,\n3 no association at --alpha (only with --exit-status).`,
  );
  command.action(async (file: string | undefined, raw: RawPairOptions) => {
    const source = inputSource(file);
    const { reader, analysis, survey, alpha, rowOrder, colOrder } = tablePlan(raw);
    checkReadable(source);
    const counted = await countTables(source, reader, { rows: raw.rows, cols: raw.cols, maxLevels: reader.maxLevels, rowOrder, colOrder, ...survey });
    const report = pairReport(
      counted.table,
      counted.excluded,
      inputSummary(source.label, counted),
      analysis,
      [...unknownOrderWarnings('--row-order', counted.unknownRowLevels), ...unknownOrderWarnings('--col-order', counted.unknownColLevels)],
      counted.weighting,
      counted.strata && counted.byName ? { by: counted.byName, strata: counted.strata } : undefined,
    );
    const text =
      raw.format === 'json'
        ? toJson(report)
        : raw.format === 'csv' || raw.format === 'tsv'
          ? renderPairDelimited(report, raw.format === 'csv' ? ',' : '\t')
          : raw.format === 'markdown'
            ? renderPairMarkdown(report)
            : raw.format === 'html'
              ? renderPairHtml(report)
              : renderPairText(report, painter(raw.color, raw.output !== undefined));
    if (raw.plot !== undefined) writeFileAtomically(raw.plot, stackSvg([residualHeatMap(report), mosaicPlot(report)]));
    await emit(text, raw.output);
    setOutcome(report.findings.primaryTest.pValue <= alpha, raw.exitStatus);
  });
  return command;
}
