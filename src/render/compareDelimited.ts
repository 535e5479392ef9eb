/**
 * The compare report as CSV/TSV lines (the columns of the pair output) and as
 * Markdown: the decision about the change, the margins' shifts, the periods
 * side by side, and each period's own record.
 */
import type { CompareReport, PeriodRecord } from '../analysis/compare.js';
import { spreadsheetField } from '../escape/spreadsheet.js';
import { changeLine, compareHeadline, compareWarnings, compareWeightingWords, shiftWords, sideBySide } from './compareText.js';
import { Line, markdownRecord, md, PAIR_COLUMNS, plainSpaces, recordLines } from './pairDelimited.js';
import { exactNumber } from './scanTable.js';
import { CAUTION } from './words.js';

/**
 * One line per item under the pair columns: `verdict` lines (`changed`, with the
 * change test's p-value and method; `alpha`), `change` lines (the change test,
 * the no-three-way-interaction test, the change in bias-corrected V), `shift`
 * lines (`rows`, `cols`: the margin's test, shifted in `text`), `sentence` lines
 * (what the reports say in words), `warning` lines, then every line of each
 * period's record with `level` set to the period (a period that cannot be
 * tested: one `period,not_testable` line with its n and the reason).
 */
export function compareLines(report: CompareReport): Line[] {
  const lines: Line[] = [];
  const line = (section: string, name: string, value: number | null, df: number | null = null, p: number | null = null, text = ''): void => {
    lines.push([section, name, '', '', value, df, p, '', text]);
  };
  const v = report.verdict;
  if (v) {
    line('verdict', 'changed', v.changed ? 1 : 0, null, v.pValue, v.test);
    line('verdict', 'alpha', v.alpha);
    line('verdict', 'evidence', null, null, null, v.evidence);
  }
  if (report.change) line('change', report.change.method.replace(/-/g, '_'), report.change.statistic, report.change.df, report.change.pValue, report.change.denDf ? `denominator df ${report.change.denDf}` : '');
  if (report.interaction) line('change', 'no_three_way_interaction', report.interaction.statistic, report.interaction.df, report.interaction.pValue);
  line('change', 'delta_bias_corrected_v', report.deltaBiasCorrectedV);
  for (const [side, test, shifted] of [
    ['rows', report.rowShift, report.rowShifted],
    ['cols', report.colShift, report.colShifted],
  ] as const) {
    if (test) line('shift', side, test.statistic, test.df, test.pValue, shifted === null ? '' : String(shifted));
  }
  line('sentence', 'headline', null, null, null, plainSpaces(compareHeadline(report)));
  const change = changeLine(report);
  if (change) line('sentence', 'change_test', null, null, null, plainSpaces(change));
  line('sentence', 'row_shift', null, null, null, plainSpaces(shiftWords(report, 'rows')));
  line('sentence', 'col_shift', null, null, null, plainSpaces(shiftWords(report, 'cols')));
  const weighting = compareWeightingWords(report);
  if (weighting) line('sentence', 'weighting', null, null, null, plainSpaces(weighting));
  for (const w of report.warnings) line('warning', w.code, null, null, null, plainSpaces(w.message));
  for (const r of [report.before, report.after]) lines.push(...periodLines(report, r));
  return lines;
}

/** A period's record (or why it cannot be tested), then the rows it left out by column and reason, as pair writes them. */
function periodLines(report: CompareReport, r: PeriodRecord): Line[] {
  const lines: Line[] = r.testable ? recordLines(r, r.label) : [['period', 'not_testable', '', '', r.n, null, null, r.label, r.reason]];
  const side = (column: string) => (column === report.rows.name ? 'rows' : column === report.cols.name ? 'cols' : 'period');
  for (const e of r.excludedBy ?? []) lines.push(['sample', `excluded_by_${side(e.column)}`, '', '', e.rows, null, null, r.label, e.reason]);
  return lines;
}

/** One line per item; cells a spreadsheet would run as formulas are neutralised unless `raw` (--raw-cells). */
export function renderCompareDelimited(report: CompareReport, delimiter: ',' | '\t', raw = false): string {
  const out = [PAIR_COLUMNS.join(delimiter)];
  for (const line of compareLines(report)) out.push(line.map((x) => spreadsheetField(exactNumber(x), delimiter, raw)).join(delimiter));
  return out.join('\n') + '\n';
}

export function renderCompareMarkdown(report: CompareReport): string {
  const { before, after } = report;
  const out: string[] = [];
  out.push(`### ${md(report.rows.name)} × ${md(report.cols.name)}: ${md(before.label)} against ${md(after.label)}`);
  out.push('');
  const weighting = compareWeightingWords(report);
  if (weighting) out.push(md(weighting), '');
  out.push(`**${md(compareHeadline(report))}**`);
  out.push('');
  const change = changeLine(report);
  if (change) out.push(`- ${md(change)}`);
  out.push(`- ${md(shiftWords(report, 'rows'))}`);
  out.push(`- ${md(shiftWords(report, 'cols'))}`);
  out.push('');
  out.push(`| | ${md(before.label)} | ${md(after.label)} | change |`);
  out.push('|---|--:|--:|--:|');
  for (const [label, a, b, change] of sideBySide(report)) out.push(`| ${md(label.trim())} | ${md(a)} | ${md(b)} | ${md(change)} |`);
  for (const r of [before, after]) {
    out.push('');
    out.push(`#### ${md(r.label)}`);
    out.push('');
    if (r.testable) out.push(...markdownRecord(r));
    else out.push(md(r.reason));
  }
  const warnings = compareWarnings(report);
  if (warnings.length > 0) {
    out.push('');
    out.push('Check before relying on it:');
    out.push('');
    for (const w of warnings) out.push(`- ${md(w)}`);
  }
  out.push('');
  out.push(`_${md(CAUTION)}_`);
  return out.join('\n') + '\n';
}
