import type { ChalkInstance } from 'chalk';
import type { AnalysisRecord, NotableCell } from '../analysis/analyzeTable.js';
import type { PairReport } from '../analysis/report.js';
import { clip, formatCount, formatMeasure, formatP, formatSigned, formatStatistic, padLeft, padRight, quoteLevel } from './format.js';

const LABEL_WIDTH = 16;

export const CAUTION =
  'Association is not causation. Large samples make trivial effects significant, and many tests ' +
  'inflate false findings; weights change what a p-value means. Review the data yourself, and seek ' +
  'qualified statistical review before decisions that affect people (health, hiring, lending).';

export function wrap(text: string, width: number, indent = ''): string[] {
  const words = text.split(/\s+/).filter((w) => w !== '');
  const lines: string[] = [];
  let line = indent;
  for (const word of words) {
    if (line.trim() !== '' && (line + ' ' + word).length > width) {
      lines.push(line);
      line = indent + word;
    } else line = line.trim() === '' ? indent + word : line + ' ' + word;
  }
  if (line.trim() !== '') lines.push(line);
  return lines;
}

/** Column width for a grid: wide enough for the numbers, labels clipped so the grid fits the page. */
function gridWidth(labels: readonly string[], numbers: readonly string[], fixed: number, columns: number, page: number): number {
  const numberWidth = Math.max(...numbers.map((s) => s.length)) + 2;
  const labelWidth = Math.max(...labels.map((l) => l.length)) + 1;
  const fitting = Math.floor((page - fixed) / columns);
  return Math.max(numberWidth, Math.min(labelWidth, 12, fitting));
}

/** The count grid: per row level, the count, the expected count and the row share. */
function countGrid(record: AnalysisRecord, paint: ChalkInstance, page: number): string[] {
  const { rows, cols, counts, expected, percentages, rowTotals, colTotals } = record;
  const stub = LABEL_WIDTH + 9;
  const width = gridWidth(cols.levels, [formatCount(record.n), ...expected.flat().map((v) => v.toFixed(1))], stub + 2, cols.levels.length + 1, page);
  const lines = [
    paint.dim(padRight('', stub) + clip(`${cols.name} →`, width * cols.levels.length)),
    paint.bold(padRight(clip(`${rows.name} ↓`, LABEL_WIDTH - 1), stub) + cols.levels.map((l) => padLeft(clip(l, width - 1), width)).join('') + ' │' + padLeft('all', width)),
  ];
  rows.levels.forEach((level, i) => {
    const label = padRight(clip(level, LABEL_WIDTH - 1), LABEL_WIDTH);
    lines.push(label + padRight('count', 9) + counts[i].map((v) => padLeft(formatCount(v), width)).join('') + paint.dim(' │') + padLeft(formatCount(rowTotals[i]), width));
    lines.push(paint.dim(padRight('', LABEL_WIDTH) + padRight('expected', 9) + expected[i].map((v) => padLeft(v.toFixed(1), width)).join('') + ' │'));
    lines.push(paint.dim(padRight('', LABEL_WIDTH) + padRight('row %', 9) + percentages.row[i].map((v) => padLeft(v.toFixed(1), width)).join('') + ' │' + padLeft('100.0', width)));
  });
  const n = record.n;
  lines.push(paint.dim('─'.repeat(stub + width * cols.levels.length) + '─┼' + '─'.repeat(width - 1)));
  lines.push(padRight('all', LABEL_WIDTH) + padRight('count', 9) + colTotals.map((v) => padLeft(formatCount(v), width)).join('') + paint.dim(' │') + padLeft(formatCount(n), width));
  lines.push(paint.dim(padRight('', LABEL_WIDTH) + padRight('col %', 9) + colTotals.map((v) => padLeft((n > 0 ? (100 * v) / n : 0).toFixed(1), width)).join('') + ' │'));
  return lines;
}

/** Marks for an adjusted residual that read without colour: ▲/▼ beyond ±2, doubled beyond ±3. */
export function residualMark(value: number | null): string {
  if (value === null) return '  ';
  if (value > 3) return '▲▲';
  if (value > 2) return '▲ ';
  if (value < -3) return '▼▼';
  if (value < -2) return '▼ ';
  return '· ';
}

function residualGrid(record: AnalysisRecord, paint: ChalkInstance, page: number): string[] {
  const { rows, cols } = record;
  const width = gridWidth(cols.levels, ['▲▲+10.0'], LABEL_WIDTH, cols.levels.length, page);
  const lines = [paint.bold(padRight('', LABEL_WIDTH) + cols.levels.map((l) => padLeft(clip(l, width - 1), width)).join(''))];
  rows.levels.forEach((level, i) => {
    const cells = record.residuals.adjusted[i].map((value) => {
      const text = padLeft(`${residualMark(value)}${formatSigned(value)}`, width);
      if (value === null) return text;
      if (value > 3) return paint.bold.green(text);
      if (value > 2) return paint.green(text);
      if (value < -3) return paint.bold.red(text);
      if (value < -2) return paint.red(text);
      return paint.dim(text);
    });
    lines.push(padRight(clip(level, LABEL_WIDTH - 1), LABEL_WIDTH) + cells.join(''));
  });
  return lines;
}

export function cellSentence(record: Pick<AnalysisRecord, 'rows' | 'cols'>, cell: NotableCell): string {
  const strength = cell.level === 3 ? 'clearly ' : '';
  return `${record.rows.name} ${quoteLevel(cell.row)} goes with ${record.cols.name} ${quoteLevel(cell.col)} ${strength}${cell.direction === 'more' ? 'more' : 'less'} often than independence predicts (adjusted residual ${formatSigned(cell.adjustedResidual)})`;
}

export function summarySentence(record: AnalysisRecord): string {
  const { findings, measures, rows, cols } = record;
  const p = findings.primaryTest.pValue;
  const evidence = p < 0.001 ? 'strong evidence' : p < 0.01 ? 'clear evidence' : p < 0.05 ? 'some evidence' : 'no convincing evidence';
  const parts = [`There is ${evidence} of an association between ${rows.name} and ${cols.name} (p ${formatP(p)})`];
  if (findings.strength !== null) parts[0] += `; its strength is ${findings.strength} (bias-corrected V ${formatMeasure(measures.biasCorrectedV)})`;
  parts[0] += '.';
  // Which diagonal dominates: said plainly for an association the data show,
  // with a caveat for one they do not, and not at all for a negligible one.
  if ((findings.diagonal === 'main' || findings.diagonal === 'off') && Math.abs(measures.yulesQ ?? 0) >= 0.1) {
    const [r1, r2] = rows.levels;
    const [c1, c2] = cols.levels;
    const pairs = findings.diagonal === 'main' ? [`${quoteLevel(r1)} with ${quoteLevel(c1)}`, `${quoteLevel(r2)} with ${quoteLevel(c2)}`] : [`${quoteLevel(r1)} with ${quoteLevel(c2)}`, `${quoteLevel(r2)} with ${quoteLevel(c1)}`];
    const which = findings.diagonal === 'main' ? 'main' : 'off';
    if (p < 0.05) {
      parts.push(`The ${which} diagonal dominates: ${pairs[0]} and ${pairs[1]} occur together more than independence predicts (Yule's Q ${formatSigned(measures.yulesQ, 3)}).`);
    } else {
      parts.push(`In this sample the ${which} diagonal holds more than its share (${pairs[0]}, ${pairs[1]}; Yule's Q ${formatSigned(measures.yulesQ, 3)}), but the data do not show that this is more than chance.`);
    }
  }
  return parts.join(' ');
}

const PAGE = 80;

/** A label, a value and a detail; a detail too long for the page goes on to lines of its own. */
function row(label: string, value: string, detail = ''): string {
  const head = '  ' + padRight(label, 26) + padLeft(value, 10);
  if (!detail) return head;
  if (head.length + 3 + detail.length <= PAGE) return head + '   ' + detail;
  return [head, ...wrap(detail, PAGE, ' '.repeat(head.length + 3))].join('\n');
}

/** What was read and what was left out, with the reason for each row left out. */
export function inputLine(report: PairReport): string {
  const { input } = report;
  const plural = (n: number, word: string) => `${formatCount(n)} ${word}${n === 1 ? '' : 's'}`;
  const parts = [`${input.file}: ${plural(input.rowsRead, 'row')} read`];
  if (report.weighting === 'weight') {
    parts.push(`${formatCount(report.unweightedN)} in the table, weighted n ${formatCount(report.n)} (effective sample ${formatCount(Math.round(report.effectiveN * 10) / 10)})`);
  } else if (report.weighting === 'freq') {
    parts.push(`${formatCount(report.unweightedN)} in the table standing for ${formatCount(report.n)} observations`);
  } else parts.push(`${formatCount(report.n)} in the table`);
  if (report.excluded > 0) parts.push(`${formatCount(report.excluded)} left out for a missing value`);
  if (input.filtered > 0) parts.push(`${formatCount(input.filtered)} filtered out by --where`);
  if (input.badRowsSkipped > 0) parts.push(`${plural(input.badRowsSkipped, 'malformed row')} skipped`);
  if (input.badWeightsSkipped > 0) parts.push(`${plural(input.badWeightsSkipped, 'row')} with an unusable weight skipped`);
  return parts.join(', ');
}

function layerLines(report: PairReport, paint: ChalkInstance, width: number): string[] {
  const out: string[] = [];
  const { stratified, strata } = report;
  if (!stratified || !strata) return out;
  const twoByTwo = stratified.commonOddsRatio !== null || (report.rows.levels.length === 2 && report.cols.levels.length === 2);
  out.push(paint.bold(padRight(clip(stratified.by, LABEL_WIDTH - 1), LABEL_WIDTH) + padLeft('n', 9) + padLeft('chi-square', 12) + padLeft('p', 10) + padLeft('bias-corr. V', 14) + (twoByTwo ? padLeft('odds ratio', 12) : '')));
  for (const s of strata) {
    if (!s.testable) {
      out.push(padRight(clip(s.level, LABEL_WIDTH - 1), LABEL_WIDTH) + padLeft(formatCount(s.n), 9) + paint.dim(`   not testable: ${s.reason}`));
      continue;
    }
    out.push(
      padRight(clip(s.level, LABEL_WIDTH - 1), LABEL_WIDTH) +
        padLeft(formatCount(s.n), 9) +
        padLeft(formatStatistic(s.tests.pearson.statistic), 12) +
        padLeft(formatP(s.findings.primaryTest.pValue), 10) +
        padLeft(formatMeasure(s.measures.biasCorrectedV), 14) +
        (twoByTwo ? padLeft(formatStatistic(s.measures.oddsRatio?.estimate, 3), 12) : ''),
    );
  }
  if (stratified.cmh) {
    out.push(row(`layered test (CMH)`, formatStatistic(stratified.cmh.statistic), `df ${stratified.cmh.df}   p ${formatP(stratified.cmh.pValue)}`));
  } else out.push(paint.dim('  layered test (CMH): not computable for these layers'));
  if (stratified.commonOddsRatio) {
    const o = stratified.commonOddsRatio;
    out.push(row('common odds ratio', formatStatistic(o.estimate, 3), `${Math.round(o.confidence * 100)}% interval ${formatStatistic(o.lower, 3)} to ${formatStatistic(o.upper, 3)}`));
  }
  if (stratified.pooledOddsRatio !== null) out.push(row('pooled-table odds ratio', formatStatistic(stratified.pooledOddsRatio, 3)));
  if (stratified.breslowDay) {
    out.push(row('same odds in every layer?', formatStatistic(stratified.breslowDay.statistic), `Breslow–Day df ${stratified.breslowDay.df}   p ${formatP(stratified.breslowDay.pValue)}`));
  }
  out.push(...wrap(`The layered test asks whether ${report.rows.name} and ${report.cols.name} are related once ${stratified.by} is held fixed.`, width, '  ').map((l) => paint.dim(l)));
  return out;
}

export function renderPairText(report: PairReport, paint: ChalkInstance, width = 80): string {
  const out: string[] = [];
  const { tests, measures, findings } = report;
  const heading = (title: string, note = '') => {
    out.push('');
    out.push(paint.bold.underline(title) + (note ? paint.dim('  ' + note) : ''));
  };
  out.push(paint.bold(`${report.rows.name} × ${report.cols.name}`));
  out.push(...wrap(inputLine(report), width).map((l) => paint.dim(l)));
  out.push('');
  out.push(...countGrid(report, paint, width));

  heading('Evidence', 'is there an association?');
  out.push(row('Pearson chi-square', formatStatistic(tests.pearson.statistic), `df ${tests.pearson.df}   p ${formatP(tests.pearson.pValue)}`));
  out.push(row('likelihood ratio G²', formatStatistic(tests.likelihoodRatio.statistic), `df ${tests.likelihoodRatio.df}   p ${formatP(tests.likelihoodRatio.pValue)}`));
  if (tests.yates) out.push(row('continuity-corrected', formatStatistic(tests.yates.statistic), `df 1   p ${formatP(tests.yates.pValue)}`));
  if (tests.fisher) out.push(row(report.counts.length === 2 && report.counts[0].length === 2 ? 'Fisher exact' : 'exact (Fisher–Freeman–Halton)', '', `p ${formatP(tests.fisher.pValue)}`));
  if (tests.monteCarlo) {
    out.push(row('simulated exact', '', `p ${formatP(tests.monteCarlo.pValue)} ± ${formatP(tests.monteCarlo.standardError)} (${formatCount(tests.monteCarlo.simulations)} tables, seed ${tests.monteCarlo.seed})`));
  }
  if (tests.linearByLinear) out.push(row('linear-by-linear M²', formatStatistic(tests.linearByLinear.statistic), `df 1   p ${formatP(tests.linearByLinear.pValue)}`));
  const leadName = { pearson: 'Pearson chi-square', fisher: 'the exact test', monteCarlo: 'the simulated exact test' }[findings.primaryTest.test];
  out.push(...wrap(`Leading p-value: ${leadName}, because ${findings.primaryTest.reason}.`, width, '  ').map((l) => paint.dim(l)));

  heading('Strength', 'how strong is it?');
  const vi = measures.cramersVInterval;
  out.push(row('bias-corrected V', formatMeasure(measures.biasCorrectedV), findings.strength ?? ''));
  out.push(row("Cramér's V", formatMeasure(measures.cramersV), vi ? `${Math.round(vi.confidence * 100)}% interval ${formatMeasure(vi.lower)} to ${formatMeasure(vi.upper)}` : ''));
  out.push(row('phi', formatMeasure(measures.phi)));
  out.push(row('contingency C', formatMeasure(measures.contingencyC), `corrected ${formatMeasure(measures.correctedC)}`));
  out.push(row("Tschuprow's T", formatMeasure(measures.tschuprowT)));
  if (measures.yulesQ !== null) out.push(row("Yule's Q", formatSigned(measures.yulesQ, 3), `Yule's Y ${formatSigned(measures.yulesY, 3)}`));
  if (measures.oddsRatio) {
    const o = measures.oddsRatio;
    out.push(row('odds ratio', formatStatistic(o.estimate, 3), `${Math.round(o.confidence * 100)}% interval ${formatStatistic(o.lower, 3)} to ${formatStatistic(o.upper, 3)}${o.haldaneCorrection ? ' (0.5 added to cells)' : ''}`));
  }
  if (measures.relativeRisk) {
    const rr = measures.relativeRisk;
    out.push(row(`risk ratio of ${clip(rr.outcome, 12)}`, formatStatistic(rr.estimate, 3), `${Math.round(rr.confidence * 100)}% interval ${formatStatistic(rr.lower, 3)} to ${formatStatistic(rr.upper, 3)} ("${clip(rr.exposed, 12)}" over "${clip(rr.reference, 12)}")`));
  }
  const predicting = (target: string, from: string, lambda: number | null, tau: number | null, u: number | null) =>
    wrap(`predicting ${target} from ${from}: lambda ${formatMeasure(lambda)}, tau ${formatMeasure(tau)}, uncertainty ${formatMeasure(u)}`, width, '  ').map((l, k) => paint.dim(k === 0 ? l : '  ' + l));
  out.push(...predicting(report.cols.name, report.rows.name, measures.lambdaColsGivenRows, measures.gkTauColsGivenRows, measures.uncertaintyColsGivenRows));
  out.push(...predicting(report.rows.name, report.cols.name, measures.lambdaRowsGivenCols, measures.gkTauRowsGivenCols, measures.uncertaintyRowsGivenCols));

  if (report.ordinal) {
    heading('Order', 'both variables declared ordered (--ordinal), in the level order shown');
    const o = report.ordinal;
    const ordinalRow = (label: string, e: typeof o.gamma) =>
      row(label, formatSigned(e.estimate, 3), `se ${formatMeasure(e.standardError)}   p ${formatP(e.pValue)}`);
    out.push(ordinalRow('gamma', o.gamma));
    out.push(ordinalRow("Kendall's tau-b", o.kendallTauB));
    out.push(ordinalRow("Stuart's tau-c", o.kendallTauC));
    out.push(ordinalRow(`Somers' d (${clip(report.cols.name, 13)})`, o.somersDColsGivenRows));
    out.push(ordinalRow(`Somers' d (${clip(report.rows.name, 13)})`, o.somersDRowsGivenCols));
    out.push(...wrap("Somers' d (name) treats that variable as the one predicted. Ordinal measures only make sense when the categories have a real order.", width, '  ').map((l) => paint.dim(l)));
  }

  if (report.stratified) {
    heading('Layers', `${report.stratified.by} held fixed`);
    out.push(...layerLines(report, paint, width));
  }

  heading('Where', 'adjusted residuals: ▲ above, ▼ below independence past ±2, ▲▲ ▼▼ past ±3');
  out.push(...residualGrid(report, paint, width));

  heading('In words');
  out.push(...wrap(summarySentence(report), width, '  '));
  for (const cell of findings.notableCells.slice(0, 6)) out.push(...wrap('- ' + cellSentence(report, cell) + '.', width, '  ').map((l, k) => (k === 0 ? l : '  ' + l)));
  if (findings.notableCells.length > 6) out.push(`  - and ${findings.notableCells.length - 6} more cells beyond ±2 (see --format json).`);

  if (report.warnings.length > 0) {
    heading('Checks');
    for (const w of report.warnings) out.push(...wrap(`! ${w.message}`, width, '  ').map((l) => paint.yellow(l)));
  }
  out.push('');
  out.push(...wrap(CAUTION, width).map((l) => paint.dim(l)));
  return out.join('\n') + '\n';
}
