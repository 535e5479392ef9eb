/**
 * The pair report as text for people: the table in the --cells view, the
 * evidence, the strength, where the association sits, the cautions.
 */
import type { ChalkInstance } from 'chalk';
import type { AnalysisRecord } from '../analysis/analyzeTable.js';
import type { PairReport } from '../analysis/report.js';
import { formatCount, formatExpected, formatMeasure, formatP, formatPercent, formatRatio, formatSigned, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { renderGrid } from './grid.js';
import { displayWidth, glued, padEnd, padStart, wrapText } from './layout.js';
import { CAUTION, comparison, designEffectWords, designIntervalWords, designVWords, designWords, headline, intervalWords, leftOutWords, markLegend, quoteLevel, reasonSentence, statementWords, strengthPhrase, testName, vIntervalWords } from './words.js';

/** What the cells of the table show (--cells). */
export type CellView = 'compact' | 'counts' | 'row' | 'col' | 'total' | 'expected' | 'residuals';
export const CELL_VIEWS: CellView[] = ['compact', 'counts', 'row', 'col', 'total', 'expected', 'residuals'];

export interface TextOptions {
  width: number;
  cells: CellView;
}

export const DEFAULT_TEXT: TextOptions = { width: 80, cells: 'compact' };

/** Marks for an adjusted residual that read without colour, at the record's thresholds. */
export function residualMark(value: number | null, record: Pick<AnalysisRecord, 'findings'>): string {
  const t = record.findings.cellThreshold;
  if (value === null) return '  ';
  if (value > t.adjusted) return '▲▲';
  if (value > t.single) return '▲ ';
  if (value < -t.adjusted) return '▼▼';
  if (value < -t.single) return '▼ ';
  return '· ';
}

/** Colours that colour-blind readers tell apart: blue above, yellow below (with the marks carrying the meaning). */
function paintResidual(paint: ChalkInstance, value: number | null, record: Pick<AnalysisRecord, 'findings'>, text: string): string {
  const t = record.findings.cellThreshold;
  if (value === null) return text;
  if (value > t.adjusted) return paint.bold.blue(text);
  if (value > t.single) return paint.blue(text);
  if (value < -t.adjusted) return paint.bold.yellow(text);
  if (value < -t.single) return paint.yellow(text);
  return paint.dim(text);
}

export function heading(paint: ChalkInstance, title: string, width: number, note = ''): string[] {
  const text = note ? `${title}  ${note}` : title;
  const rule = Math.max(0, width - displayWidth(text) - 1);
  if (displayWidth(text) + 4 > width) return ['', paint.bold(title), ...(note ? wrapText(note, width).map((l) => paint.dim(l)) : [])];
  return ['', paint.bold(title) + (note ? paint.dim('  ' + note) : '') + ' ' + paint.dim('─'.repeat(rule))];
}

/** A label, then text that wraps under itself (a hanging indent), never orphaning a value. */
function labelled(label: string, text: string, width: number, labelWidth = 16, indent = '  '): string[] {
  const head = indent + padEnd(label, labelWidth);
  if (displayWidth(head) + 12 > width) return [indent + label, ...wrapText(text, width, indent + '  ')];
  return wrapText(text, width, head, ' '.repeat(displayWidth(head)));
}

/** What was read and what was left out, with the reason for each row left out. */
export function inputLine(report: PairReport): string {
  const { input } = report;
  const plural = (n: number, word: string) => `${glued(formatCount(n), word)}${n === 1 ? '' : 's'}`;
  const parts = [`${input.file}: ${plural(input.rowsRead, 'row')} read`];
  if (report.weighting === 'weight') {
    parts.push(`${glued(formatCount(report.unweightedN))} in the table, weighted ${glued('n', formatCount(report.n))} (effective sample ${glued(formatCount(Math.round(report.effectiveN * 10) / 10))})`);
  } else if (report.weighting === 'freq') {
    parts.push(`${glued(formatCount(report.unweightedN))} in the table standing for ${glued(formatCount(report.n))} observations`);
  } else parts.push(`${glued(formatCount(report.n))} in the table`);
  if (report.excluded > 0) parts.push(leftOutWords(report.excluded, report.excludedBy));
  if (input.filtered > 0) parts.push(`${glued(formatCount(input.filtered))} filtered out by --where`);
  if (input.badRowsSkipped > 0) parts.push(`${plural(input.badRowsSkipped, 'malformed row')} skipped`);
  if (input.badWeightsSkipped > 0) parts.push(`${plural(input.badWeightsSkipped, 'row')} with an unusable weight skipped`);
  if (input.badDesignSkipped > 0) parts.push(`${plural(input.badDesignSkipped, 'row')} without a usable stratum, cluster, fpc or replicate weight skipped`);
  return parts.join(', ');
}

/** The answer first: the decision, the leading p-value and why, the strength with its interval. */
export function answerLines(record: AnalysisRecord, paint: ChalkInstance, width: number, by?: string): string[] {
  const v = record.verdict;
  const out: string[] = [];
  const mark = v.passes ? '■' : '□';
  const compare = comparison(v.adjustment ? v.decidingPValue : v.pValue, v.alpha, v.passes, v.adjustment !== null);
  out.push(...wrapText(`${mark} ${headline(v, by)}: ${compare}, ${testName(v.test, record)}`, width, '', '  ').map((l) => paint.bold(l)));
  out.push(...labelled('why this test', reasonSentence(record, by), width));
  const strength = strengthPhrase(record);
  out.push(...labelled('strength', strength, width));
  if (record.design) out.push(...labelled('design', `${designEffectWords(record.design)}.`, width));
  else if (record.weighted) out.push(...labelled('weights', `counts are sums of sampling weights; the tests use the effective sample of ${glued(formatCount(Math.round(record.effectiveN * 10) / 10))}, which does not account for clustering or stratification.`, width));
  return out;
}

/**
 * With a survey design: each cell's design effect, the shares of each row
 * with their design-based intervals (which interval, said below), and what
 * the design-scaled V means.
 */
export function designLines(record: AnalysisRecord, paint: ChalkInstance, width: number): string[] {
  const d = record.design;
  if (!d) return [];
  const out = heading(paint, 'The survey design', width);
  out.push(...wrapText(`${designWords(d)}.`, width, '  ', '  '));
  const grid = (cells: string[][]) =>
    renderGrid({ rowTitle: record.rows.name, colTitle: `${record.cols.name} →`, rowLabels: record.rows.levels, colLabels: record.cols.levels, cells, strong: (s) => paint.bold(s), faint: (s) => paint.dim(s) }, width);
  if (record.designEffects) {
    out.push('', paint.dim('  Design effect of each cell (its variance over that of a simple random sample of the same size)'));
    out.push(...grid(record.designEffects.map((row) => row.map((v) => (v === null ? UNDEFINED : formatRatio(v))))));
  }
  const shares = record.designPercentages;
  if (shares) {
    out.push('', paint.dim(`  Shares of each row, with their intervals`));
    out.push(...grid(shares.row.map((row) => row.map((x) => `${formatPercent(x.estimate)} ${x.lower === null || x.upper === null ? UNDEFINED : `${formatPercent(x.lower)}–${formatPercent(x.upper)}`}${x.method === 'korn-graubard' ? '*' : ' '}`))));
    out.push(...wrapText(`${designIntervalWords(shares.confidence, shares.degreesOfFreedom)}. Cell, column and margin shares with standard errors: --format json.`, width, '  ', '  ').map((l) => paint.dim(l)));
  }
  if (record.measures.designCramersV) out.push('', ...wrapText(`${designVWords(record.measures.designCramersV)}.`, width, '  ', '  '));
  return out;
}

const VIEW_TITLES: Record<CellView, string> = {
  compact: 'Counts, each with its share of the row',
  counts: 'Counts',
  row: 'Shares of each row (%)',
  col: 'Shares of each column (%)',
  total: 'Shares of the whole table (%)',
  expected: 'Counts expected if the two were independent',
  residuals: 'Adjusted residuals (departure from independence, in standard errors)',
};

/** One chosen view of the table, with margins: totals and their shares of the whole. */
export function tableView(record: AnalysisRecord, paint: ChalkInstance, options: TextOptions, prefix = ''): string[] {
  const { rows, cols, counts, expected, percentages, rowTotals, colTotals, n } = record;
  const share = (x: number) => (n > 0 ? formatPercent((100 * x) / n) : UNDEFINED);
  let cells: string[][];
  switch (options.cells) {
    case 'compact': {
      const countWidth = Math.max(...counts.flat().map((v) => displayWidth(formatCount(v))));
      cells = counts.map((row, i) => row.map((v, j) => padStart(formatCount(v), countWidth) + ' ' + paint.dim(padStart(formatPercent(percentages.row[i][j], 0), 4))));
      break;
    }
    case 'counts':
      cells = counts.map((row) => row.map((v) => formatCount(v)));
      break;
    case 'row':
      cells = percentages.row.map((row) => row.map((v) => formatPercent(v)));
      break;
    case 'col':
      cells = percentages.col.map((row) => row.map((v) => formatPercent(v)));
      break;
    case 'total':
      cells = percentages.total.map((row) => row.map((v) => formatPercent(v)));
      break;
    case 'expected':
      cells = expected.map((row) => row.map((v) => formatExpected(v)));
      break;
    case 'residuals':
      cells = record.residuals.adjusted.map((row) => row.map((v) => paintResidual(paint, v, record, `${residualMark(v, record)}${v === null ? UNDEFINED : formatSigned(v, 1)}`)));
      break;
  }
  const totalCell = (x: number) => `${formatCount(x)} ${paint.dim(padStart(share(x), 6))}`;
  const marginsShown = options.cells !== 'residuals';
  const lines = [...heading(paint, prefix + VIEW_TITLES[options.cells], options.width, options.cells === 'compact' ? '(--cells for others)' : '')];
  lines.push(
    ...renderGrid(
      {
        rowTitle: rows.name,
        colTitle: `${cols.name} →`,
        rowLabels: rows.levels,
        colLabels: cols.levels,
        cells,
        rowMargin: marginsShown ? { title: 'all', cells: rowTotals.map((t) => totalCell(t)) } : undefined,
        colMargin: marginsShown ? { title: 'all', cells: colTotals.map((t) => totalCell(t)), corner: `${formatCount(n)} ${paint.dim('100%')}` } : undefined,
        strong: (s) => paint.bold(s),
        faint: (s) => paint.dim(s),
      },
      options.width,
    ),
  );
  if (marginsShown) lines.push(...wrapText('"all": totals, with their share of the whole table.', options.width).map((l) => paint.dim(l)));
  return lines;
}

/** Where the association sits: the residual grid with marks, then the record's statements in words. */
function whereLines(record: AnalysisRecord, paint: ChalkInstance, options: TextOptions): string[] {
  const out = heading(paint, 'Where it sits', options.width);
  if (options.cells !== 'residuals') {
    const cells = record.residuals.adjusted.map((row) => row.map((v) => paintResidual(paint, v, record, `${residualMark(v, record)}${v === null ? UNDEFINED : formatSigned(v, 1)}`)));
    out.push(...renderGrid({ rowTitle: record.rows.name, colTitle: `${record.cols.name} →`, rowLabels: record.rows.levels, colLabels: record.cols.levels, cells, strong: (s) => paint.bold(s), faint: (s) => paint.dim(s) }, options.width));
  }
  out.push(...wrapText(`Adjusted residuals: ${markLegend(record)}; above (▲, blue) or below (▼, yellow) independence.`, options.width).map((l) => paint.dim(l)));
  out.push('');
  for (const s of record.findings.statements) {
    const bullet = s.kind === 'cell' || s.kind === 'more-cells' || s.kind === 'mirror-cells';
    out.push(...wrapText(statementWords(record, s), options.width, bullet ? '  – ' : '  ', bullet ? '    ' : '  '));
  }
  return out;
}

/** A row of supporting numbers: label, value, and a detail that wraps under itself. */
function figure(label: string, value: string, detail: string, width: number): string[] {
  const head = '  ' + padEnd(label, 30) + padStart(value, 9);
  if (!detail) return [head];
  if (displayWidth(head) + 14 > width) return [head, ...wrapText(detail, width, '      ')];
  return wrapText(detail, width, head + '   ', ' '.repeat(displayWidth(head) + 3));
}

function testLine(label: string, t: { statistic: number; df: number; pValue: number } | null, width: number, lead: boolean): string[] {
  if (!t) return [];
  return figure((lead ? '► ' : '') + label, formatStatistic(t.statistic), `${glued('df', String(t.df))}, ${glued('p', formatP(t.pValue))}`, width);
}

function detailLines(report: PairReport, paint: ChalkInstance, width: number): string[] {
  const { tests, measures } = report;
  const lead = report.findings.primaryTest.test;
  const out = heading(paint, 'Supporting numbers', width);
  out.push(paint.dim('  The same question, other tests (► the one that leads)'));
  if (tests.designF && tests.designPearson && tests.designLikelihoodRatio) {
    const f = tests.designF;
    out.push(...figure(`${lead === 'designF' ? '► ' : ''}design-based F (2nd order)`, formatStatistic(f.statistic), `${glued('df', formatStatistic(f.numDf), 'and', formatStatistic(f.denDf, 1))}, ${glued('p', formatP(f.pValue))}`, width));
    out.push(...testLine('X² ÷ mean design effect', tests.designPearson, width, false));
    out.push(...testLine('G² ÷ mean design effect', tests.designLikelihoodRatio, width, false));
    out.push(...figure('X² ignoring the design', formatStatistic(tests.designPearson.uncorrected), `as if a simple random sample of ${glued(formatCount(report.design?.n ?? report.unweightedN))}: not a valid test here`, width));
  } else {
    out.push(...testLine("chi-square (Pearson's X²)", tests.pearson, width, lead === 'pearson' && report.verdict.test !== 'cmh'));
    out.push(...testLine('likelihood ratio (G²)', tests.likelihoodRatio, width, false));
  }
  if (tests.yates) out.push(...testLine("chi-square, Yates' correction", tests.yates, width, false));
  if (tests.fisher) out.push(...figure((lead === 'fisher' ? '► ' : '') + testName('fisher', report), '', glued('p', formatP(tests.fisher.pValue)), width));
  if (tests.monteCarlo) {
    const mc = tests.monteCarlo;
    out.push(...figure((lead === 'monteCarlo' ? '► ' : '') + 'simulated exact test', '', `${glued('p', formatP(mc.pValue))} ± ${glued(formatP(mc.standardError))} (${glued(formatCount(mc.simulations), 'tables,')} ${glued('seed', String(mc.seed))})`, width));
  }
  if (tests.linearByLinear) out.push(...testLine('trend across ordered levels', tests.linearByLinear, width, false));

  out.push(paint.dim('  Strength on other scales (0 none, 1 complete)'));
  out.push(...figure("Cramér's V", formatMeasure(measures.cramersV), measures.cramersVInterval ? `population ${glued(formatMeasure(measures.cramersVInterval.estimate))}, ${intervalWords(measures.cramersVInterval.lower, measures.cramersVInterval.upper, measures.cramersVInterval.confidence, formatMeasure)}` : '', width));
  out.push(...figure('phi', formatMeasure(measures.phi), `Tschuprow's ${glued('T', formatMeasure(measures.tschuprowT))}`, width));
  out.push(...figure('contingency coefficient', formatMeasure(measures.contingencyC), `corrected ${glued(formatMeasure(measures.correctedC))}`, width));

  if (measures.oddsRatio || measures.yulesQ !== null) {
    const corrected = measures.zeroCellCorrection ? ' (0.5 added to every cell: a cell is zero)' : '';
    out.push(paint.dim(`  Two by two: direction and size${corrected}`));
    if (measures.oddsRatio) {
      const o = measures.oddsRatio;
      out.push(...figure('odds ratio', formatRatio(o.estimate), intervalWords(o.lower, o.upper, o.confidence), width));
    }
    if (measures.relativeRisk) {
      const rr = measures.relativeRisk;
      out.push(...figure('ratio of shares', formatRatio(rr.estimate), `share of ${quoteLevel(rr.outcome)} among ${quoteLevel(rr.exposed)} ÷ among ${quoteLevel(rr.reference)}; ${intervalWords(rr.lower, rr.upper, rr.confidence)}`, width));
    }
    if (measures.yulesQ !== null) out.push(...figure("Yule's Q", formatSigned(measures.yulesQ), `Yule's ${glued('Y', formatSigned(measures.yulesY))}`, width));
  }

  out.push(paint.dim('  Guessing one from the other (share of errors removed)'));
  const guessLabels = [`${report.cols.name} from ${report.rows.name}`, `${report.rows.name} from ${report.cols.name}`, 'either way'];
  const valuesWidth = 9 + 8 + 11;
  const labelColumn = Math.min(Math.max(30, ...guessLabels.map(displayWidth)) + 1, width - valuesWidth - 2);
  out.push(paint.dim('  ' + padEnd('', labelColumn) + padStart('lambda', 9) + padStart('tau', 8) + padStart("Theil's U", 11)));
  const guess = (label: string, l: number | null, t: number | null, u: number | null) => {
    const values = padStart(formatMeasure(l), 9) + padStart(t === null ? UNDEFINED : formatMeasure(t), 8) + padStart(formatMeasure(u), 11);
    const folded = wrapText(label, labelColumn - 1, '');
    return [...folded.slice(0, -1).map((x) => '  ' + x), '  ' + padEnd(folded[folded.length - 1] ?? '', labelColumn) + values];
  };
  out.push(...guess(`${report.cols.name} from ${report.rows.name}`, measures.lambdaColsGivenRows, measures.gkTauColsGivenRows, measures.uncertaintyColsGivenRows));
  out.push(...guess(`${report.rows.name} from ${report.cols.name}`, measures.lambdaRowsGivenCols, measures.gkTauRowsGivenCols, measures.uncertaintyRowsGivenCols));
  out.push(...guess('either way', measures.lambdaSymmetric, null, measures.uncertaintySymmetric));

  if (report.ordinal) {
    const o = report.ordinal;
    out.push(paint.dim('  With order (--ordinal: levels read in the order shown)'));
    const ord = (label: string, e: typeof o.gamma) => figure(label, formatSigned(e.estimate), `${glued('se', formatMeasure(e.standardError))}, ${glued('p', formatP(e.pValue))}`, width);
    out.push(...ord('gamma', o.gamma));
    out.push(...ord("Kendall's tau-b", o.kendallTauB));
    out.push(...ord("Stuart's tau-c", o.kendallTauC));
    const somers = (name: string, e: typeof o.gamma) => figure("Somers' d", formatSigned(e.estimate), `${name} predicted; ${glued('se', formatMeasure(e.standardError))}, ${glued('p', formatP(e.pValue))}`, width);
    out.push(...somers(report.cols.name, o.somersDColsGivenRows));
    out.push(...somers(report.rows.name, o.somersDRowsGivenCols));
    out.push(...wrapText('The standard errors come from the observed table; each p-value from the standard error under independence.', width, '  ').map((l) => paint.dim(l)));
  }
  return out;
}

/** --by: each level held fixed on its own, then the tests that pool them. */
export function heldFixedLines(report: PairReport, paint: ChalkInstance, width: number): string[] {
  const { stratified, strata } = report;
  if (!stratified || !strata) return [];
  const out = heading(paint, `Within each level of ${stratified.by}`, width);
  const twoByTwo = report.rows.levels.length === 2 && report.cols.levels.length === 2;
  const cells = strata.map((s) =>
    s.testable
      ? [formatCount(s.n), formatP(s.verdict.pValue), formatMeasure(s.measures.biasCorrectedV), ...(twoByTwo ? [formatRatio(s.measures.oddsRatio?.estimate)] : [])]
      : [formatCount(s.n), 'not testable', '', ...(twoByTwo ? [''] : [])],
  );
  out.push(
    ...renderGrid(
      {
        rowTitle: stratified.by,
        colTitle: '',
        rowLabels: strata.map((s) => s.level),
        colLabels: ['n', 'p', 'bias-corrected V', ...(twoByTwo ? ['odds ratio'] : [])],
        cells,
        strong: (s) => paint.bold(s),
        faint: (s) => paint.dim(s),
      },
      width,
    ),
  );
  for (const s of strata) if (!s.testable) out.push(...wrapText(`${s.level}: ${s.reason}`, width, '  ').map((l) => paint.dim(l)));
  out.push('');
  if (stratified.cmh) {
    const c = stratified.cmh;
    out.push(...figure(`${report.verdict.test === 'cmh' ? '► ' : ''}Cochran–Mantel–Haenszel`, formatStatistic(c.statistic), `${glued('df', String(c.df))}, ${glued('p', formatP(c.pValue))}: association within the levels`, width));
  } else out.push(paint.dim('  Cochran–Mantel–Haenszel: not computable for these levels'));
  if (stratified.commonOddsRatio) {
    const o = stratified.commonOddsRatio;
    out.push(...figure('common odds ratio', formatRatio(o.estimate), `${intervalWords(o.lower, o.upper, o.confidence)} (Mantel–Haenszel)`, width));
  }
  if (stratified.pooledOddsRatio !== null) out.push(...figure('odds ratio, pooled table', formatRatio(stratified.pooledOddsRatio), 'ignoring the levels', width));
  if (stratified.breslowDay) {
    const b = stratified.breslowDay;
    out.push(...figure('equal odds in every level?', formatStatistic(b.statistic), `Breslow–Day ${glued('df', String(b.df))}, ${glued('p', formatP(b.pValue))}`, width));
  }
  return out;
}

/** The warnings of a record under their heading, one "!" line each (pair, scan). */
export function checkLines(warnings: readonly { message: string }[], paint: ChalkInstance, width: number): string[] {
  if (warnings.length === 0) return [];
  const out = heading(paint, 'Check before relying on it', width);
  for (const w of warnings) out.push(...wrapText(`! ${w.message}`, width, '  ', '    ').map((l) => paint.yellow(l)));
  return out;
}

export function cautionLines(paint: ChalkInstance, width: number): string[] {
  return ['', ...wrapText(CAUTION, width).map((l) => paint.dim(l))];
}

export function renderPairText(report: PairReport, paint: ChalkInstance, options: TextOptions = DEFAULT_TEXT): string {
  const width = options.width;
  const out: string[] = [];
  out.push(...wrapText(`${report.rows.name} × ${report.cols.name}`, width).map((l) => paint.bold(l)));
  for (const side of [report.rows, report.cols]) if (side.question) out.push(...wrapText(`${side.name}: ${side.question}`, width));
  out.push(...wrapText(inputLine(report), width).map((l) => paint.dim(l)));
  out.push('');
  out.push(...answerLines(report, paint, width, report.stratified?.by));
  out.push(...tableView(report, paint, options));
  out.push(...whereLines(report, paint, options));
  out.push(...designLines(report, paint, width));
  out.push(...heldFixedLines(report, paint, width));
  out.push(...detailLines(report, paint, width));
  out.push(...checkLines(report.warnings, paint, width));
  out.push(...cautionLines(paint, width));
  return out.join('\n') + '\n';
}

