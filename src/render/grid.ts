/**
 * A two-way grid laid out by display width within the page: labels folded or
 * keyed, wide tables split.
 */
import { displayWidth, foldLabel, keyFor, padEnd, padStart, shownLabel, wrapText } from './layout.js';

/**
 * A two-way grid laid out by display width within a page width: row labels
 * in a stub on the left (long ones folded onto further lines), column labels
 * folded onto up to three header lines, or replaced by short keys with a
 * legend when they cannot be shown whole; columns split into blocks when the
 * grid is wider than the page. Nothing is clipped.
 */
export interface GridSpec {
  rowTitle: string;
  colTitle: string;
  rowLabels: readonly string[];
  colLabels: readonly string[];
  /** Cell texts, already formatted (may carry colour codes). */
  cells: readonly (readonly string[])[];
  /** A margin column on the right. */
  rowMargin?: { title: string; cells: readonly string[] };
  /** A margin row below, under a rule; `corner` is its cell in the margin column. */
  colMargin?: { title: string; cells: readonly string[]; corner?: string };
  /** Styling hooks (bold headers, dim rules); identity by default. */
  strong?: (s: string) => string;
  faint?: (s: string) => string;
}

const HEADER_LINES = 3;
const GAP = 2;

export function renderGrid(given: GridSpec, page: number): string[] {
  const spec = { ...given, rowLabels: given.rowLabels.map(shownLabel), colLabels: given.colLabels.map(shownLabel), rowTitle: shownLabel(given.rowTitle), colTitle: shownLabel(given.colTitle) };
  const strong = spec.strong ?? ((s: string) => s);
  const faint = spec.faint ?? ((s: string) => s);
  const columns = spec.colLabels.length;
  const cellWidth = Math.max(1, ...spec.cells.flatMap((row) => row.map(displayWidth)), ...(spec.colMargin?.cells ?? []).map(displayWidth));
  const marginWidth = spec.rowMargin
    ? Math.max(displayWidth(spec.rowMargin.title), ...spec.rowMargin.cells.map(displayWidth), displayWidth(spec.colMargin?.corner ?? ''))
    : 0;

  // The stub: as wide as the longest row label, up to about a third of the page.
  const stubLimit = Math.max(10, Math.floor(page * 0.3));
  const stubNeed = Math.max(...spec.rowLabels.map(displayWidth), displayWidth(spec.rowTitle), spec.colMargin ? displayWidth(spec.colMargin.title) : 0);
  const stub = Math.min(stubNeed, stubLimit) + 1;

  // Column labels: folded into up to three lines of a column a little wider
  // than the numbers need; otherwise keys with a legend.
  const room = page - stub - (spec.rowMargin ? marginWidth + 3 : 0);
  const widest = Math.max(cellWidth, Math.min(16, Math.max(cellWidth, Math.floor(room / Math.max(1, columns)) - GAP)));
  let labelWidth = cellWidth;
  let folded: string[][] | null = null;
  // Whole words first, in a column that fits the page; then whole words in a column up to 16 wide (the
  // table then splits into blocks of columns); words broken by display width only when neither keeps them whole.
  for (const [breakWords, limit] of [[false, widest], [false, Math.max(widest, 16)], [true, widest]] as const) {
    for (let w = cellWidth; w <= limit && folded === null; w++) {
      const attempt = spec.colLabels.map((l) => foldLabel(l, w, HEADER_LINES, breakWords));
      if (attempt.every((x) => x !== null)) {
        folded = attempt as string[][];
        labelWidth = w;
      }
    }
  }
  const keyed = folded === null;
  if (keyed) {
    folded = spec.colLabels.map((_l, j) => [keyFor(j)]);
    labelWidth = Math.max(cellWidth, ...folded.map((f) => displayWidth(f[0])));
  }
  const columnWidth = labelWidth + GAP;

  // Blocks of columns that fit the page.
  const blocks: number[][] = [];
  let current: number[] = [];
  let used = stub;
  for (let j = 0; j < columns; j++) {
    const lastColumn = j === columns - 1;
    const extra = lastColumn && spec.rowMargin ? marginWidth + 3 : 0;
    if (current.length > 0 && used + columnWidth + extra > page) {
      blocks.push(current);
      current = [];
      used = stub;
    }
    current.push(j);
    used += columnWidth;
  }
  blocks.push(current);

  const lines: string[] = [];
  const rowLabelLines = spec.rowLabels.map((l) => foldLabel(l, stub - 1, Number.MAX_SAFE_INTEGER) ?? [l]);
  blocks.forEach((block, b) => {
    const last = b === blocks.length - 1;
    const withMargin = last && spec.rowMargin !== undefined;
    if (b > 0) lines.push('');
    if (blocks.length > 1) lines.push(faint(`columns ${block[0] + 1}–${block[block.length - 1] + 1} of ${columns}`));
    const blockWidth = block.length * columnWidth + (withMargin ? marginWidth + 3 : 0);
    if (spec.colTitle !== '') lines.push(padEnd('', stub) + faint(spec.colTitle));
    void blockWidth;
    const height = Math.max(...block.map((j) => (folded as string[][])[j].length));
    for (let k = 0; k < height; k++) {
      const isLast = k === height - 1;
      let line = isLast ? padEnd(spec.rowTitle, stub) : padEnd('', stub);
      for (const j of block) {
        const label = (folded as string[][])[j];
        const text = label[k - (height - label.length)] ?? '';
        line += padStart(text, columnWidth);
      }
      if (withMargin) line += isLast ? ' │ ' + padStart(spec.rowMargin!.title, marginWidth) : ' │';
      lines.push(strong(line.trimEnd()));
    }
    spec.rowLabels.forEach((_label, i) => {
      const labelLines = rowLabelLines[i];
      let line = padEnd(labelLines[0], stub);
      for (const j of block) line += padStart(spec.cells[i][j], columnWidth);
      if (withMargin) line += faint(' │ ') + padStart(spec.rowMargin!.cells[i], marginWidth);
      lines.push(line.trimEnd());
      for (const more of labelLines.slice(1)) lines.push(more);
    });
    if (spec.colMargin) {
      lines.push(faint('─'.repeat(stub + block.length * columnWidth) + (withMargin ? '─┼─' + '─'.repeat(marginWidth) : '')));
      let line = padEnd(spec.colMargin.title, stub);
      for (const j of block) line += padStart(spec.colMargin.cells[j], columnWidth);
      if (withMargin) line += faint(' │ ') + padStart(spec.colMargin.corner ?? '', marginWidth);
      lines.push(line);
    }
  });
  if (keyed) {
    lines.push('');
    spec.colLabels.forEach((label, j) => lines.push(...wrapText(label, page, faint(padEnd(keyFor(j), 4)), '    ')));
  }
  return lines;
}
