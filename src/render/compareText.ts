/** The compare report as text for people. */
import type { ChalkInstance } from 'chalk';
import type { CompareReport, PeriodRecord } from '../analysis/compare.js';
import { formatCount, formatMeasure, formatP, formatSigned, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { renderGrid } from './grid.js';
import { glued, wrapText } from './layout.js';
import { cautionLines, DEFAULT_TEXT, heading, tableView, TextOptions } from './pairText.js';
import { comparison, evidenceWords, testName } from './words.js';

type Testable = Extract<PeriodRecord, { testable: true }>;

export function changeTestName(method: 'breslow-day' | 'no-three-way-interaction'): string {
  return method === 'breslow-day' ? 'Breslow–Day test of equal odds ratios' : 'G² test of no three-way interaction';
}

/** The decision of a comparison in words: did the association change, and did either margin shift? */
export function compareHeadline(report: CompareReport): string {
  const v = report.verdict;
  if (!v) return 'Whether the association changed cannot be tested for these tables';
  return v.changed
    ? `The association changed between the periods (${evidenceWords(v.evidence)}): ${comparison(v.pValue, v.alpha, true)}, ${changeTestName(v.test)}`
    : `No evidence that the association changed: ${comparison(v.pValue, v.alpha, false)}, ${changeTestName(v.test)}`;
}

export function shiftWords(report: CompareReport, side: 'rows' | 'cols'): string {
  const test = side === 'rows' ? report.rowShift : report.colShift;
  const shifted = side === 'rows' ? report.rowShifted : report.colShifted;
  const name = side === 'rows' ? report.rows.name : report.cols.name;
  if (!test || shifted === null) return `${name}: its distribution cannot be compared`;
  const alpha = report.verdict?.alpha;
  return `${name}: ${shifted ? 'its distribution shifted' : 'no evidence its distribution shifted'} (${alpha === undefined ? glued('p', formatP(test.pValue)) : comparison(test.pValue, alpha, shifted)}, chi-square ${glued('df', String(test.df))})`;
}

export function renderCompareText(report: CompareReport, paint: ChalkInstance, options: TextOptions = DEFAULT_TEXT): string {
  const width = options.width;
  const out: string[] = [];
  const { before, after } = report;
  out.push(...wrapText(`${report.rows.name} × ${report.cols.name}: ${before.label} against ${after.label}`, width).map((l) => paint.bold(l)));
  if (report.weighted) out.push(...wrapText('Counts are sums of sampling weights; each period is tested on its table rescaled to its effective sample size.', width).map((l) => paint.dim(l)));
  out.push('');
  out.push(...wrapText(`${report.verdict?.changed ? '■' : '□'} ${compareHeadline(report)}`, width, '', '  ').map((l) => paint.bold(l)));
  out.push(...wrapText(shiftWords(report, 'rows'), width, '  ', '    '));
  out.push(...wrapText(shiftWords(report, 'cols'), width, '  ', '    '));

  out.push(...heading(paint, 'Side by side', width));
  const value = (r: PeriodRecord, f: (x: Testable) => string) => (r.testable ? f(r) : UNDEFINED);
  const figures: [string, (r: PeriodRecord) => string, string][] = [
    ['n', (r) => formatCount(r.n), ''],
    ['leading p', (r) => value(r, (x) => formatP(x.verdict.pValue)), ''],
    ['test leading', (r) => value(r, (x) => testName(x.verdict.test, x).replace(/ test.*$/, '')), ''],
    ['chi-square', (r) => value(r, (x) => formatStatistic(x.tests.pearson.statistic)), ''],
    ['bias-corrected V', (r) => value(r, (x) => formatMeasure(x.measures.biasCorrectedV)), formatSigned(report.deltaBiasCorrectedV)],
    ["Cramér's V", (r) => value(r, (x) => formatMeasure(x.measures.cramersV)), ''],
  ];
  out.push(
    ...renderGrid(
      {
        rowTitle: '',
        colTitle: '',
        rowLabels: figures.map(([label]) => label),
        colLabels: [before.label, after.label, 'change'],
        cells: figures.map(([, f, change]) => [f(before), f(after), change]),
        strong: (s) => paint.bold(s),
        faint: (s) => paint.dim(s),
      },
      width,
    ),
  );
  for (const r of [before, after]) {
    if (!r.testable) {
      out.push(...wrapText(`! ${r.label}: ${r.reason}`, width, '  ').map((l) => paint.yellow(l)));
      continue;
    }
    out.push(...tableView(r, paint, options, `${r.label}: `));
  }
  if (report.warnings.length > 0) {
    out.push(...heading(paint, 'Check before relying on it', width));
    for (const w of report.warnings) out.push(...wrapText(`! ${w.message}`, width, '  ', '    ').map((l) => paint.yellow(l)));
  }
  out.push(...cautionLines(paint, width));
  return out.join('\n') + '\n';
}
