import type { ChalkInstance } from 'chalk';
import type { CompareReport, PeriodRecord } from '../analysis/compare.js';
import { clip, formatCount, formatMeasure, formatP, formatSigned, formatStatistic, padLeft, padRight } from './format.js';
import { CAUTION, wrap } from './pairText.js';

function value(r: PeriodRecord, f: (x: Extract<PeriodRecord, { testable: true }>) => string): string {
  return r.testable ? f(r) : '—';
}

export function renderCompareText(report: CompareReport, paint: ChalkInstance, alpha: number, width = 80): string {
  const out: string[] = [];
  const { before, after } = report;
  out.push(paint.bold(`${report.rows.name} × ${report.cols.name}: ${before.label} against ${after.label}`));
  out.push('');
  const col = 20;
  const line = (label: string, a: string, b: string, change = '') => padRight(label, 26) + padLeft(a, col - 4) + padLeft(b, col - 4) + padLeft(change, 14);
  out.push(paint.bold(line('', clip(before.label, col - 6), clip(after.label, col - 6), 'change')));
  out.push(line('observations', formatCount(before.testable ? before.n : before.n), formatCount(after.testable ? after.n : after.n)));
  out.push(line('Pearson chi-square', value(before, (r) => formatStatistic(r.tests.pearson.statistic)), value(after, (r) => formatStatistic(r.tests.pearson.statistic))));
  out.push(line('leading p-value', value(before, (r) => formatP(r.findings.primaryTest.pValue)), value(after, (r) => formatP(r.findings.primaryTest.pValue))));
  out.push(line('bias-corrected V', value(before, (r) => formatMeasure(r.measures.biasCorrectedV)), value(after, (r) => formatMeasure(r.measures.biasCorrectedV)), formatSigned(report.deltaBiasCorrectedV, 3)));
  out.push(line("Cramér's V", value(before, (r) => formatMeasure(r.measures.cramersV)), value(after, (r) => formatMeasure(r.measures.cramersV))));
  out.push('');
  out.push(paint.bold.underline('Did it change?'));
  if (report.change) {
    const name = report.change.method === 'breslow-day' ? 'same odds ratio in both (Breslow–Day)' : 'same association in both (G², no three-way interaction)';
    out.push('  ' + padRight(name, 56) + `df ${report.change.df}   p ${formatP(report.change.pValue)}`);
    const verdict = report.change.pValue <= alpha ? `The association changed between the periods (p ${formatP(report.change.pValue)} ≤ ${alpha}).` : `No evidence that the association changed (p ${formatP(report.change.pValue)} > ${alpha}).`;
    out.push(...wrap(verdict, width, '  '));
  } else out.push('  the change test cannot be computed for these tables');
  const shift = (label: string, t: CompareReport['rowShift']) => out.push('  ' + padRight(label, 56) + (t ? `df ${t.df}   p ${formatP(t.pValue)}` : '—'));
  shift(`${clip(report.rows.name, 30)} distribution shifted?`, report.rowShift);
  shift(`${clip(report.cols.name, 30)} distribution shifted?`, report.colShift);
  for (const r of [before, after]) if (!r.testable) out.push(...wrap(`! ${r.label}: ${r.reason}`, width, '  ').map((l) => paint.yellow(l)));
  if (report.warnings.length > 0) {
    out.push('');
    out.push(paint.bold.underline('Checks'));
    for (const w of report.warnings) out.push(...wrap(`! ${w.message}`, width, '  ').map((l) => paint.yellow(l)));
  }
  out.push('');
  out.push(...wrap(CAUTION, width).map((l) => paint.dim(l)));
  return out.join('\n') + '\n';
}
