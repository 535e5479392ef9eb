import type { PairReport } from '../analysis/report.js';
import { CAUTION } from './pairText.js';
import { delimitedField, exactNumber } from './scanTable.js';
import { formatCount, formatMeasure, formatP, formatStatistic } from './format.js';

/** Stable column names of `pair --format csv|tsv`: one line per table cell, test or measure. */
export const PAIR_COLUMNS = ['section', 'name', 'row', 'col', 'value', 'df', 'p_value'] as const;

type Line = [string, string, string, string, number | null, number | null, number | null];

const MEASURE_NAMES: [keyof PairReport['measures'], string][] = [
  ['phi', 'phi'],
  ['contingencyC', 'contingency_c'],
  ['correctedC', 'corrected_c'],
  ['cramersV', 'cramers_v'],
  ['tschuprowT', 'tschuprow_t'],
  ['biasCorrectedV', 'bias_corrected_v'],
  ['yulesQ', 'yules_q'],
  ['yulesY', 'yules_y'],
  ['lambdaColsGivenRows', 'lambda_cols_given_rows'],
  ['lambdaRowsGivenCols', 'lambda_rows_given_cols'],
  ['lambdaSymmetric', 'lambda_symmetric'],
  ['gkTauColsGivenRows', 'gk_tau_cols_given_rows'],
  ['gkTauRowsGivenCols', 'gk_tau_rows_given_cols'],
  ['uncertaintyColsGivenRows', 'uncertainty_cols_given_rows'],
  ['uncertaintyRowsGivenCols', 'uncertainty_rows_given_cols'],
  ['uncertaintySymmetric', 'uncertainty_symmetric'],
];

export function pairLines(report: PairReport): Line[] {
  const lines: Line[] = [];
  const cells = (section: string, matrix: readonly (readonly (number | null)[])[]) =>
    report.rows.levels.forEach((rl, i) => report.cols.levels.forEach((cl, j) => lines.push([section, section, rl, cl, matrix[i][j], null, null])));
  cells('count', report.counts);
  cells('expected', report.expected);
  cells('adjusted_residual', report.residuals.adjusted);
  const t = report.tests;
  const test = (name: string, r: { statistic: number; df: number; pValue: number } | null) => r && lines.push(['test', name, '', '', r.statistic, r.df, r.pValue]);
  test('pearson_chi_square', t.pearson);
  test('likelihood_ratio', t.likelihoodRatio);
  test('yates', t.yates);
  if (t.fisher) lines.push(['test', 'fisher_exact', '', '', null, null, t.fisher.pValue]);
  if (t.monteCarlo) lines.push(['test', 'simulated_exact', '', '', t.monteCarlo.standardError, t.monteCarlo.simulations, t.monteCarlo.pValue]);
  test('linear_by_linear', t.linearByLinear);
  for (const [key, name] of MEASURE_NAMES) lines.push(['measure', name, '', '', report.measures[key] as number | null, null, null]);
  const vi = report.measures.cramersVInterval;
  if (vi) {
    lines.push(['measure', 'cramers_v_lower', '', '', vi.lower, null, null]);
    lines.push(['measure', 'cramers_v_upper', '', '', vi.upper, null, null]);
  }
  if (report.measures.oddsRatio) {
    const o = report.measures.oddsRatio;
    lines.push(['measure', 'odds_ratio', '', '', o.estimate, null, null], ['measure', 'odds_ratio_lower', '', '', o.lower, null, null], ['measure', 'odds_ratio_upper', '', '', o.upper, null, null]);
  }
  if (report.ordinal) {
    for (const [key, e] of Object.entries(report.ordinal)) lines.push(['ordinal', key, '', '', e.estimate, null, e.pValue]);
  }
  lines.push(['sample', 'n', '', '', report.n, null, null], ['sample', 'effective_n', '', '', report.effectiveN, null, null], ['sample', 'excluded', '', '', report.excluded, null, null]);
  return lines;
}

export function renderPairDelimited(report: PairReport, delimiter: ',' | '\t'): string {
  const out = [PAIR_COLUMNS.join(delimiter)];
  for (const line of pairLines(report)) out.push(line.map((v) => delimitedField(exactNumber(v), delimiter)).join(delimiter));
  return out.join('\n') + '\n';
}

const cell = (s: string) => s.replace(/\|/g, '\\|').replace(/\n/g, ' ');

export function renderPairMarkdown(report: PairReport): string {
  const out: string[] = [];
  out.push(`**${cell(report.rows.name)} × ${cell(report.cols.name)}** — ${formatCount(report.n)} in the table, ${formatCount(report.excluded)} left out for a missing value.`);
  out.push('');
  out.push(`| ${cell(report.rows.name)} \\ ${cell(report.cols.name)} | ${report.cols.levels.map(cell).join(' | ')} | all |`);
  out.push(`|---|${report.cols.levels.map(() => '--:').join('|')}|--:|`);
  report.rows.levels.forEach((l, i) => {
    const total = report.rowTotals[i];
    out.push(`| ${cell(l)} | ${report.counts[i].map((v, j) => `${formatCount(v)} (${report.expected[i][j].toFixed(1)})`).join(' | ')} | ${formatCount(total)} |`);
  });
  out.push('');
  out.push('Counts, with expected counts under independence in parentheses.');
  out.push('');
  out.push('| test | statistic | df | p-value |');
  out.push('|---|--:|--:|--:|');
  const t = report.tests;
  out.push(`| Pearson chi-square | ${formatStatistic(t.pearson.statistic)} | ${t.pearson.df} | ${formatP(t.pearson.pValue)} |`);
  out.push(`| likelihood ratio | ${formatStatistic(t.likelihoodRatio.statistic)} | ${t.likelihoodRatio.df} | ${formatP(t.likelihoodRatio.pValue)} |`);
  if (t.yates) out.push(`| continuity-corrected | ${formatStatistic(t.yates.statistic)} | 1 | ${formatP(t.yates.pValue)} |`);
  if (t.fisher) out.push(`| exact | | | ${formatP(t.fisher.pValue)} |`);
  if (t.monteCarlo) out.push(`| simulated exact | | | ${formatP(t.monteCarlo.pValue)} |`);
  out.push('');
  out.push('| measure | value |');
  out.push('|---|--:|');
  for (const [key, name] of MEASURE_NAMES) {
    const v = report.measures[key] as number | null;
    if (v !== null) out.push(`| ${name.replace(/_/g, ' ')} | ${formatMeasure(v)} |`);
  }
  if (report.warnings.length > 0) {
    out.push('');
    for (const w of report.warnings) out.push(`- ${cell(w.message)}`);
  }
  out.push('');
  out.push(`_${CAUTION}_`);
  return out.join('\n') + '\n';
}
