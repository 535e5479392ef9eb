/**
 * The banner as CSV/TSV (long and tidy: one line per question × row ×
 * column under stable headings), as Markdown (a table per question) and as
 * a self-contained HTML page with a table of contents of the questions.
 */
import type { BannerQuestion, BannerReport } from '../analysis/banner.js';
import { formatCount } from '../readableNumbers.js';
import { associationShort, associationTest, associationWords, bannerInputLine, cellPart, designEffectText, meanText, methodNotes, questionHeading, showsWeightedBase, SMALL_BASE_MARK } from './bannerWords.js';
import { md } from './pairDelimited.js';
import { spreadsheetField } from '../escape/spreadsheet.js';
import { exactNumber } from './scanTable.js';
import { escapeXml } from './svg.js';
import { CAUTION } from './words.js';

/** Stable headings of `banner --format csv|tsv` (docs/json.md describes each). */
export const BANNER_COLUMNS = [
  'question',
  'question_text',
  'question_kind',
  'row',
  'row_kind',
  'break',
  'level',
  'key',
  'count',
  'unweighted_count',
  'column_percent',
  'row_percent',
  'base',
  'weighted_base',
  'effective_base',
  'small_base',
  'higher_than',
  'marks',
  'mean',
  'sd',
  'test',
  'statistic',
  'df',
  'p_value',
  'passes',
  'standard_error',
  'design_effect',
  'denominator_df',
  'note',
] as const;

type Value = string | number | boolean | null;

/** Every line of the long table, as values under BANNER_COLUMNS. */
export function bannerLines(report: BannerReport): Value[][] {
  const lines: Value[][] = [];
  // The design (or the weights-only caution) in one line of its own, before the questions.
  if (report.designNote) lines.push(['', '', '', '', 'design', '', '', '', null, null, null, null, null, null, null, null, '', '', null, null, '', null, null, null, null, null, null, null, report.designNote]);
  for (const q of report.questions) {
    const column = (j: number) => report.columns[j];
    const base = (j: number) => [q.bases[j].unweighted, q.bases[j].weighted, q.bases[j].effective, q.bases[j].small];
    for (const row of q.rows) {
      row.cells.forEach((cell, j) => {
        const c = column(j);
        lines.push([
          q.name, q.title ?? '', q.kind, row.label, row.kind, c.break ?? '', c.level, c.key ?? '',
          cell.count, cell.unweighted, cell.columnPercent, cell.rowPercent, ...base(j),
          cell.higherThan.map((m) => m.key).join(' '), cell.marks, null, null, '', null, null, null, null,
          cell.standardError, q.bases[j].designEffect, null, '',
        ]);
      });
    }
    q.means?.forEach((m, j) => {
      const c = column(j);
      lines.push([
        q.name, q.title ?? '', q.kind, 'mean', 'mean', c.break ?? '', c.level, c.key ?? '',
        null, m.unweighted, null, null, m.unweighted, m.weighted, m.effective, q.bases[j].small,
        m.higherThan.map((h) => h.key).join(' '), m.marks, m.mean, m.sd, '', null, null, null, null,
        m.standardError, q.bases[j].designEffect, null, '',
      ]);
    });
    for (const t of q.tests) {
      const a = t.association;
      lines.push([
        q.name, q.title ?? '', q.kind, '', 'test', t.break, '', '', null, null, null, null, null, null, null, null, '', '', null, null,
        a ? (a.kind === 'pair' ? a.verdict!.test : `multiple-response-${a.multipleResponse!.referral}`) : t.reason ?? '',
        a ? a.statistic : null, a ? a.df : null, a ? a.pValue : null, a ? a.passes : null,
        null, null, a ? a.denominatorDf : null, '',
      ]);
    }
  }
  return lines;
}

/** The long table as CSV or TSV: cells a spreadsheet would run as formulas neutralised unless `raw` (--raw-cells). */
export function renderBannerDelimited(report: BannerReport, delimiter: ',' | '\t', raw = false): string {
  const out = [BANNER_COLUMNS.join(delimiter)];
  for (const line of bannerLines(report)) out.push(line.map((v) => spreadsheetField(exactNumber(v), delimiter, raw)).join(delimiter));
  return out.join('\n') + '\n';
}

/** The rows of one question's table as shown (label, the cell texts per column with their marks), for Markdown and HTML. */
function shownRows(q: BannerQuestion, report: BannerReport): { label: string; kind: string; cells: { value: string; marks: string }[] }[] {
  const out: { label: string; kind: string; cells: { value: string; marks: string }[] }[] = [];
  for (const row of q.rows) {
    for (const [k, part] of report.settings.cells.entries()) {
      out.push({
        label: k === 0 ? (row.kind === 'net' ? `net: ${row.label}` : row.label) : '',
        kind: row.kind,
        cells: row.cells.map((c) => ({ value: cellPart(c, part), marks: k === 0 && part !== 'count' ? c.marks : '' })),
      });
    }
  }
  if (q.means) {
    out.push({ label: 'mean', kind: 'mean', cells: q.means.map((m) => ({ value: meanText(m, 'mean'), marks: m.marks })) });
    out.push({ label: 'standard deviation', kind: 'mean', cells: q.means.map((m) => ({ value: meanText(m, 'sd'), marks: '' })) });
    if (report.design) out.push({ label: 'standard error of the mean', kind: 'mean', cells: q.means.map((m) => ({ value: meanText(m, 'se'), marks: '' })) });
  }
  out.push({ label: q.kind === 'multiple' ? 'base (respondents)' : 'base', kind: 'base', cells: q.bases.map((b) => ({ value: formatCount(b.unweighted), marks: b.small ? SMALL_BASE_MARK : '' })) });
  if (showsWeightedBase(report)) out.push({ label: 'weighted base', kind: 'base', cells: q.bases.map((b) => ({ value: formatCount(Math.round(b.weighted * 10) / 10), marks: '' })) });
  if (report.design) out.push({ label: 'design effect', kind: 'base', cells: q.bases.map((b) => ({ value: designEffectText(b.designEffect), marks: '' })) });
  return out;
}

function columnHeading(report: BannerReport, j: number): string {
  const c = report.columns[j];
  return c.key === null ? 'Total' : `${c.break}: ${c.level} (${c.key})`;
}

export function renderBannerMarkdown(report: BannerReport): string {
  const out: string[] = [];
  out.push(`## Banner of ${md(report.input.file)}`);
  out.push('');
  out.push(md(bannerInputLine(report)));
  if (report.designNote) {
    out.push('');
    out.push(md(report.designNote));
  }
  for (const q of report.questions) {
    out.push('');
    out.push(`### ${md(questionHeading(q))}${q.kind === 'multiple' ? ' (multiple response: % of respondents)' : ''}`);
    out.push('');
    out.push(`| | ${report.columns.map((_c, j) => md(columnHeading(report, j))).join(' | ')} |`);
    out.push(`|:--|${report.columns.map(() => '--:').join('|')}|`);
    for (const row of shownRows(q, report)) out.push(`| ${row.kind === 'base' || row.kind === 'mean' ? `*${md(row.label)}*` : md(row.label)} | ${row.cells.map((c) => (c.marks ? `${md(c.value)} **${md(c.marks)}**` : md(c.value))).join(' | ')} |`);
    out.push('');
    for (const t of q.tests) out.push(`- ${md(associationWords(t, report.settings.alpha))}`);
  }
  if (report.skipped.length) {
    out.push('');
    out.push('### Left out');
    out.push('');
    for (const s of report.skipped) out.push(`- ${md(s.column)}: ${md(s.reason)}`);
  }
  if (report.warnings.length) {
    out.push('');
    out.push('### Check');
    out.push('');
    for (const w of report.warnings) out.push(`- ${md(w.message)}`);
  }
  out.push('');
  out.push('### How to read it');
  out.push('');
  for (const note of methodNotes(report)) out.push(`- ${md(note)}`);
  out.push('');
  out.push(`*${md(CAUTION)}*`);
  return out.join('\n') + '\n';
}

const e = (s: string) => escapeXml(s.replace(/\u00a0/g, ' '));

const STYLE = `
  body { font: 15px/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; color: #1d1d1d; max-width: 1100px; margin: 2rem auto; padding: 0 1.2rem; }
  h1 { font-size: 1.5rem; margin-bottom: 0.2rem; }
  h2 { font-size: 1.1rem; border-bottom: 2px solid #3f6e4a; padding-bottom: 0.2rem; margin-top: 2rem; }
  .meta { color: #555; margin-top: 0; }
  nav ol { columns: 2; }
  .wrap { max-width: 100%; overflow-x: auto; }
  table { border-collapse: collapse; margin: 0.6rem 0; font-variant-numeric: tabular-nums; }
  th, td { padding: 0.2rem 0.5rem; border-bottom: 1px solid #ddd; text-align: right; vertical-align: top; white-space: nowrap; }
  th:first-child, td:first-child { text-align: left; white-space: normal; min-width: 10rem; }
  th.group { text-align: center; border-bottom: 2px solid #3f6e4a; }
  .first { border-left: 2px solid #bbb; }
  .key { color: #666; font-weight: normal; }
  .mark { font-weight: 700; color: #3f6e4a; margin-left: 0.25em; }
  .small { color: #a33; }
  tr.base td { color: #555; border-top: 2px solid #bbb; }
  tr.net td:first-child { font-style: italic; }
  ul.tests { margin: 0.3rem 0 1rem; padding-left: 1.2rem; color: #333; }
  .caution { color: #555; font-size: 0.9rem; margin-top: 2rem; }
  @media print { body { margin: 0; max-width: none; } .wrap { overflow: visible; } h2 { break-after: avoid; } }
`;

function questionTable(q: BannerQuestion, report: BannerReport, index: number): string {
  const firsts = new Set(report.breaks.map((b) => b.first));
  const cls = (j: number) => (firsts.has(j) ? ' class="first"' : '');
  const groups = `<tr><th></th><th></th>${report.breaks.map((b) => `<th class="group first" colspan="${b.count}">${e(b.name)}</th>`).join('')}</tr>`;
  const levels = `<tr><th></th><th>Total</th>${report.columns
    .slice(1)
    .map((c, k) => `<th${cls(k + 1)}>${e(c.level)} <span class="key">(${e(c.key as string)})</span></th>`)
    .join('')}</tr>`;
  const body = shownRows(q, report)
    .map(
      (row) =>
        `<tr class="${row.kind}"><td>${e(row.label)}</td>${row.cells
          .map((c, j) => `<td${cls(j)}>${e(c.value)}${c.marks ? `<span class="${row.kind === 'base' ? 'mark small' : 'mark'}">${e(c.marks)}</span>` : ''}</td>`)
          .join('')}</tr>`,
    )
    .join('');
  const tests = q.tests.map((t) => `<li>${e(associationWords(t, report.settings.alpha))}</li>`).join('');
  return `<h2 id="q${index + 1}">${e(questionHeading(q))}${q.kind === 'multiple' ? ' <span class="key">(multiple response: % of respondents)</span>' : ''}</h2>
<div class="wrap"><table>${groups}${levels}${body}</table></div><ul class="tests">${tests}</ul>`;
}

export function renderBannerHtml(report: BannerReport): string {
  const toc = report.questions.map((q, i) => `<li><a href="#q${i + 1}">${e(questionHeading(q))}</a> <span class="key">${e(q.tests.map((t) => associationShort(t.association)).join(' · '))}</span></li>`).join('');
  const skipped = report.skipped.map((s) => `<li>${e(s.column)}: ${e(s.reason)}</li>`).join('');
  const warnings = report.warnings.map((w) => `<li>${e(w.message)}</li>`).join('');
  const body = `<h1>Banner of ${e(report.input.file)}</h1>
<p class="meta">${e(bannerInputLine(report))}; break variables: ${e(report.breaks.map((b) => b.name).join(', '))}</p>${report.designNote ? `\n<p class="meta">${e(report.designNote)}</p>` : ''}
<nav><h2>Questions</h2><ol>${toc}</ol></nav>
${report.questions.map((q, i) => questionTable(q, report, i)).join('\n')}
${skipped ? `<h2>Left out</h2><ul>${skipped}</ul>` : ''}${warnings ? `<h2>Check</h2><ul>${warnings}</ul>` : ''}
<h2>How to read it</h2><ul>${methodNotes(report).map((n) => `<li>${e(n)}</li>`).join('')}</ul>`;
  void associationTest;
  return `<!doctype html>\n<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${e(`Banner of ${report.input.file}`)}</title><style>${STYLE}</style></head><body>${body}<p class="caution">${e(CAUTION)}</p></body></html>\n`;
}
