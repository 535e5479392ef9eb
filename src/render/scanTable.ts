import type { ChalkInstance } from 'chalk';
import type { ScanPair, ScanReport } from '../analysis/scan.js';
import { clip, formatCount, formatMeasure, formatP, padLeft, padRight } from './format.js';
import { CAUTION, wrap } from './pairText.js';

/** Short flags for a pair, the same words in every format. */
export function pairFlags(pair: ScanPair): string[] {
  const flags: string[] = [];
  if (!pair.expectedCountRule.passes) flags.push('sparse');
  if (pair.findings.primaryTest.test !== 'pearson') flags.push('exact-p');
  if (pair.warnings.some((w) => w.code === 'large-sample')) flags.push('large-n');
  if (pair.warnings.some((w) => w.code === 'reversal')) flags.push('reversal');
  else if (pair.warnings.some((w) => w.code === 'layer-explains' || w.code === 'layer-reveals')) flags.push('layer');
  return flags;
}

const BLOCKS = ['', '▏', '▎', '▍', '▌', '▋', '▊', '▉'];

/** A bar of `width` cells for a value in [0, 1], in eighths of a cell. */
export function strengthBar(value: number | null, width = 10): string {
  if (value === null) return ' '.repeat(width);
  const eighths = Math.round(Math.max(0, Math.min(1, value)) * width * 8);
  const full = Math.floor(eighths / 8);
  const bar = '█'.repeat(full) + BLOCKS[eighths % 8];
  return padRight(bar, width);
}

const ADJUSTMENT_NAMES = { bh: 'Benjamini–Hochberg', holm: 'Holm', bonferroni: 'Bonferroni', none: 'no' } as const;

export function renderScanText(report: ScanReport, paint: ChalkInstance, width = 80): string {
  const out: string[] = [];
  out.push(...wrap(`Pairs of ${report.input.file}, strongest first`, width).map((l) => paint.bold(l)));
  out.push(
    ...wrap(
      `${formatCount(report.n)} rows, ${report.columnsScored.length} columns scored, ${report.pairsTested} pairs tested; ` +
        `${ADJUSTMENT_NAMES[report.adjustment]} adjustment, α ${report.alpha}: ${report.pairsPassing} pass`,
      width,
    ).map((l) => paint.dim(l)),
  );
  out.push('');
  const flagWidth = Math.max(5, ...report.pairs.map((p) => pairFlags(p).join(' ').length));
  const pairWidth = Math.max(20, Math.min(40, width - 35 - flagWidth));
  out.push(paint.bold(padLeft('#', 4) + '  ' + padRight('pair', pairWidth) + padRight('bias-corr. V', 18) + padLeft('adj. p', 9) + '  flags'));
  for (const pair of report.pairs) {
    const name = clip(`${pair.rows.name} × ${pair.cols.name}`, pairWidth - 1);
    const v = pair.measures.biasCorrectedV;
    const line =
      padLeft(String(pair.rank), 4) +
      '  ' +
      padRight(name, pairWidth) +
      strengthBar(v) +
      padLeft(formatMeasure(v), 7) +
      ' ' +
      padLeft(formatP(pair.pAdjusted), 9) +
      '  ' +
      pairFlags(pair).join(' ');
    out.push(pair.passes ? line : paint.dim(line));
  }
  if (report.pairs.length < report.pairsTested) out.push(paint.dim(`  … ${report.pairsTested - report.pairs.length} more pairs not shown (--top)`));
  out.push('');
  const legend =
    'Dimmed pairs do not pass after adjustment. Flags: sparse = fails the expected-count rule (its exact p-value is in ' +
    "--format json and in 'tabsight pair'); exact-p = the leading p-value is exact or simulated; large-n = significant but negligible in strength" +
    (report.by ? `; reversal = holding ${report.by} fixed reverses the association; layer = holding ${report.by} fixed changes whether it is significant.` : '.');
  out.push(...wrap(legend, width).map((l) => paint.dim(l)));
  if (report.skipped.length > 0) {
    out.push('');
    out.push(paint.bold('Columns left out'));
    for (const s of report.skipped) out.push(...wrap(`${s.column}: ${s.reason}`, width, '  '));
  }
  if (report.untestable.length > 0) {
    out.push('');
    out.push(paint.bold('Pairs that could not be tested'));
    for (const u of report.untestable) out.push(...wrap(`${u.rows} × ${u.cols}: ${u.reason}`, width, '  '));
  }
  out.push('');
  out.push(...wrap(CAUTION, width).map((l) => paint.dim(l)));
  return out.join('\n') + '\n';
}

/** Stable column names of the CSV/TSV scan output, one row per pair. */
export const SCAN_COLUMNS = [
  'rank',
  'rows',
  'cols',
  'row_levels',
  'col_levels',
  'n',
  'excluded',
  'chi_square',
  'df',
  'p_value',
  'p_adjusted',
  'passes',
  'g_squared',
  'g_p_value',
  'exact_p_value',
  'leading_p_value',
  'leading_test',
  'bias_corrected_v',
  'cramers_v',
  'tschuprow_t',
  'contingency_c',
  'corrected_c',
  'phi',
  'yules_q',
  'expected_rule_passes',
  'cells_below_5',
  'min_expected',
  'flags',
  'weighting',
  'effective_n',
  'layered_chi_square',
  'layered_df',
  'layered_p_value',
] as const;

function scanRow(pair: ScanPair): (string | number | boolean | null)[] {
  const m = pair.measures;
  return [
    pair.rank,
    pair.rows.name,
    pair.cols.name,
    pair.rows.levels.length,
    pair.cols.levels.length,
    pair.n,
    pair.excluded,
    pair.tests.pearson.statistic,
    pair.tests.pearson.df,
    pair.tests.pearson.pValue,
    pair.pAdjusted,
    pair.passes,
    pair.tests.likelihoodRatio.statistic,
    pair.tests.likelihoodRatio.pValue,
    pair.tests.fisher?.pValue ?? pair.tests.monteCarlo?.pValue ?? null,
    pair.findings.primaryTest.pValue,
    pair.findings.primaryTest.test,
    m.biasCorrectedV,
    m.cramersV,
    m.tschuprowT,
    m.contingencyC,
    m.correctedC,
    m.phi,
    m.yulesQ,
    pair.expectedCountRule.passes,
    pair.expectedCountRule.cellsBelowFive,
    pair.expectedCountRule.smallestExpected,
    pairFlags(pair).join(' '),
    pair.weighting,
    pair.effectiveN,
    pair.stratified?.cmh?.statistic ?? null,
    pair.stratified?.cmh?.df ?? null,
    pair.stratified?.cmh?.pValue ?? null,
  ];
}

/** Full-precision number text: shortest round-trip form, empty for null. */
export function exactNumber(x: string | number | boolean | null): string {
  if (x === null) return '';
  if (typeof x === 'number') return Number.isFinite(x) ? String(x) : '';
  return String(x);
}

export function delimitedField(value: string, delimiter: string): string {
  return value.includes(delimiter) || value.includes('"') || value.includes('\n') || value.includes('\r') ? `"${value.replace(/"/g, '""')}"` : value;
}

export function renderScanDelimited(report: ScanReport, delimiter: ',' | '\t'): string {
  const lines = [SCAN_COLUMNS.join(delimiter)];
  for (const pair of report.pairs) lines.push(scanRow(pair).map((v) => delimitedField(exactNumber(v), delimiter)).join(delimiter));
  return lines.join('\n') + '\n';
}

function markdownCell(s: string): string {
  return s.replace(/\|/g, '\\|').replace(/\n/g, ' ');
}

export function renderScanMarkdown(report: ScanReport): string {
  const out: string[] = [];
  out.push(`**Pairs of ${markdownCell(report.input.file)}**, strongest first: ${formatCount(report.n)} rows, ${report.pairsTested} pairs tested, ` +
    `${ADJUSTMENT_NAMES[report.adjustment]} adjustment at α ${report.alpha}, ${report.pairsPassing} pass.`);
  out.push('');
  out.push('| # | rows | cols | bias-corrected V | Cramér\'s V | chi-square (df) | adjusted p | passes | flags |');
  out.push('|--:|---|---|--:|--:|--:|--:|:-:|---|');
  for (const p of report.pairs) {
    out.push(
      `| ${p.rank} | ${markdownCell(p.rows.name)} | ${markdownCell(p.cols.name)} | ${formatMeasure(p.measures.biasCorrectedV)} | ${formatMeasure(p.measures.cramersV)} | ` +
        `${p.tests.pearson.statistic.toFixed(2)} (${p.tests.pearson.df}) | ${formatP(p.pAdjusted)} | ${p.passes ? 'yes' : 'no'} | ${pairFlags(p).join(', ')} |`,
    );
  }
  if (report.skipped.length > 0) {
    out.push('');
    out.push('Columns left out: ' + report.skipped.map((s) => `${markdownCell(s.column)} (${markdownCell(s.reason)})`).join('; ') + '.');
  }
  out.push('');
  out.push(`_${CAUTION}_`);
  return out.join('\n') + '\n';
}
