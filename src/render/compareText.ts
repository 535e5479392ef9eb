/** The compare report as text for people. */
import type { ChalkInstance } from 'chalk';
import { noSharedLevelWords, type CompareReport, type PeriodRecord } from '../analysis/compare.js';
import { formatCount, formatMeasure, formatP, formatRatio, formatSigned, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { renderGrid } from './grid.js';
import { glued, wrapText } from './layout.js';
import { cautionLines, DEFAULT_TEXT, heading, tableView, TextOptions } from './pairText.js';
import { alphaPhrase, comparison, designOptionWords, evidenceWords, testName } from './words.js';
import type { ExcludedBy } from '../table/countedTable.js';

type Testable = Extract<PeriodRecord, { testable: true }>;

export function changeTestName(method: 'breslow-day' | 'no-three-way-interaction' | 'design-wald'): string {
  if (method === 'design-wald') return 'design-based Wald test of equal log odds ratios';
  return method === 'breslow-day' ? 'Breslow–Day test of equal odds ratios' : 'G² test of no three-way interaction';
}

/** How the periods were weighted, in a sentence (null when they were not). */
export function compareWeightingWords(report: CompareReport): string | null {
  if (report.designed) {
    const d = [report.before, report.after].flatMap((r) => (r.testable && r.design ? [r.design] : []))[0] ?? null;
    const design = d ? ` (${designOptionWords(d)})` : '';
    return `Each period is its own sample under the survey design${design}; the change and shift tests are design-based Wald tests for two independent samples.`;
  }
  if (report.weighted) return "Counts are sums of sampling weights; each period is tested on its table rescaled to Kish's effective sample size, which does not account for clustering or stratification.";
  return null;
}

/** The decision of a comparison in words: did the association change, and did either margin shift? */
export function compareHeadline(report: Pick<CompareReport, 'verdict' | 'noSharedLevel' | 'before' | 'after'>): string {
  const v = report.verdict;
  if (!v) return report.noSharedLevel.length > 0 ? `No comparison is possible: ${noSharedLevelWords(report.before.label, report.after.label, report.noSharedLevel).replace(/, so no comparison of the periods is possible$/, '')}` : 'Whether the association changed cannot be tested for these tables';
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
  const how = test.method === 'design-wald' ? (test.denDf !== null && test.denDf !== undefined ? `design-based Wald F, ${glued('df', String(test.df), 'and', formatStatistic(test.denDf, 0))}` : `design-based Wald χ², ${glued('df', String(test.df))}`) : `chi-square ${glued('df', String(test.df))}`;
  return `${name}: ${shifted ? 'its distribution shifted' : 'no evidence its distribution shifted'} (${alpha === undefined ? glued('p', formatP(test.pValue)) : comparison(test.pValue, alpha, shifted)}, ${how})`;
}

/**
 * The two periods side by side, one row per figure: the label, the figure in
 * each period and the change (where there is one). Each period's decision is
 * its own record's, at the report's alpha.
 */
export function sideBySide(report: CompareReport): [string, string, string, string][] {
  const { before, after } = report;
  const value = (r: PeriodRecord, f: (x: Testable) => string) => (r.testable ? f(r) : UNDEFINED);
  const alpha = before.testable ? before.verdict.alpha : after.testable ? after.verdict.alpha : report.verdict?.alpha;
  const figures: [string, (r: PeriodRecord) => string, string][] = [
    ['n', (r) => formatCount(r.n), ''],
    ['leading p', (r) => value(r, (x) => formatP(x.verdict.pValue)), ''],
    ['leading test', (r) => value(r, (x) => testName(x.verdict.test, x).replace(/ test.*$/, '')), ''],
    [alpha === undefined ? 'associated' : `associated at ${alphaPhrase(alpha)}`, (r) => value(r, (x) => (x.verdict.passes ? 'yes' : 'no')), ''],
    ...(report.designed
      ? ([['mean design effect', (r) => value(r, (x) => formatRatio(x.design?.designEffects.mean)), '']] as [string, (r: PeriodRecord) => string, string][])
      : ([['chi-square', (r) => value(r, (x) => formatStatistic(x.tests.pearson.statistic)), '']] as [string, (r: PeriodRecord) => string, string][])),
    ['bias-corrected V', (r) => value(r, (x) => formatMeasure(x.measures.biasCorrectedV)), formatSigned(report.deltaBiasCorrectedV)],
    ["Cramér's V", (r) => value(r, (x) => formatMeasure(x.measures.cramersV)), ''],
    // Ordered sides (--ordinal, or a codebook marking both ordered): the direction too.
    ...([before, after].some((r) => r.testable && r.ordinal !== null)
      ? ([
          ['gamma', (r) => value(r, (x) => (x.ordinal ? formatSigned(x.ordinal.gamma.estimate) : UNDEFINED)), ''],
          ["Kendall's tau-b", (r) => value(r, (x) => (x.ordinal ? formatSigned(x.ordinal.kendallTauB.estimate) : UNDEFINED)), ''],
        ] as [string, (r: PeriodRecord) => string, string][])
      : []),
    ['left out (missing)', (r) => value(r, (x) => formatCount(x.excluded)), ''],
  ];
  // The rows left out by column and reason, side by side, where they were counted so.
  const reasons: ExcludedBy[] = [...(before.excludedBy ?? []), ...(after.excludedBy ?? [])];
  const keys = [...new Set(reasons.map((e) => JSON.stringify([e.column, e.reason])))].map((k) => JSON.parse(k) as [string, string]);
  for (const [column, reason] of keys) {
    const rows = (r: PeriodRecord) => (r.excludedBy ? formatCount(r.excludedBy.find((e) => e.column === column && e.reason === reason)?.rows ?? 0) : UNDEFINED);
    figures.push([`  ${column}: ${reason}`, rows, '']);
  }
  return figures.map(([label, f, change]) => [label, f(before), f(after), change]);
}

/** The comparison's warnings, then each period's own (sparse cells, a large sample…), named by its period. */
export function compareWarnings(report: CompareReport): string[] {
  const own = (r: PeriodRecord) => (r.testable ? r.warnings.map((w) => `${r.label}: ${w.message}`) : []);
  return [...report.warnings.map((w) => w.message), ...own(report.before), ...own(report.after)];
}

/** The change test in a line: "Breslow–Day test of equal odds ratios: 2.74, df 1, p 0.0981; change in bias-corrected V −0.132" (null without a change test: the headline and a warning say why). */
export function changeLine(report: CompareReport): string | null {
  const c = report.change;
  if (!c) return null;
  return `${changeTestName(c.method)}: ${formatStatistic(c.statistic)}, ${glued('df', String(c.df))}${c.denDf ? ` and ${formatStatistic(c.denDf, 0)}` : ''}, ${glued('p', formatP(c.pValue))}; change in bias-corrected V ${glued(formatSigned(report.deltaBiasCorrectedV))}`;
}

export function renderCompareText(report: CompareReport, paint: ChalkInstance, options: TextOptions = DEFAULT_TEXT): string {
  const width = options.width;
  const out: string[] = [];
  const { before, after } = report;
  out.push(...wrapText(`${report.rows.name} × ${report.cols.name}: ${before.label} against ${after.label}`, width).map((l) => paint.bold(l)));
  for (const side of [report.rows, report.cols]) if (side.question) out.push(...wrapText(`${side.name}: ${side.question}`, width));
  const weighting = compareWeightingWords(report);
  if (weighting) out.push(...wrapText(weighting, width).map((l) => paint.dim(l)));
  out.push('');
  out.push(...wrapText(`${report.verdict?.changed ? '■' : '□'} ${compareHeadline(report)}`, width, '', '  ').map((l) => paint.bold(l)));
  const change = changeLine(report);
  if (change) out.push(...wrapText(change, width, '  ', '    '));
  out.push(...wrapText(shiftWords(report, 'rows'), width, '  ', '    '));
  out.push(...wrapText(shiftWords(report, 'cols'), width, '  ', '    '));

  out.push(...heading(paint, 'Side by side', width));
  const figures = sideBySide(report);
  out.push(
    ...renderGrid(
      {
        rowTitle: '',
        colTitle: '',
        rowLabels: figures.map(([label]) => label),
        colLabels: [before.label, after.label, 'change'],
        cells: figures.map(([, a, b, change]) => [a, b, change]),
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
  const warnings = compareWarnings(report);
  if (warnings.length > 0) {
    out.push(...heading(paint, 'Check before relying on it', width));
    for (const w of warnings) out.push(...wrapText(`! ${w}`, width, '  ', '    ').map((l) => paint.yellow(l)));
  }
  out.push(...cautionLines(paint, width));
  return out.join('\n') + '\n';
}
