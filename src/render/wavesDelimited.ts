import type { WaveRecord, WavesReport } from '../analysis/waves.js';
import { formatCount, formatP, formatRatio, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { md } from './pairDelimited.js';
import { exactNumber } from './scanTable.js';
import { spreadsheetField } from '../escape/spreadsheet.js';
import { CAUTION, testName } from './words.js';
import { acrossTests, latestHeadline, levelsWords, patternHeadline, setupWords, slopeWords, vWithInterval, wavesStatementWords, weightingWords } from './wavesWords.js';

/**
 * Stable column names of `waves --format csv|tsv`: one line per wave, in
 * wave order. The decision of the series (`moved`, `pattern`,
 * `deciding_p_value`, `alpha`) and of the last two waves (`latest_changed`)
 * repeat on every line, so that any one line carries them.
 */
export const WAVES_COLUMNS = [
  'wave',
  'label',
  'score',
  'n',
  'effective_n',
  'unweighted_n',
  'excluded',
  'testable',
  'leading_test',
  'leading_p_value',
  'passes',
  'chi_square',
  'df',
  'bias_corrected_v',
  'cramers_v',
  'v_lower',
  'v_upper',
  'odds_ratio',
  'odds_ratio_lower',
  'odds_ratio_upper',
  'departure_statistic',
  'departure_df',
  'departure_p_value',
  'departure_adjusted_p_value',
  'stands_out',
  'moved',
  'pattern',
  'deciding_p_value',
  'alpha',
  'latest_changed',
  'design_df',
  'mean_design_effect',
  'weighting',
] as const;

type Value = string | number | boolean | null;

function waveLine(report: WavesReport, w: WaveRecord, k: number): Value[] {
  const d = report.departures?.find((x) => x.wave === k) ?? null;
  const t = w.testable ? w : null;
  const v = report.verdict;
  return [
    w.key,
    w.label,
    w.score,
    w.n,
    t?.effectiveN ?? null,
    t?.unweightedN ?? null,
    t?.excluded ?? null,
    w.testable,
    t?.verdict.test ?? null,
    t?.verdict.pValue ?? null,
    t?.verdict.passes ?? null,
    t?.tests.pearson.statistic ?? null,
    t?.tests.pearson.df ?? null,
    t?.measures.biasCorrectedV ?? null,
    t?.measures.cramersV ?? null,
    t?.measures.cramersVInterval?.lower ?? null,
    t?.measures.cramersVInterval?.upper ?? null,
    t?.measures.oddsRatio?.estimate ?? null,
    t?.measures.oddsRatio?.lower ?? null,
    t?.measures.oddsRatio?.upper ?? null,
    d?.statistic ?? null,
    d?.df ?? null,
    d?.pValue ?? null,
    d?.adjustedPValue ?? null,
    d?.standsOut ?? null,
    v.moved,
    v.pattern,
    v.decidingPValue,
    v.alpha,
    report.latest.verdict?.changed ?? null,
    t?.design?.degreesOfFreedom ?? null,
    t?.design?.designEffects.mean ?? null,
    weightingWords(report),
  ];
}

/** One line per wave; cells a spreadsheet would run as formulas are neutralised unless `raw` (--raw-cells). */
export function renderWavesDelimited(report: WavesReport, delimiter: ',' | '\t', raw = false): string {
  const lines = [WAVES_COLUMNS.join(delimiter)];
  report.waves.forEach((w, k) => lines.push(waveLine(report, w, k).map((x) => spreadsheetField(exactNumber(x), delimiter, raw)).join(delimiter)));
  return lines.join('\n') + '\n';
}

export function renderWavesMarkdown(report: WavesReport): string {
  const out: string[] = [];
  const K = report.waves.length;
  const twoByTwo = report.rows.levels.length === 2 && report.cols.levels.length === 2;
  out.push(`### ${md(report.rows.name)} × ${md(report.cols.name)}: ${K} waves, ${md(report.waves[0].key)} to ${md(report.waves[K - 1].key)}`);
  for (const side of [report.rows, report.cols]) if (side.question) out.push('', `${md(side.name)}: ${md(side.question)}`);
  out.push('');
  out.push(md(setupWords(report)));
  out.push('');
  out.push(md(levelsWords(report)));
  out.push('');
  const weighting = weightingWords(report);
  if (weighting) {
    out.push(md(weighting));
    out.push('');
  }
  out.push(`**Since the wave before.** ${md(latestHeadline(report))}.`);
  out.push('');
  out.push(`**Over all waves.** ${md(patternHeadline(report))}.`);
  out.push('');
  for (const s of report.statements) if (s.kind !== 'latest') out.push(`- ${md(wavesStatementWords(report, s))}`);
  out.push('');
  out.push(`| wave | n | leading p | test | associated | bias-corrected V (interval) |${twoByTwo ? ' odds ratio (interval) |' : ''} stands out |`);
  out.push(`|---|--:|--:|---|:-:|--:|${twoByTwo ? '--:|' : ''}:-:|`);
  report.waves.forEach((w, k) => {
    const d = report.departures?.find((x) => x.wave === k);
    const standsOut = d ? (d.standsOut ? `yes (adjusted p ${formatP(d.adjustedPValue)})` : 'no') : UNDEFINED;
    if (!w.testable) {
      out.push(`| ${md(w.key)} | ${formatCount(w.n)} | ${UNDEFINED} | not testable: ${md(w.reason)} | ${UNDEFINED} | ${UNDEFINED} |${twoByTwo ? ` ${UNDEFINED} |` : ''} ${standsOut} |`);
      return;
    }
    const vi = w.measures.cramersVInterval;
    const or = w.measures.oddsRatio;
    out.push(
      `| ${md(w.key)} | ${formatCount(w.n)} | ${formatP(w.verdict.pValue)} | ${md(testName(w.verdict.test, w))} | ${w.verdict.passes ? 'yes' : 'no'} | ${md(vWithInterval(w.measures.biasCorrectedV, vi?.lower, vi?.upper))} |` +
        `${twoByTwo ? ` ${or ? md(`${formatRatio(or.estimate)} (${formatRatio(or.lower)}–${formatRatio(or.upper)})`) : UNDEFINED} |` : ''} ${standsOut} |`,
    );
  });
  out.push('');
  out.push('| test across waves | statistic | df | p | adjusted p |');
  out.push('|---|--:|--:|--:|--:|');
  for (const t of acrossTests(report)) out.push(`| ${t.decides ? '► ' : ''}${md(t.name)} | ${formatStatistic(t.statistic)} | ${t.denDf === null ? t.df : `${t.df} and ${formatStatistic(t.denDf, 0)}`} | ${formatP(t.pValue)} | ${t.adjustedPValue === null ? '' : formatP(t.adjustedPValue)} |`);
  const slope = slopeWords(report);
  if (slope) {
    out.push('');
    out.push(`► the two that decide, Holm-adjusted together; ${md(slope)}.`);
  }
  out.push('');
  out.push(`Bias-corrected V is shown with the ${Math.round(report.settings.confidence * 1000) / 10}% interval of the population V (noncentral chi-square inversion).`);
  if (report.warnings.length > 0) {
    out.push('');
    out.push('**Check before relying on it.**');
    out.push('');
    for (const w of report.warnings) out.push(`- ${md(w.message)}`);
  }
  out.push('');
  out.push(`_${md(CAUTION)}_`);
  return out.join('\n') + '\n';
}
