/**
 * The pair report as CSV/TSV lines under stable columns, and as Markdown
 * tables.
 */
import type { AnalysisRecord } from '../analysis/analyzeTable.js';
import type { PairReport } from '../analysis/report.js';
import { formatCount, formatExpected, formatMeasure, formatP, formatPercent, formatRatio, formatSigned, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { inputLine } from './pairText.js';
import { exactNumber } from './scanTable.js';
import { spreadsheetField } from '../escape/spreadsheet.js';
import { CAUTION, comparison, designEffectWords, designIntervalWords, designVWords, designWords, headline, intervalWords, markLegend, reasonSentence, statementWords, strengthPhrase, testName, vIntervalWords } from './words.js';
import type { DesignShare } from '../analysis/design.js';

/**
 * Stable column names of `pair --format csv|tsv`: one line per table cell,
 * margin, test or measure. `level` names the level of the --by variable a
 * line belongs to (empty for the whole table); `text` carries a word where
 * the line's value is one (the leading test, the strength).
 */
export const PAIR_COLUMNS = ['section', 'name', 'row', 'col', 'value', 'df', 'p_value', 'level', 'text'] as const;

export type Line = [string, string, string, string, number | null, number | null, number | null, string, string];

const MEASURE_NAMES: [keyof AnalysisRecord['measures'], string, string][] = [
  ['phi', 'phi', 'phi'],
  ['contingencyC', 'contingency_c', 'contingency coefficient'],
  ['correctedC', 'corrected_c', 'corrected contingency coefficient'],
  ['cramersV', 'cramers_v', "Cramér's V"],
  ['tschuprowT', 'tschuprow_t', "Tschuprow's T"],
  ['biasCorrectedV', 'bias_corrected_v', 'bias-corrected V'],
  ['yulesQ', 'yules_q', "Yule's Q"],
  ['yulesY', 'yules_y', "Yule's Y"],
  ['lambdaColsGivenRows', 'lambda_cols_given_rows', 'lambda, columns from rows'],
  ['lambdaRowsGivenCols', 'lambda_rows_given_cols', 'lambda, rows from columns'],
  ['lambdaSymmetric', 'lambda_symmetric', 'lambda, either way'],
  ['gkTauColsGivenRows', 'gk_tau_cols_given_rows', 'tau, columns from rows'],
  ['gkTauRowsGivenCols', 'gk_tau_rows_given_cols', 'tau, rows from columns'],
  ['uncertaintyColsGivenRows', 'uncertainty_cols_given_rows', "Theil's U, columns from rows"],
  ['uncertaintyRowsGivenCols', 'uncertainty_rows_given_cols', "Theil's U, rows from columns"],
  ['uncertaintySymmetric', 'uncertainty_symmetric', "Theil's U, either way"],
];

/** The lines of one table's record (the whole table, or one level of the --by variable). */
export function recordLines(record: AnalysisRecord, level: string, by?: string): Line[] {
  const lines: Line[] = [];
  const line = (section: string, name: string, value: number | null, df: number | null = null, p: number | null = null, row = '', col = '', text = ''): void => {
    lines.push([section, name, row, col, value, df, p, level, text]);
  };
  const v = record.verdict;
  line('verdict', 'leading_p_value', null, null, v.pValue, '', '', v.test);
  line('verdict', 'deciding_p_value', null, null, v.decidingPValue, '', '', v.route);
  line('verdict', 'alpha', v.alpha);
  line('verdict', 'passes', v.passes ? 1 : 0, null, null, '', '', String(v.passes));
  line('verdict', 'strength', record.measures.biasCorrectedV, null, null, '', '', v.strength ?? '');
  // What the human formats say in words, one line each: why the test leads, then the record's sentences in order.
  line('sentence', 'why_this_test', null, null, null, '', '', plainSpaces(reasonSentence(record, by)));
  for (const s of record.findings.statements) line('sentence', s.kind.replace(/-/g, '_'), null, null, null, '', '', plainSpaces(statementWords(record, s)));
  const cells = (section: string, matrix: readonly (readonly (number | null)[])[]) =>
    record.rows.levels.forEach((rl, i) => record.cols.levels.forEach((cl, j) => line(section, section, matrix[i][j], null, null, rl, cl)));
  cells('count', record.counts);
  cells('row_share', record.percentages.row);
  cells('col_share', record.percentages.col);
  cells('total_share', record.percentages.total);
  cells('expected', record.expected);
  cells('adjusted_residual', record.residuals.adjusted);
  record.rows.levels.forEach((rl, i) => line('margin', 'row_total', record.rowTotals[i], null, null, rl, ''));
  record.cols.levels.forEach((cl, j) => line('margin', 'col_total', record.colTotals[j], null, null, '', cl));
  const t = record.tests;
  const test = (name: string, r: { statistic: number; df: number; pValue: number } | null) => r && line('test', name, r.statistic, r.df, r.pValue);
  test('pearson_chi_square', t.pearson);
  test('likelihood_ratio', t.likelihoodRatio);
  test('yates', t.yates);
  if (t.fisher) line('test', 'fisher_exact', null, null, t.fisher.pValue);
  if (t.monteCarlo) line('test', 'simulated_exact', t.monteCarlo.standardError, t.monteCarlo.simulations, t.monteCarlo.pValue);
  test('linear_by_linear', t.linearByLinear);
  if (t.designF && t.designPearson && t.designLikelihoodRatio) {
    line('test', 'design_f', t.designF.statistic, t.designF.numDf, t.designF.pValue);
    line('test', 'design_f_denominator_df', t.designF.denDf);
    test('design_pearson', t.designPearson);
    test('design_likelihood_ratio', t.designLikelihoodRatio);
    line('test', 'pearson_ignoring_design', t.designPearson.uncorrected, t.designPearson.df);
    line('test', 'likelihood_ratio_ignoring_design', t.designLikelihoodRatio.uncorrected, t.designLikelihoodRatio.df);
  }
  for (const [key, name] of MEASURE_NAMES) line('measure', name, record.measures[key] as number | null);
  if (record.measures.designCramersV) line('measure', 'design_cramers_v', record.measures.designCramersV.value);
  const vi = record.measures.cramersVInterval;
  if (vi) {
    line('measure', 'cramers_v_population', vi.estimate);
    line('measure', 'cramers_v_lower', vi.lower);
    line('measure', 'cramers_v_upper', vi.upper);
  }
  for (const [key, name] of [
    ['oddsRatio', 'odds_ratio'],
    ['relativeRisk', 'relative_risk'],
  ] as const) {
    const x = record.measures[key];
    if (!x) continue;
    line('measure', name, x.estimate, null, null, '', '', x.haldaneCorrection ? 'half added to every cell' : '');
    line('measure', `${name}_lower`, x.lower);
    line('measure', `${name}_upper`, x.upper);
  }
  if (record.ordinal) {
    for (const [key, e] of Object.entries(record.ordinal)) line('ordinal', key, e.estimate, null, e.pValue);
  }
  line('sample', 'n', record.n);
  line('sample', 'effective_n', record.effectiveN);
  line('sample', 'excluded', record.excluded);
  const d = record.design;
  if (d) {
    line('design', 'kind', null, null, null, '', '', d.kind);
    line('design', 'strata', d.strata);
    line('design', 'clusters', d.clusters);
    line('design', 'degrees_of_freedom', d.degreesOfFreedom);
    line('design', 'replicates', d.replicates, null, null, '', '', d.method ?? '');
    line('design', 'lonely_psu', d.lonelyStrata.length, null, null, '', '', d.lonelyPsu ?? '');
    line('design', 'mean_design_effect', d.designEffects.mean);
    line('design', 'min_design_effect', d.designEffects.min);
    line('design', 'max_design_effect', d.designEffects.max);
    line('design', 'unweighted_n', d.n);
    line('design', 'design_effective_n', d.effectiveSampleSize);
    if (record.designEffects) cells('design_effect', record.designEffects);
    const shares = record.designPercentages;
    if (shares) {
      for (const [section, matrix] of [
        ['design_row_share', shares.row],
        ['design_col_share', shares.col],
        ['design_total_share', shares.total],
      ] as const) {
        record.rows.levels.forEach((rl, i) =>
          record.cols.levels.forEach((cl, j) => {
            const x: DesignShare = matrix[i][j];
            line(section, 'estimate', x.estimate, null, null, rl, cl, x.method);
            line(section, 'standard_error', x.standardError, null, null, rl, cl);
            line(section, 'lower', x.lower, null, null, rl, cl);
            line(section, 'upper', x.upper, null, null, rl, cl);
          }),
        );
      }
    }
  }
  for (const w of record.warnings) line('warning', w.code, null, null, null, '', '', w.message);
  return lines;
}

/** Words for a spreadsheet cell: the glue that keeps numbers with their labels on a line becomes a plain space. */
export function plainSpaces(text: string): string {
  return text.replace(/\u00a0/g, ' ');
}

/** The rows left out by column and reason: `excluded_by_rows`, `excluded_by_cols`, `excluded_by_layer` (the --by variable), the reason in `text`. */
function excludedByLines(report: PairReport): Line[] {
  const side = (column: string) => (column === report.rows.name ? 'rows' : column === report.cols.name ? 'cols' : 'layer');
  return (report.excludedBy ?? []).map((e) => ['sample', `excluded_by_${side(e.column)}`, '', '', e.rows, null, null, '', e.reason]);
}

export function pairLines(report: PairReport): Line[] {
  const lines = [...recordLines(report, '', report.stratified?.by), ...excludedByLines(report)];
  const { stratified, strata } = report;
  if (stratified && strata) {
    const held = (name: string, value: number | null, df: number | null = null, p: number | null = null) => lines.push(['held_fixed', name, '', '', value, df, p, '', stratified.by]);
    if (stratified.cmh) held('cochran_mantel_haenszel', stratified.cmh.statistic, stratified.cmh.df, stratified.cmh.pValue);
    if (stratified.commonOddsRatio) {
      held('common_odds_ratio', stratified.commonOddsRatio.estimate);
      held('common_odds_ratio_lower', stratified.commonOddsRatio.lower);
      held('common_odds_ratio_upper', stratified.commonOddsRatio.upper);
    }
    if (stratified.breslowDay) held('breslow_day', stratified.breslowDay.statistic, stratified.breslowDay.df, stratified.breslowDay.pValue);
    if (stratified.pooledOddsRatio !== null) held('pooled_odds_ratio', stratified.pooledOddsRatio);
    for (const s of strata) {
      if (s.testable) lines.push(...recordLines(s, s.level));
      else lines.push(['stratum', 'not_testable', '', '', s.n, null, null, s.level, s.reason]);
    }
  }
  return lines;
}

/** One line per cell, test and measure; cells a spreadsheet would run as formulas are neutralised unless `raw` (--raw-cells). */
export function renderPairDelimited(report: PairReport, delimiter: ',' | '\t', raw = false): string {
  const out = [PAIR_COLUMNS.join(delimiter)];
  for (const line of pairLines(report)) out.push(line.map((v) => spreadsheetField(exactNumber(v), delimiter, raw)).join(delimiter));
  return out.join('\n') + '\n';
}

/** Text for a Markdown table cell or paragraph: src/escape/markdown.ts (one line, nothing from the data becomes markup). */
export { markdownText as md } from '../escape/markdown.js';
import { markdownText as md } from '../escape/markdown.js';

function markdownGrid(record: AnalysisRecord, cell: (i: number, j: number) => string, margins: boolean): string[] {
  const share = (x: number) => (record.n > 0 ? formatPercent((100 * x) / record.n) : UNDEFINED);
  const out = [`| ${md(record.rows.name)} ↓ · ${md(record.cols.name)} → | ${record.cols.levels.map(md).join(' | ')} |${margins ? ' all |' : ''}`];
  out.push(`|---|${record.cols.levels.map(() => '--:').join('|')}|${margins ? '--:|' : ''}`);
  record.rows.levels.forEach((l, i) => {
    out.push(`| ${md(l)} | ${record.cols.levels.map((_c, j) => cell(i, j)).join(' | ')} |${margins ? ` ${formatCount(record.rowTotals[i])} (${share(record.rowTotals[i])}) |` : ''}`);
  });
  if (margins) out.push(`| all | ${record.colTotals.map((t) => `${formatCount(t)} (${share(t)})`).join(' | ')} | ${formatCount(record.n)} (100%) |`);
  return out;
}

export function markdownRecord(record: AnalysisRecord, by?: string): string[] {
  const out: string[] = [];
  const v = record.verdict;
  const m = record.measures;
  const compare = comparison(v.adjustment ? v.decidingPValue : v.pValue, v.alpha, v.passes, v.adjustment !== null);
  out.push(`**${md(`${headline(v, by)}: ${compare}, ${testName(v.test, record)}`)}**`);
  out.push('');
  out.push(`- Why this test: ${md(reasonSentence(record, by))}`);
  out.push(`- Strength: ${md(strengthPhrase(record))}`);
  if (record.design) out.push(`- Design: ${md(`${designEffectWords(record.design)}.`)}`);
  else if (record.weighted) out.push(`- Weights: counts are sums of sampling weights; the tests use the effective sample of ${formatCount(Math.round(record.effectiveN * 10) / 10)}, which does not account for clustering or stratification.`);
  out.push('');
  out.push('Counts, each with its share of the row; "all": totals with their share of the whole table.');
  out.push('');
  out.push(...markdownGrid(record, (i, j) => `${formatCount(record.counts[i][j])} (${formatPercent(record.percentages.row[i][j], 0)})`, true));
  out.push('');
  out.push('Shares of each column:');
  out.push('');
  out.push(...markdownGrid(record, (i, j) => formatPercent(record.percentages.col[i][j]), false));
  out.push('');
  out.push('Counts expected if the two were independent:');
  out.push('');
  out.push(...markdownGrid(record, (i, j) => formatExpected(record.expected[i][j]), false));
  out.push('');
  out.push(`Where it sits: adjusted residuals; ${md(markLegend(record))}.`);
  out.push('');
  const t = record.findings.cellThreshold;
  out.push(
    ...markdownGrid(
      record,
      (i, j) => {
        const x = record.residuals.adjusted[i][j];
        if (x === null) return UNDEFINED;
        const mark = Math.abs(x) > t.adjusted ? (x > 0 ? '▲▲ ' : '▼▼ ') : Math.abs(x) > t.single ? (x > 0 ? '▲ ' : '▼ ') : '';
        return `${mark}${formatSigned(x, 1)}`;
      },
      false,
    ),
  );
  out.push('');
  for (const s of record.findings.statements) out.push(`- ${md(statementWords(record, s))}`);
  out.push('');
  const tests = record.tests;
  const lead = record.findings.primaryTest.test;
  out.push('| test (► leads) | statistic | df | p-value |');
  out.push('|---|--:|--:|--:|');
  const row = (name: string, r: { statistic: number; df: number; pValue: number } | null, isLead = false) => r && out.push(`| ${isLead ? '► ' : ''}${name} | ${formatStatistic(r.statistic)} | ${r.df} | ${formatP(r.pValue)} |`);
  if (tests.designF && tests.designPearson && tests.designLikelihoodRatio) {
    const f = tests.designF;
    out.push(`| ${lead === 'designF' ? '► ' : ''}design-based F (Rao–Scott, 2nd order) | ${formatStatistic(f.statistic)} | ${formatStatistic(f.numDf)} and ${formatStatistic(f.denDf, 1)} | ${formatP(f.pValue)} |`);
    row('X² ÷ mean design effect (1st order)', tests.designPearson);
    row('G² ÷ mean design effect (1st order)', tests.designLikelihoodRatio);
    out.push(`| X² ignoring the design (not a valid test here) | ${formatStatistic(tests.designPearson.uncorrected)} | ${tests.designPearson.df} | |`);
  } else {
    row("chi-square (Pearson's X²)", tests.pearson, lead === 'pearson' && v.test !== 'cmh');
    row('likelihood ratio (G²)', tests.likelihoodRatio);
  }
  row("chi-square, Yates' correction", tests.yates);
  if (tests.fisher) out.push(`| ${lead === 'fisher' ? '► ' : ''}${md(testName('fisher', record))} | | | ${formatP(tests.fisher.pValue)} |`);
  if (tests.monteCarlo) out.push(`| ${lead === 'monteCarlo' ? '► ' : ''}simulated exact test (${formatCount(tests.monteCarlo.simulations)} tables, seed ${tests.monteCarlo.seed}) | | | ${formatP(tests.monteCarlo.pValue)} ± ${formatP(tests.monteCarlo.standardError)} |`);
  row('trend across ordered levels', tests.linearByLinear);
  out.push('');
  out.push('| measure | value | detail |');
  out.push('|---|--:|---|');
  const vi = m.cramersVInterval;
  for (const [key, , label] of MEASURE_NAMES) {
    const x = m[key] as number | null;
    if (x === null) continue;
    const signed = key === 'yulesQ' || key === 'yulesY';
    const detail = key === 'cramersV' && vi ? `population ${formatMeasure(vi.estimate)}, ${intervalWords(vi.lower, vi.upper, vi.confidence, formatMeasure)}` : key === 'biasCorrectedV' ? (v.strength ?? '') : '';
    out.push(`| ${md(label)} | ${signed ? formatSigned(x) : formatMeasure(x)} | ${md(detail)} |`);
  }
  const corrected = m.zeroCellCorrection ? '; 0.5 added to every cell (a cell is zero)' : '';
  if (m.oddsRatio) out.push(`| odds ratio | ${formatRatio(m.oddsRatio.estimate)} | ${md(intervalWords(m.oddsRatio.lower, m.oddsRatio.upper, m.oddsRatio.confidence) + corrected)} |`);
  if (m.relativeRisk) {
    const rr = m.relativeRisk;
    out.push(`| ratio of shares | ${formatRatio(rr.estimate)} | ${md(`share of "${rr.outcome}" among "${rr.exposed}" ÷ among "${rr.reference}"; ${intervalWords(rr.lower, rr.upper, rr.confidence)}${corrected}`)} |`);
  }
  if (m.designCramersV) out.push(`| design-scaled Cramér's V | ${formatMeasure(m.designCramersV.value)} | ${md(designVWords(m.designCramersV).replace(/^[^:]*: /, ''))} |`);
  out.push(...markdownDesign(record));
  if (record.ordinal) {
    out.push('');
    out.push('| with order (--ordinal) | estimate | se | p-value |');
    out.push('|---|--:|--:|--:|');
    const o = record.ordinal;
    for (const [name, e] of [
      ['gamma', o.gamma],
      ["Kendall's tau-b", o.kendallTauB],
      ["Stuart's tau-c", o.kendallTauC],
      [`Somers' d, ${record.cols.name} predicted`, o.somersDColsGivenRows],
      [`Somers' d, ${record.rows.name} predicted`, o.somersDRowsGivenCols],
    ] as const) {
      out.push(`| ${md(name)} | ${formatSigned(e.estimate)} | ${formatMeasure(e.standardError)} | ${formatP(e.pValue)} |`);
    }
  }
  return out;
}

/** With a survey design: the design, each cell's design effect, the row shares with their intervals. */
function markdownDesign(record: AnalysisRecord): string[] {
  const d = record.design;
  if (!d) return [];
  const out = ['', `The survey design: ${md(designWords(d))}; ${md(designEffectWords(d))}.`];
  if (record.designEffects) {
    const effects = record.designEffects;
    out.push('', 'Design effect of each cell:', '', ...markdownGrid(record, (i, j) => formatRatio(effects[i][j]), false));
  }
  const shares = record.designPercentages;
  if (shares) {
    out.push('', 'Shares of each row, with their intervals:', '');
    out.push(...markdownGrid(record, (i, j) => {
      const x = shares.row[i][j];
      return `${formatPercent(x.estimate)} (${x.lower === null || x.upper === null ? UNDEFINED : `${formatPercent(x.lower)}–${formatPercent(x.upper)}`})${x.method === 'korn-graubard' ? '\\*' : ''}`;
    }, false));
    out.push('', md(`${designIntervalWords(shares.confidence, shares.degreesOfFreedom)}.`));
  }
  return out;
}

export function renderPairMarkdown(report: PairReport): string {
  const out: string[] = [];
  out.push(`### ${md(report.rows.name)} × ${md(report.cols.name)}`);
  out.push('');
  for (const side of [report.rows, report.cols]) if (side.question) out.push(`${md(side.name)}: ${md(side.question)}  `);
  out.push(md(inputLine(report)));
  out.push('');
  out.push(...markdownRecord(report, report.stratified?.by));
  const { stratified, strata } = report;
  if (stratified && strata) {
    out.push('');
    out.push(`#### Within each level of ${md(stratified.by)}`);
    out.push('');
    out.push(`| ${md(stratified.by)} | n | p | test | bias-corrected V | odds ratio |`);
    out.push('|---|--:|--:|---|--:|--:|');
    for (const s of strata) {
      if (s.testable) out.push(`| ${md(s.level)} | ${formatCount(s.n)} | ${formatP(s.verdict.pValue)} | ${md(testName(s.verdict.test, s))} | ${formatMeasure(s.measures.biasCorrectedV)} | ${formatRatio(s.measures.oddsRatio?.estimate)} |`);
      else out.push(`| ${md(s.level)} | ${formatCount(s.n)} | | not testable: ${md(s.reason)} | | |`);
    }
    out.push('');
    if (stratified.cmh) out.push(`- ► Cochran–Mantel–Haenszel (association within the levels): ${formatStatistic(stratified.cmh.statistic)}, df ${stratified.cmh.df}, p ${formatP(stratified.cmh.pValue)}`);
    else out.push('- Cochran–Mantel–Haenszel: not computable for these levels');
    if (stratified.commonOddsRatio) {
      const o = stratified.commonOddsRatio;
      out.push(`- Common odds ratio (Mantel–Haenszel): ${formatRatio(o.estimate)}, ${md(intervalWords(o.lower, o.upper, o.confidence))}`);
    }
    if (stratified.pooledOddsRatio !== null) out.push(`- Odds ratio of the pooled table: ${formatRatio(stratified.pooledOddsRatio)}`);
    if (stratified.breslowDay) out.push(`- Equal odds in every level? Breslow–Day ${formatStatistic(stratified.breslowDay.statistic)}, df ${stratified.breslowDay.df}, p ${formatP(stratified.breslowDay.pValue)}`);
  }
  if (report.warnings.length > 0) {
    out.push('');
    out.push('Check before relying on it:');
    out.push('');
    for (const w of report.warnings) out.push(`- ${md(w.message)}`);
  }
  out.push('');
  out.push(`_${md(CAUTION)}_`);
  return out.join('\n') + '\n';
}
