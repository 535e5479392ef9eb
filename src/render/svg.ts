/**
 * The pictures as SVG: the heat map of adjusted residuals, the mosaic plot,
 * the ranked strength chart.
 */
import type { AnalysisRecord } from '../analysis/analyzeTable.js';
import type { ScanReport } from '../analysis/scan.js';
import { formatCount, formatMeasure, formatSigned, UNDEFINED } from '../readableNumbers.js';
import { displayWidth, foldLabel, keyFor, LONG_LABEL, shownLabel } from './layout.js';
import { ADJUSTMENT_NAMES, trimZeros } from './words.js';

/** Pictures as SVG strings: records in, markup out, nothing computed beyond layout. */

/** Text from the data in SVG and HTML: src/escape/markup.ts (well-formed with any characters, never markup). */
export { escapeXml } from '../escape/markup.js';
import { escapeXml } from '../escape/markup.js';

/**
 * A diverging pair that colour-blind readers tell apart: blue for more than
 * independence predicts, orange for fewer (the ends of ColorBrewer's PuOr
 * and RdBu schemes, both marked colour-blind safe; Brewer 2003).
 */
const ABOVE = [33, 102, 172]; // #2166ac
const BELOW = [179, 88, 6]; // #b35806
export const FONT = 'font-family="system-ui, -apple-system, Segoe UI, sans-serif"';

/** Width of text in pixels at a font size, from its display width (a wide character counts two). */
export function textWidth(text: string, size: number): number {
  if (text.length > 4 * LONG_LABEL) return Math.ceil(text.length * size * 0.62);
  return Math.ceil(displayWidth(text) * size * 0.62);
}

type ResidualSource = Pick<AnalysisRecord, 'rows' | 'cols' | 'residuals' | 'findings'>;

/**
 * The colour scale's end: the largest |residual| of the table, and at least
 * one past the adjusted critical value, so that a table whose every cell is
 * far beyond ±4 still shows which cells are further.
 */
export function residualScale(record: ResidualSource): number {
  const largest = Math.max(0, ...record.residuals.adjusted.flat().map((v) => (v === null ? 0 : Math.abs(v))));
  return Math.max(Math.ceil(record.findings.cellThreshold.adjusted) + 1, Math.ceil(largest));
}

/** Fill for an adjusted residual: white at 0, full colour at the scale's end; the sign picks the hue. */
export function residualFill(r: number | null, scale: number): string {
  if (r === null) return '#eeeeee';
  const t = Math.min(1, Math.abs(r) / scale);
  const [cr, cg, cb] = r >= 0 ? ABOVE : BELOW;
  const mix = (c: number) => Math.round(255 + (c - 255) * t);
  return `rgb(${mix(cr)},${mix(cg)},${mix(cb)})`;
}

function textColour(r: number | null, scale: number): string {
  return r !== null && Math.abs(r) / scale > 0.55 ? '#ffffff' : '#222222';
}

/** The same marks as the text report, at the record's thresholds. */
function mark(r: number | null, record: ResidualSource): string {
  const t = record.findings.cellThreshold;
  if (r === null) return '';
  const size = Math.abs(r);
  if (size > t.adjusted) return r > 0 ? '▲▲' : '▼▼';
  if (size > t.single) return r > 0 ? '▲' : '▼';
  return '';
}

/** Column labels folded onto up to three lines of a cell's width, or keys (A, B, …) with a legend. */
function columnLabels(labels: readonly string[], cellPixels: number, size: number): { lines: string[][]; keyed: boolean } {
  const chars = Math.max(3, Math.floor(cellPixels / (size * 0.62)));
  const folded = labels.map((l) => foldLabel(l, chars, 3));
  if (folded.every((f) => f !== null)) return { lines: folded as string[][], keyed: false };
  return { lines: labels.map((_l, j) => [keyFor(j)]), keyed: true };
}

/** A legend gradient from −scale to +scale with ticks at the thresholds the text marks use. */
function legend(record: ResidualSource, x: number, y: number, width: number, scale: number): string {
  const parts: string[] = [];
  const steps = 24;
  for (let k = 0; k < steps; k++) {
    const value = -scale + ((k + 0.5) * 2 * scale) / steps;
    parts.push(`<rect x="${(x + (k * width) / steps).toFixed(2)}" y="${y}" width="${(width / steps + 0.5).toFixed(2)}" height="10" fill="${residualFill(value, scale)}"/>`);
  }
  const t = record.findings.cellThreshold;
  const ticks = [-scale, -t.adjusted, -t.single, 0, t.single, t.adjusted, scale];
  for (const v of ticks) {
    const px = x + ((v + scale) / (2 * scale)) * width;
    parts.push(`<line x1="${px.toFixed(2)}" y1="${y}" x2="${px.toFixed(2)}" y2="${y + 14}" stroke="#444" stroke-width="0.8"/>`);
    parts.push(`<text x="${px.toFixed(2)}" y="${y + 25}" ${FONT} font-size="9" text-anchor="middle" fill="#444">${escapeXml(v === 0 ? '0' : formatSigned(v, v === scale || v === -scale ? 0 : 2).replace(/\.?0+$/, ''))}</text>`);
  }
  return parts.join('');
}

/** Heat map of adjusted residuals, rows down, columns across, each cell labelled with its value and mark. */
function shownRecord<T extends Pick<AnalysisRecord, 'rows' | 'cols'>>(record: T): T {
  return { ...record, rows: { name: shownLabel(record.rows.name), levels: record.rows.levels.map(shownLabel) }, cols: { name: shownLabel(record.cols.name), levels: record.cols.levels.map(shownLabel) } };
}

export function residualHeatMap(given: ResidualSource, title = 'Adjusted residuals'): string {
  const record = shownRecord(given);
  const cell = 68;
  const size = 11;
  const scale = residualScale(record);
  const r = record.rows.levels.length;
  const c = record.cols.levels.length;
  const rowLabelWidth = Math.min(320, Math.max(40, ...record.rows.levels.map((l) => textWidth(l, size))));
  const rowLines = record.rows.levels.map((l) => (textWidth(l, size) <= rowLabelWidth ? [l] : (foldLabel(l, Math.floor(rowLabelWidth / (size * 0.62)), 3) ?? [l])));
  const cols = columnLabels(record.cols.levels, cell - 6, size);
  const headerLines = Math.max(...cols.lines.map((l) => l.length));
  const left = rowLabelWidth + 16;
  const top = 48 + headerLines * 13;
  const t = record.findings.cellThreshold;
  const legendText = `blue: more than independence predicts · orange: fewer · ▲▲ ▼▼ beyond ±${trimZeros(t.adjusted.toFixed(2))} (Bonferroni for ${t.cells} cells), ▲ ▼ beyond ±${trimZeros(t.single.toFixed(2))} · full colour at ±${scale}`;
  const keyLines = cols.keyed ? record.cols.levels.map((l, j) => `${keyFor(j)} = ${l}`) : [];
  const width = Math.max(left + c * cell + 20, textWidth(legendText, 10) + 12, textWidth(title, 14) + 12, ...keyLines.map((l) => textWidth(l, 10) + 12), 260);
  const gridBottom = top + r * cell;
  const height = gridBottom + 56 + keyLines.length * 13 + 18;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" class="heat-map" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeXml(title)}">`);
  parts.push(`<text x="4" y="18" ${FONT} font-size="14" font-weight="600">${escapeXml(title)}</text>`);
  parts.push(`<text x="${left}" y="36" ${FONT} font-size="${size}" fill="#555">${escapeXml(record.cols.name)} →</text>`);
  cols.lines.forEach((lines, j) => {
    lines.forEach((line, k) => {
      const y = top - 8 - (lines.length - 1 - k) * 13;
      parts.push(`<text x="${left + j * cell + cell / 2}" y="${y}" ${FONT} font-size="${size}" text-anchor="middle">${escapeXml(line)}</text>`);
    });
  });
  parts.push(`<text x="4" y="${top - 8}" ${FONT} font-size="${size}" fill="#555">${escapeXml(record.rows.name)} ↓</text>`);
  record.rows.levels.forEach((level, i) => {
    const lines = rowLines[i];
    lines.forEach((line, k) => {
      parts.push(`<text x="${left - 8}" y="${top + i * cell + cell / 2 + 4 + (k - (lines.length - 1) / 2) * 13}" ${FONT} font-size="${size}" text-anchor="end">${escapeXml(line)}</text>`);
    });
    record.residuals.adjusted[i].forEach((v, j) => {
      const x = left + j * cell;
      const y = top + i * cell;
      const label = v === null ? UNDEFINED : `${mark(v, record)} ${formatSigned(v, 1)}`.trim();
      parts.push(`<rect class="cell" x="${x}" y="${y}" width="${cell - 2}" height="${cell - 2}" fill="${residualFill(v, scale)}"><title>${escapeXml(`${level} × ${record.cols.levels[j]}: ${v === null ? UNDEFINED : formatSigned(v, 2)}`)}</title></rect>`);
      parts.push(`<text x="${x + cell / 2 - 1}" y="${y + cell / 2 + 4}" ${FONT} font-size="12" text-anchor="middle" fill="${textColour(v, scale)}">${escapeXml(label)}</text>`);
    });
  });
  parts.push(legend(record, left, gridBottom + 12, Math.max(160, Math.min(c * cell, 360)), scale));
  parts.push(`<text x="4" y="${gridBottom + 54}" ${FONT} font-size="10" fill="#555">${escapeXml(legendText)}</text>`);
  keyLines.forEach((line, k) => parts.push(`<text x="4" y="${gridBottom + 68 + k * 13}" ${FONT} font-size="10" fill="#555">${escapeXml(line)}</text>`));
  parts.push('</svg>');
  return parts.join('');
}

/**
 * Mosaic plot: one vertical band per row level, as wide as its share of the
 * table; inside it, one tile per column level, as tall as its share of the
 * row. Tiles are shaded by their adjusted residual on the heat map's scale.
 * A label that does not fit its band or tile is replaced by a number keyed
 * in a legend below, never cut.
 */
export function mosaicPlot(given: Pick<AnalysisRecord, 'rows' | 'cols' | 'counts' | 'rowTotals' | 'residuals' | 'n' | 'findings'>, title = 'Mosaic of the table'): string {
  const record = shownRecord(given);
  const plotWidth = 520;
  const plotHeight = 300;
  const left = 20;
  const top = 40;
  const gap = 3;
  const scale = residualScale(record);
  const rowTotals = record.rowTotals;
  const usable = plotWidth - left - 20 - gap * (record.rows.levels.length - 1);
  const bandWidths = record.rows.levels.map((_l, i) => (record.n > 0 ? (usable * rowTotals[i]) / record.n : 0));
  const bandKeyed = record.rows.levels.some((l, i) => textWidth(l, 11) > bandWidths[i]);
  const legendLines = [
    `band width: share of ${record.rows.name}; tile height: share of ${record.cols.name} within the band; colour: adjusted residual (blue above, orange below independence)`,
    ...(bandKeyed ? record.rows.levels.map((l, i) => `${i + 1} = ${l}`) : []),
    ...record.cols.levels.map((l, j) => `${keyFor(j, 'a')} = ${l}`),
  ];
  const width = Math.max(plotWidth, ...legendLines.map((l) => textWidth(l, 10) + 12));
  const height = top + plotHeight + 40 + legendLines.length * 13;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" class="mosaic" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeXml(title)}">`);
  parts.push(`<text x="4" y="18" ${FONT} font-size="14" font-weight="600">${escapeXml(title)}</text>`);
  let x = left;
  record.rows.levels.forEach((level, i) => {
    const w = bandWidths[i];
    let y = top;
    const gapsDown = gap * (record.cols.levels.length - 1);
    record.counts[i].forEach((count, j) => {
      const h = rowTotals[i] > 0 ? ((plotHeight - gapsDown) * count) / rowTotals[i] : 0;
      const residual = record.residuals.adjusted[i][j];
      parts.push(`<rect class="tile" x="${x.toFixed(2)}" y="${y.toFixed(2)}" width="${Math.max(0, w).toFixed(2)}" height="${Math.max(0, h).toFixed(2)}" fill="${residualFill(residual, scale)}" stroke="#666" stroke-width="0.5"><title>${escapeXml(`${level} × ${record.cols.levels[j]}: ${formatCount(count)}`)}</title></rect>`);
      const key = keyFor(j, 'a');
      if (h > 14 && w > textWidth(key, 10) + 6) parts.push(`<text x="${(x + 4).toFixed(2)}" y="${(y + 12).toFixed(2)}" ${FONT} font-size="10" fill="${textColour(residual, scale)}">${escapeXml(key)}</text>`);
      y += h + gap;
    });
    const bandLabel = bandKeyed ? String(i + 1) : level;
    parts.push(`<text x="${(x + w / 2).toFixed(2)}" y="${top + plotHeight + 18}" ${FONT} font-size="11" text-anchor="middle">${escapeXml(bandLabel)}</text>`);
    x += w + gap;
  });
  legendLines.forEach((line, k) => parts.push(`<text x="4" y="${top + plotHeight + 40 + k * 13}" ${FONT} font-size="10" fill="#555">${escapeXml(line)}</text>`));
  parts.push('</svg>');
  return parts.join('');
}

/** Ranked bars of bias-corrected V for the strongest pairs of a scan; passing pairs in blue, with a mark. */
export function strengthChart(report: ScanReport, limit = 30): string {
  const pairs = report.pairs.slice(0, limit);
  const rowHeight = 22;
  const names = pairs.map((p) => `${shownLabel(p.rows.name)} × ${shownLabel(p.cols.name)}`);
  const left = Math.min(520, Math.max(120, ...names.map((n) => textWidth(n, 11) + 24)));
  const barWidth = 300;
  const top = 36;
  const note = `✓ and blue: passes after ${ADJUSTMENT_NAMES[report.adjustment]} at α ${report.alpha}; grey: does not. ${report.pairsPassing} of ${report.pairsTested} pairs pass in all.`;
  const width = Math.max(left + barWidth + 70, textWidth(note, 10) + 12);
  const height = top + pairs.length * rowHeight + 40;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" class="strength-chart" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="Pairs by bias-corrected V">`);
  parts.push(`<text x="4" y="18" ${FONT} font-size="14" font-weight="600">Pairs by bias-corrected V, strongest first</text>`);
  pairs.forEach((p, k) => {
    const y = top + k * rowHeight;
    const v = p.measures.biasCorrectedV ?? 0;
    const label = (p.passes ? '✓ ' : '') + names[k];
    parts.push(`<text x="${left - 8}" y="${y + 15}" ${FONT} font-size="11" text-anchor="end" fill="${p.passes ? '#222' : '#777'}">${escapeXml(label)}</text>`);
    parts.push(`<rect class="bar" x="${left}" y="${y + 3}" width="${Math.max(1, barWidth * Math.min(1, v)).toFixed(2)}" height="${rowHeight - 6}" fill="${p.passes ? 'rgb(33,102,172)' : 'rgb(180,180,180)'}"><title>${escapeXml(`${names[k]}: ${formatMeasure(v)}`)}</title></rect>`);
    parts.push(`<text x="${left + barWidth * Math.min(1, v) + 6}" y="${y + 15}" ${FONT} font-size="11">${formatMeasure(v)}</text>`);
  });
  parts.push(`<text x="4" y="${height - 12}" ${FONT} font-size="10" fill="#555">${escapeXml(note)}</text>`);
  parts.push('</svg>');
  return parts.join('');
}

/** Several SVG pictures stacked into one standalone SVG document. */
export function stackSvg(pictures: string[]): string {
  let y = 0;
  let width = 0;
  const placed = pictures.map((svg) => {
    const w = Number(/width="([\d.]+)"/.exec(svg)?.[1] ?? 0);
    const h = Number(/height="([\d.]+)"/.exec(svg)?.[1] ?? 0);
    const out = svg.replace('<svg ', `<svg x="0" y="${y}" `);
    y += h + 16;
    width = Math.max(width, w);
    return out;
  });
  return `<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${y}" viewBox="0 0 ${width} ${y}">${placed.join('')}</svg>\n`;
}
