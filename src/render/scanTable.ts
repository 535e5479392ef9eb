/**
 * The scan report as text (ranked pairs with strength bars), CSV/TSV and
 * Markdown.
 */
import type { ChalkInstance } from 'chalk';
import type { ScanPair, ScanReport } from '../analysis/scan.js';
import { formatCount, formatMeasure, formatP } from '../readableNumbers.js';
import { displayWidth, foldLabel, glued, padEnd, padStart, wrapText } from './layout.js';
import { cautionLines, checkLines, heading } from './pairText.js';
import { ADJUSTMENT_NAMES, alphaPhrase, CAUTION, designWords, excludedByWords, testName } from './words.js';
import type { DesignSummary } from '../analysis/design.js';
import { md } from './pairDelimited.js';

/** Short flags for a pair, the same words in every format. */
export function pairFlags(pair: ScanPair): string[] {
  const flags: string[] = [];
  if (!pair.expectedCountRule.passes) flags.push('sparse');
  if (pair.findings.primaryTest.test === 'fisher') flags.push('exact-p');
  if (pair.findings.primaryTest.test === 'monteCarlo') flags.push('simulated-p');
  if (pair.weighting === 'weight' && pair.design === null) flags.push('weights-only');
  if (pair.warnings.some((w) => w.code === 'large-sample')) flags.push('large-n');
  if (pair.warnings.some((w) => w.code === 'reversal')) flags.push('reversal');
  else if (pair.warnings.some((w) => w.code === 'layer-explains' || w.code === 'layer-reveals')) flags.push('by-changes');
  return flags;
}

const BLOCKS = ['', '▏', '▎', '▍', '▌', '▋', '▊', '▉'];

/** A bar of `width` cells for a value in [0, 1], in eighths of a cell. */
export function strengthBar(value: number | null, width = 10): string {
  if (value === null) return ' '.repeat(width);
  const eighths = Math.round(Math.max(0, Math.min(1, value)) * width * 8);
  const full = Math.floor(eighths / 8);
  const bar = '█'.repeat(full) + BLOCKS[eighths % 8];
  return padEnd(bar, width);
}

/** The scan's setting in words: rows, pairs, the adjustment and how many pass in all. */
export function scanSummary(report: ScanReport): string {
  const weighting = report.design
    ? `; every pair's leading test is the design-based F test (Rao–Scott) for the survey design: ${designWords(report.design as DesignSummary)}`
    : report.weighting === 'weight'
      ? "; rows carry sampling weights, so the tests use Kish's effective sample sizes, which do not account for clustering or stratification"
      : report.weighting === 'freq'
        ? '; rows carry frequency weights'
        : '';
  const layer = report.by ? `; each pair judged within levels of ${report.by} (Cochran–Mantel–Haenszel)` : '';
  return (
    `${glued(formatCount(report.n), 'rows')}, ${glued(String(report.columnsScored.length), 'columns')} scored, ${glued(String(report.pairsTested), 'pairs')} tested${weighting}${layer}. ` +
    `Each pair's leading p-value is adjusted by ${ADJUSTMENT_NAMES[report.adjustment]} and judged at ${alphaPhrase(report.alpha)}: ` +
    `${glued(String(report.pairsPassing), 'of', String(report.pairsTested))} pass${report.pairs.length < report.pairsTested ? ` (the ${report.pairs.length} strongest are shown)` : ''}.`
  );
}

/** The heading and the reading of the scan's rows left out, the same words in every format. */
export const SCAN_LEFT_OUT_HEADING = 'Rows left out for a missing value';
export const SCAN_LEFT_OUT_NOTE = 'Each column below leaves these rows out of every pair it is in; a pair leaves out the rows missing in either of its columns.';

export const FLAG_LEGEND: Record<string, string> = {
  sparse: 'fails the expected-count rule',
  'exact-p': 'the leading p-value is exact',
  'simulated-p': 'the leading p-value is simulated (an exact test by random tables)',
  'large-n': 'significant but negligible in strength',
  reversal: 'holding the --by variable fixed reverses the association',
  'by-changes': 'holding the --by variable fixed changes whether it passes',
  'weights-only': "sampling weights without a survey design: Kish's effective sample size, clustering and stratification not accounted for",
};

export function renderScanText(report: ScanReport, paint: ChalkInstance, options: { width: number } = { width: 80 }): string {
  const width = options.width;
  const out: string[] = [];
  out.push(...wrapText(`Pairs of ${report.input.file}, strongest first`, width).map((l) => paint.bold(l)));
  out.push(...wrapText(scanSummary(report), width).map((l) => paint.dim(l)));
  out.push('');
  const flagText = (p: ScanPair) => pairFlags(p).join(' ');
  // # · passes · pair · bar and V · leading p · adjusted p · notes (which say where the leading p-value is
  // exact or simulated); the pair column takes the room the page leaves, and a pair's notes go on a line
  // of their own when they do not fit beside it.
  const fixed = 4 + 2 + 8 + 12 + 11 + 11 + 2;
  const longest = Math.max(4, ...report.pairs.map((p) => displayWidth(`${p.rows.name} × ${p.cols.name}`)));
  const pairWidth = Math.max(16, Math.min(longest + 2, width - fixed - 5));
  const notesRoom = width - fixed - pairWidth;
  out.push(
    paint.bold(
      (padStart('#', 4) + '  ' + padEnd('passes', 8) + padEnd('pair', pairWidth) + padEnd('corrected V', 12) + padStart('leading p', 11) + padStart('adj. p', 11) + '  notes').trimEnd(),
    ),
  );
  for (const pair of report.pairs) {
    const name = foldLabel(`${pair.rows.name} × ${pair.cols.name}`, pairWidth - 2, Number.MAX_SAFE_INTEGER) ?? [`${pair.rows.name} × ${pair.cols.name}`];
    const v = pair.measures.biasCorrectedV;
    const notes = flagText(pair);
    const inline = displayWidth(notes) <= notesRoom;
    const line =
      padStart(String(pair.rank), 4) +
      '  ' +
      padEnd(pair.passes ? 'yes' : '—', 8) +
      padEnd(name[0], pairWidth) +
      strengthBar(v, 6) +
      padStart(formatMeasure(v), 6) +
      padStart(formatP(pair.verdict.pValue), 11) +
      padStart(formatP(pair.pAdjusted), 11) +
      '  ' +
      (inline ? notes : '');
    const lines = [line.trimEnd(), ...name.slice(1).map((more) => ' '.repeat(14) + more)];
    if (!inline && notes !== '') lines.push(...wrapText(`notes: ${notes}`, width, ' '.repeat(14)));
    out.push(...(pair.passes ? lines : lines.map((l) => paint.dim(l))));
  }
  if (report.pairs.length < report.pairsTested) {
    out.push(...wrapText(`… ${report.pairsTested - report.pairs.length} weaker pairs not shown (--top); ${report.pairsPassing} of all ${report.pairsTested} pairs pass.`, width, '  ').map((l) => paint.dim(l)));
  }
  out.push('');
  const used = [...new Set(report.pairs.flatMap(pairFlags))];
  const leading = report.design
    ? "The leading p-value is the design-based F test's (Rao–Scott, second order), for every pair."
    : 'The leading p-value is the chi-square one, or the exact or simulated one where expected counts are small (simulated ones drawn until the decision is clear).';
  const legend =
    `"passes": the adjusted leading p-value ("adj. p") is at most ${glued('α', String(report.alpha))}. ${leading} "corrected V": the bias-corrected Cramér's V.` +
    (used.length > 0 ? ' Notes: ' + used.map((f) => `${f} = ${FLAG_LEGEND[f]}`).join('; ') + '.' : '');
  out.push(...wrapText(legend, width).map((l) => paint.dim(l)));
  if (report.skipped.length > 0) {
    out.push(...heading(paint, 'Columns left out', width));
    for (const s of report.skipped) out.push(...wrapText(`${s.column}: ${s.reason}`, width, '  ', '    '));
  }
  if (report.untestable.length > 0) {
    out.push(...heading(paint, 'Pairs that could not be tested', width));
    for (const u of report.untestable) out.push(...wrapText(`${u.rows} × ${u.cols}: ${u.reason}`, width, '  ', '    '));
  }
  if ((report.derived ?? []).length > 0) {
    out.push(...heading(paint, 'One column a recoding of the other (not ranked; --keep-derived scores them)', width));
    for (const d of report.derived) out.push(...wrapText(`${d.rows} × ${d.cols}: ${d.reason}`, width, '  ', '    '));
  }
  if ((report.excludedBy ?? []).length > 0) {
    out.push(...heading(paint, SCAN_LEFT_OUT_HEADING, width));
    out.push(...wrapText(SCAN_LEFT_OUT_NOTE, width, '  ', '  ').map((l) => paint.dim(l)));
    for (const words of excludedByWords(report.excludedBy)) out.push(...wrapText(words, width, '  ', '    '));
  }
  out.push(...checkLines(report.warnings ?? [], paint, width));
  out.push(...cautionLines(paint, width));
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
  'leading_route',
  'simulations',
  'strength',
  'design_f',
  'design_num_df',
  'design_den_df',
  'design_p_value',
  'mean_design_effect',
  'excluded_by',
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
    pair.verdict.pValue,
    pair.verdict.test,
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
    pair.verdict.route,
    pair.tests.monteCarlo?.simulations ?? null,
    pair.verdict.strength,
    pair.tests.designF?.statistic ?? null,
    pair.tests.designF?.numDf ?? null,
    pair.tests.designF?.denDf ?? null,
    pair.tests.designF?.pValue ?? null,
    pair.design?.designEffects.mean ?? null,
    excludedByWords(pair.excludedBy ?? [], true).join('; '),
  ];
}

/** Full-precision number text: shortest round-trip form, empty for null. */
export function exactNumber(x: string | number | boolean | null): string {
  if (x === null) return '';
  if (typeof x === 'number') return Number.isFinite(x) ? String(x) : '';
  return String(x);
}

/** RFC 4180 quoting, and the spreadsheet guard of CSV/TSV reports: src/escape/spreadsheet.ts. */
export { delimitedField } from '../escape/spreadsheet.js';
import { spreadsheetField } from '../escape/spreadsheet.js';

/** One row per pair; cells a spreadsheet would run as formulas are neutralised unless `raw` (--raw-cells). */
export function renderScanDelimited(report: ScanReport, delimiter: ',' | '\t', raw = false): string {
  const lines = [SCAN_COLUMNS.join(delimiter)];
  for (const pair of report.pairs) lines.push(scanRow(pair).map((v) => spreadsheetField(exactNumber(v), delimiter, raw)).join(delimiter));
  return lines.join('\n') + '\n';
}

export function renderScanMarkdown(report: ScanReport): string {
  const out: string[] = [];
  out.push(`### Pairs of ${md(report.input.file)}, strongest first`);
  out.push('');
  out.push(md(scanSummary(report)));
  out.push('');
  out.push("| # | passes | rows | cols | bias-corrected V | Cramér's V | leading p | test | adjusted p | notes |");
  out.push('|--:|:-:|---|---|--:|--:|--:|---|--:|---|');
  for (const p of report.pairs) {
    out.push(
      `| ${p.rank} | ${p.passes ? 'yes' : 'no'} | ${md(p.rows.name)} | ${md(p.cols.name)} | ${formatMeasure(p.measures.biasCorrectedV)} | ${formatMeasure(p.measures.cramersV)} | ` +
        `${formatP(p.verdict.pValue)} | ${md(testName(p.verdict.test, p))} | ${formatP(p.pAdjusted)} | ${pairFlags(p).join(', ')} |`,
    );
  }
  const used = [...new Set(report.pairs.flatMap(pairFlags))];
  if (used.length > 0) {
    out.push('');
    out.push('Notes: ' + used.map((f) => `${f} = ${FLAG_LEGEND[f]}`).join('; ') + '.');
  }
  if (report.pairs.length < report.pairsTested) {
    out.push('');
    out.push(`${report.pairsTested - report.pairs.length} weaker pairs not shown (--top); ${report.pairsPassing} of all ${report.pairsTested} pairs pass.`);
  }
  if (report.skipped.length > 0) {
    out.push('');
    out.push('Columns left out: ' + report.skipped.map((s) => `${md(s.column)} (${md(s.reason)})`).join('; ') + '.');
  }
  if (report.untestable.length > 0) {
    out.push('');
    out.push('Pairs that could not be tested: ' + report.untestable.map((u) => `${md(u.rows)} × ${md(u.cols)} (${md(u.reason)})`).join('; ') + '.');
  }
  if ((report.derived ?? []).length > 0) {
    out.push('');
    out.push('One column a recoding of the other (not ranked): ' + report.derived.map((d) => `${md(d.rows)} × ${md(d.cols)} (${md(d.reason)})`).join('; ') + '.');
  }
  if ((report.excludedBy ?? []).length > 0) {
    out.push('');
    out.push(`${SCAN_LEFT_OUT_HEADING}: ${excludedByWords(report.excludedBy).map(md).join('; ')}. ${SCAN_LEFT_OUT_NOTE}`);
  }
  if ((report.warnings ?? []).length > 0) {
    out.push('');
    out.push('Check before relying on it:');
    out.push('');
    for (const w of report.warnings) out.push(`- ${md(w.message)}`);
  }
  out.push('');
  out.push(`_${md(CAUTION)}_`);
  return out.join('\n') + '\n';
}
