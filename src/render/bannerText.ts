/**
 * The banner as text within the page: one block per question, the Total
 * first, then as many break variables side by side as the width allows
 * (the rest in further blocks under the same stub); letters beside a value
 * mark the columns it is significantly higher than.
 */
import type { ChalkInstance } from 'chalk';
import type { BannerCellPart, BannerQuestion, BannerReport } from '../analysis/banner.js';
import { formatCount } from '../readableNumbers.js';
import { associationWords, bannerInputLine, cellPart, designEffectText, meanText, methodNotes, questionHeading, showsWeightedBase, SMALL_BASE_MARK } from './bannerWords.js';
import { displayWidth, foldLabel, padEnd, padStart, shownLabel, wrapText } from './layout.js';
import { CAUTION } from './words.js';

interface GridLine {
  label: string;
  /** Per report column: the value text and the marks. */
  values: string[];
  marks: string[];
  strong?: boolean;
}

const GAP = 2;
const SEPARATOR = ' │';

/** The lines of one question's grid (values and marks per column), before layout. */
function gridLines(q: BannerQuestion, report: BannerReport, parts: readonly BannerCellPart[]): GridLine[] {
  const lines: GridLine[] = [];
  const n = report.columns.length;
  for (const row of q.rows) {
    parts.forEach((part, k) => {
      const label = k === 0 ? (row.kind === 'net' ? `net: ${row.label}` : row.label) : '';
      lines.push({ label, values: row.cells.map((c) => cellPart(c, part)), marks: row.cells.map((c) => (k === 0 && part !== 'count' ? c.marks : '')) });
    });
  }
  if (q.means) {
    lines.push({ label: 'mean', values: q.means.map((m) => meanText(m, 'mean')), marks: q.means.map((m) => m.marks), strong: true });
    lines.push({ label: 'standard deviation', values: q.means.map((m) => meanText(m, 'sd')), marks: new Array(n).fill('') });
    if (report.design) lines.push({ label: 'standard error of the mean', values: q.means.map((m) => meanText(m, 'se')), marks: new Array(n).fill('') });
  }
  const small = (i: number) => (q.bases[i].small ? SMALL_BASE_MARK : '');
  lines.push({ label: q.kind === 'multiple' ? 'base (respondents)' : 'base', values: q.bases.map((b) => formatCount(b.unweighted)), marks: q.bases.map((_b, i) => small(i)) });
  if (showsWeightedBase(report)) lines.push({ label: 'weighted base', values: q.bases.map((b) => formatCount(Math.round(b.weighted * 10) / 10)), marks: new Array(n).fill('') });
  if (report.design) lines.push({ label: 'design effect', values: q.bases.map((b) => designEffectText(b.designEffect)), marks: new Array(n).fill('') });
  return lines;
}

/** Renders the banner report as text of at most `width` columns (a column group wider than the page stands alone). */
export function renderBannerText(report: BannerReport, paint: ChalkInstance, options: { width: number }): string {
  const page = Math.max(40, options.width);
  const out: string[] = [];
  out.push(paint.bold(`Banner: ${report.questions.length} question${report.questions.length === 1 ? '' : 's'} by ${report.breaks.map((b) => b.name).join(', ')}`));
  out.push(...wrapText(bannerInputLine(report), page));
  if (report.designNote) out.push(...wrapText(report.designNote, page));
  for (const q of report.questions) {
    out.push('');
    out.push(...questionBlock(q, report, paint, page));
  }
  if (report.skipped.length > 0) {
    out.push('');
    out.push(paint.bold('Left out'));
    for (const s of report.skipped) out.push(...wrapText(`${s.column}: ${s.reason}`, page, '  ', '    '));
  }
  if (report.warnings.length > 0) {
    out.push('');
    out.push(paint.bold('Check'));
    for (const w of report.warnings) out.push(...wrapText(w.message, page, '  ', '    '));
  }
  out.push('');
  out.push(paint.bold('How to read it'));
  out.push(...report.breaks.flatMap((b) => wrapText(`${b.name}${b.title ? ` (${b.title})` : ''}: ${report.columns.slice(b.first, b.first + b.count).map((c) => `${c.key} ${shownLabel(c.level)}`).join(', ')}`, page, '  ', '    ')));
  for (const note of methodNotes(report)) out.push(...wrapText(note, page, '  ', '    '));
  out.push('');
  out.push(...wrapText(CAUTION, page).map((l) => paint.dim(l)));
  return out.join('\n') + '\n';
}

function questionBlock(q: BannerQuestion, report: BannerReport, paint: ChalkInstance, page: number): string[] {
  const out: string[] = [];
  const kindNote = q.kind === 'multiple' ? ' (multiple response: % of respondents)' : q.kind === 'numeric' && q.rows.length === 0 ? ' (numeric: mean per column)' : '';
  out.push(...wrapText(`${questionHeading(q)}${kindNote}`, page).map((l) => paint.bold(l)));
  const lines = gridLines(q, report, report.settings.cells);
  const columns = report.columns.length;

  // Each column: as wide as its widest value plus its widest marks, and a short label.
  const valueWidth = new Array<number>(columns).fill(0);
  const markWidth = new Array<number>(columns).fill(0);
  for (const line of lines)
    for (let j = 0; j < columns; j++) {
      valueWidth[j] = Math.max(valueWidth[j], displayWidth(line.values[j]));
      markWidth[j] = Math.max(markWidth[j], displayWidth(line.marks[j]));
    }
  const cellWidth = valueWidth.map((v, j) => v + (markWidth[j] > 0 ? markWidth[j] + 1 : 0));
  const header = report.columns.map((c, j) => {
    const limit = Math.max(cellWidth[j], 8);
    const folded = foldLabel(shownLabel(c.level), limit, 2) ?? foldLabel(shownLabel(c.level), limit, 2, true) ?? [shownLabel(c.level).slice(0, limit)];
    return folded;
  });
  const width = report.columns.map((c, j) => Math.max(cellWidth[j], ...header[j].map(displayWidth), c.key ? c.key.length + 2 : 0));

  const stubNeed = Math.max(12, ...lines.map((l) => displayWidth(l.label)));
  const stub = Math.min(stubNeed, Math.max(14, Math.floor(page * 0.3))) + 1;

  // Groups of break variables that fit beside the stub and the Total.
  const groupWidth = report.breaks.map((b) => {
    let w = SEPARATOR.length;
    for (let j = b.first; j < b.first + b.count; j++) w += width[j] + GAP;
    return Math.max(w, displayWidth(b.name) + SEPARATOR.length + 1);
  });
  const base = stub + width[0] + GAP;
  const blocks: number[][] = [];
  let current: number[] = [];
  let used = base;
  report.breaks.forEach((_b, x) => {
    if (current.length > 0 && used + groupWidth[x] > page) {
      blocks.push(current);
      current = [];
      used = base;
    }
    current.push(x);
    used += groupWidth[x];
  });
  if (current.length > 0) blocks.push(current);

  const cellText = (line: GridLine, j: number) => {
    const marks = markWidth[j] > 0 ? ' ' + padEnd(line.marks[j], markWidth[j]) : '';
    return padStart(padStart(line.values[j], valueWidth[j]) + marks, width[j]);
  };
  const labelLines = lines.map((l) => (l.label === '' ? [''] : (foldLabel(shownLabel(l.label), stub - 1, 6) ?? foldLabel(shownLabel(l.label), stub - 1, 99, true) ?? [l.label])));

  blocks.forEach((block, k) => {
    if (k > 0) out.push('');
    // Header: break names, level labels (two lines), keys.
    let names = padEnd('', stub) + padStart('', width[0] + GAP);
    let first = padEnd('', stub) + padStart('', width[0] + GAP);
    let second = padEnd('', stub) + padStart('Total', width[0] + GAP);
    let keys = padEnd('', stub) + padStart('', width[0] + GAP);
    for (const x of block) {
      const b = report.breaks[x];
      const span = groupWidth[x] - SEPARATOR.length;
      names += SEPARATOR + padEnd(' ' + shownLabel(b.name), span);
      first += SEPARATOR;
      second += SEPARATOR;
      keys += SEPARATOR;
      let filled = 0;
      for (let j = b.first; j < b.first + b.count; j++) {
        const h = header[j];
        first += padStart(h.length > 1 ? h[0] : '', width[j] + GAP);
        second += padStart(h[h.length - 1], width[j] + GAP);
        keys += padStart(`(${report.columns[j].key})`, width[j] + GAP);
        filled += width[j] + GAP;
      }
      first += ' '.repeat(Math.max(0, span - filled));
      second += ' '.repeat(Math.max(0, span - filled));
      keys += ' '.repeat(Math.max(0, span - filled));
    }
    out.push(paint.bold(names.trimEnd()));
    if (first.trim() !== '') out.push(paint.bold(first.trimEnd()));
    out.push(paint.bold(second.trimEnd()));
    out.push(paint.dim(keys.trimEnd()));
    lines.forEach((line, i) => {
      if (line.label.startsWith('base')) out.push(paint.dim('─'.repeat(Math.min(page, displayWidth(keys.trimEnd())))));
      let text = padEnd(labelLines[i][0], stub) + padStart(cellText(line, 0), width[0] + GAP);
      for (const x of block) {
        const b = report.breaks[x];
        text += SEPARATOR;
        let filled = 0;
        for (let j = b.first; j < b.first + b.count; j++) {
          text += padStart(cellText(line, j), width[j] + GAP);
          filled += width[j] + GAP;
        }
        text += ' '.repeat(Math.max(0, groupWidth[x] - SEPARATOR.length - filled));
      }
      out.push(line.strong ? paint.bold(text.trimEnd()) : text.trimEnd());
      for (const more of labelLines[i].slice(1)) out.push(more);
    });
  });
  for (const t of q.tests) out.push(...wrapText(associationWords(t, report.settings.alpha), page, '  ', '    '));
  return out;
}
