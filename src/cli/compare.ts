import { Command, Option } from 'commander';
import { comparePeriods, PeriodInput } from '../analysis/compare.js';
import { unknownOrderWarnings } from '../analysis/report.js';
import { usageError } from '../errors.js';
import { CountedTables, countTables } from '../io/countTables.js';
import { checkReadable, inputSource } from '../io/source.js';
import { renderCompareHtml } from '../render/html.js';
import { toJson } from '../render/json.js';
import { renderCompareText } from '../render/compareText.js';
import { residualHeatMap, stackSvg } from '../render/svg.js';
import {
  tablePlan,
  addAnalysisOptions,
  addReaderOptions,
  addReportOptions,
  addSurveyOptions,
  RawReportOptions,
  RawTableOptions,
  splitList,
  inputSummary,
  addSummedWeightsOption,
} from './options.js';
import { setOutcome } from './outcome.js';
import { emit, painter, writeFileAtomically } from './output.js';

interface RawCompareOptions extends RawTableOptions, RawReportOptions {
  period?: string;
  levels?: string;
  format: 'text' | 'json' | 'html';
  color?: boolean;
}

function period(label: string, counted: Pick<CountedTables, 'table' | 'weighting' | 'excluded'>, input: PeriodInput['input']): PeriodInput {
  return { label, table: counted.table, weighting: counted.weighting, excluded: counted.excluded, input };
}

export function compareCommand(): Command {
  const command = new Command('compare')
    .description('compare the same pair in two periods: did the association or the margins change?')
    .argument('<before>', 'CSV of the earlier period (or the only file, with --period)')
    .argument('[after]', 'CSV of the later period')
    .requiredOption('--rows <column>', 'column whose levels form the rows')
    .requiredOption('--cols <column>', 'column whose levels form the columns')
    .option('--period <column>', 'one file holding both periods: the column that tells them apart')
    .option('--levels <before,after>', 'with --period: the two levels to compare (default: the two levels, in natural order)')
    .option('--row-order <levels>', 'comma-separated order of the row levels')
    .option('--col-order <levels>', 'comma-separated order of the column levels')
    .addOption(new Option('--format <format>', 'output format').choices(['text', 'json', 'html']).default('text'))
    .option('--alpha <level>', 'significance level for the change test and --exit-status', '0.05')
    .option('--no-color', 'plain text without colour');
  addReaderOptions(command);
  addSurveyOptions(command, false);
  addSummedWeightsOption(command);
  addAnalysisOptions(command);
  addReportOptions(command);
  command.addHelpText(
    'after',
    `
Examples:
  tabsight compare week47.csv week48.csv --rows membership --cols preferred_format
  tabsight compare survey.csv --period wave --levels 2025,2026 --rows age_band --cols preferred_format

Exit status: 0 done, 1 the data cannot be read or analysed, 2 bad usage,
3 the association did not change at --alpha (only with --exit-status).`,
  );
  command.action(async (beforeFile: string, afterFile: string | undefined, raw: RawCompareOptions) => {
    const { reader, analysis, survey, alpha, rowOrder, colOrder } = tablePlan(raw);
    const base = { rows: raw.rows, cols: raw.cols, maxLevels: reader.maxLevels, ...survey, allowDegenerate: true };
    let before: PeriodInput;
    let after: PeriodInput;
    const inputOf = (label: string, c: CountedTables) => inputSummary(label, c);
    if (raw.period !== undefined) {
      if (afterFile !== undefined) throw usageError('--period reads one file: give either two files or one file with --period');
      const source = inputSource(beforeFile);
      checkReadable(source);
      const counted = await countTables(source, reader, { ...base, by: raw.period });
      const strata = counted.strata ?? [];
      const wanted = splitList(raw.levels);
      const available = strata.map((s) => s.level);
      let pick: string[];
      if (wanted) {
        if (wanted.length !== 2) throw usageError(`--levels "${raw.levels}": name exactly two levels of ${raw.period}, before and after`);
        for (const l of wanted) if (!available.includes(l)) throw usageError(`--levels: "${l}" is not a level of ${raw.period} (levels: ${available.join(', ')})`);
        pick = wanted;
      } else {
        if (available.length !== 2) throw usageError(`${raw.period} has ${available.length} levels (${available.slice(0, 10).join(', ')}); choose two with --levels before,after`);
        pick = available;
      }
      const input = inputOf(source.label, counted);
      const [b, a] = pick.map((l) => strata.find((s) => s.level === l)!);
      before = period(`${raw.period} ${b.level}`, { table: b.table, weighting: b.weighting, excluded: 0 }, input);
      after = period(`${raw.period} ${a.level}`, { table: a.table, weighting: a.weighting, excluded: 0 }, input);
    } else {
      if (afterFile === undefined) throw usageError('compare needs two files (before and after), or one file with --period');
      const sources = [inputSource(beforeFile), inputSource(afterFile)];
      const counted = [];
      for (const source of sources) counted.push(await countTables(source, reader, base));
      before = period(sources[0].label, counted[0], inputOf(sources[0].label, counted[0]));
      after = period(sources[1].label, counted[1], inputOf(sources[1].label, counted[1]));
    }
    const report = comparePeriods(before, after, analysis, { rows: rowOrder, cols: colOrder });
    report.warnings.unshift(...unknownOrderWarnings('--row-order', (rowOrder ?? []).filter((l) => !report.rows.levels.includes(l))));
    const text = raw.format === 'json' ? toJson(report) : raw.format === 'html' ? renderCompareHtml(report) : renderCompareText(report, painter(raw.color, raw.output !== undefined), alpha);
    if (raw.plot !== undefined) {
      const pictures = [report.before, report.after].filter((r) => r.testable).map((r) => residualHeatMap(r as never, `Adjusted residuals, ${r.label}`));
      writeFileAtomically(raw.plot, stackSvg(pictures));
    }
    await emit(text, raw.output);
    setOutcome(report.change !== null && report.change.pValue <= alpha, raw.exitStatus);
  });
  return command;
}
