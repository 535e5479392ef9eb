import type { AnalysisRecord } from '../analysis/analyzeTable.js';
import type { ScanReport } from '../analysis/scan.js';
import { clip, formatMeasure } from './format.js';

/** Pictures as SVG strings: records in, markup out, nothing computed beyond layout. */

export function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;');
}

const ABOVE = [43, 122, 120]; // teal: more than independence predicts
const BELOW = [196, 90, 56]; // rust: fewer
const FONT = 'font-family="system-ui, -apple-system, Segoe UI, sans-serif"';

/** Fill for an adjusted residual: white at 0, full colour from |r| = 4; the sign picks the hue. */
export function residualFill(r: number | null): string {
  if (r === null) return '#eeeeee';
  const t = Math.min(1, Math.abs(r) / 4);
  const [cr, cg, cb] = r >= 0 ? ABOVE : BELOW;
  const mix = (c: number) => Math.round(255 + (c - 255) * t);
  return `rgb(${mix(cr)},${mix(cg)},${mix(cb)})`;
}

function textColour(r: number | null): string {
  return r !== null && Math.abs(r) > 2.5 ? '#ffffff' : '#222222';
}

/** Heat map of adjusted residuals, rows down, columns across, each cell labelled. */
export function residualHeatMap(record: Pick<AnalysisRecord, 'rows' | 'cols' | 'residuals'>, title = 'Adjusted residuals'): string {
  const cell = 64;
  const left = 130;
  const top = 70;
  const r = record.rows.levels.length;
  const c = record.cols.levels.length;
  const width = left + c * cell + 20;
  const height = top + r * cell + 40;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" class="heat-map" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeXml(title)}">`);
  parts.push(`<text x="4" y="18" ${FONT} font-size="14" font-weight="600">${escapeXml(title)}</text>`);
  record.cols.levels.forEach((l, j) => {
    parts.push(`<text x="${left + j * cell + cell / 2}" y="${top - 8}" ${FONT} font-size="11" text-anchor="middle">${escapeXml(clip(l, 10))}</text>`);
  });
  parts.push(`<text x="${left}" y="${top - 30}" ${FONT} font-size="11" fill="#555">${escapeXml(clip(record.cols.name, 40))} →</text>`);
  record.rows.levels.forEach((l, i) => {
    parts.push(`<text x="${left - 8}" y="${top + i * cell + cell / 2 + 4}" ${FONT} font-size="11" text-anchor="end">${escapeXml(clip(l, 18))}</text>`);
    record.residuals.adjusted[i].forEach((v, j) => {
      const x = left + j * cell;
      const y = top + i * cell;
      parts.push(`<rect class="cell" x="${x}" y="${y}" width="${cell - 2}" height="${cell - 2}" fill="${residualFill(v)}"><title>${escapeXml(`${l} × ${record.cols.levels[j]}: ${v === null ? '—' : v.toFixed(2)}`)}</title></rect>`);
      parts.push(`<text x="${x + cell / 2 - 1}" y="${y + cell / 2 + 4}" ${FONT} font-size="12" text-anchor="middle" fill="${textColour(v)}">${v === null ? '—' : (v > 0 ? '+' : '') + v.toFixed(1)}</text>`);
    });
  });
  parts.push(`<text x="4" y="${height - 12}" ${FONT} font-size="10" fill="#555">teal: more than independence predicts · rust: fewer · full colour at ±4</text>`);
  parts.push('</svg>');
  return parts.join('');
}

/**
 * Mosaic plot: one vertical band per row level, as wide as its share of the
 * table; inside it, one tile per column level, as tall as its share of the
 * row. Tiles are shaded by their adjusted residual.
 */
export function mosaicPlot(record: Pick<AnalysisRecord, 'rows' | 'cols' | 'counts' | 'rowTotals' | 'residuals' | 'n'>, title = 'Mosaic of the table'): string {
  const width = 520;
  const plotHeight = 300;
  const left = 20;
  const top = 40;
  const gap = 3;
  const rowTotals = record.rowTotals;
  const usable = width - left - 20 - gap * (record.rows.levels.length - 1);
  const parts: string[] = [];
  const height = top + plotHeight + 60;
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" class="mosaic" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeXml(title)}">`);
  parts.push(`<text x="4" y="18" ${FONT} font-size="14" font-weight="600">${escapeXml(title)}</text>`);
  let x = left;
  record.rows.levels.forEach((level, i) => {
    const w = record.n > 0 ? (usable * rowTotals[i]) / record.n : 0;
    let y = top;
    const gapsDown = gap * (record.cols.levels.length - 1);
    record.counts[i].forEach((count, j) => {
      const h = rowTotals[i] > 0 ? ((plotHeight - gapsDown) * count) / rowTotals[i] : 0;
      const residual = record.residuals.adjusted[i][j];
      parts.push(`<rect class="tile" x="${x.toFixed(2)}" y="${y.toFixed(2)}" width="${Math.max(0, w).toFixed(2)}" height="${Math.max(0, h).toFixed(2)}" fill="${residualFill(residual)}" stroke="#666" stroke-width="0.5"><title>${escapeXml(`${level} × ${record.cols.levels[j]}: ${count}`)}</title></rect>`);
      if (h > 14 && w > 40) parts.push(`<text x="${(x + 4).toFixed(2)}" y="${(y + 12).toFixed(2)}" ${FONT} font-size="10" fill="${textColour(residual)}">${escapeXml(clip(record.cols.levels[j], Math.floor(w / 7)))}</text>`);
      y += h + gap;
    });
    parts.push(`<text x="${(x + w / 2).toFixed(2)}" y="${top + plotHeight + 18}" ${FONT} font-size="11" text-anchor="middle">${escapeXml(clip(level, Math.max(3, Math.floor(w / 7))))}</text>`);
    x += w + gap;
  });
  parts.push(`<text x="4" y="${height - 12}" ${FONT} font-size="10" fill="#555">band width: share of ${escapeXml(clip(record.rows.name, 30))}; tile height: share of ${escapeXml(clip(record.cols.name, 30))} within the band</text>`);
  parts.push('</svg>');
  return parts.join('');
}

/** Ranked bars of bias-corrected V for the strongest pairs of a scan. */
export function strengthChart(report: ScanReport, limit = 30): string {
  const pairs = report.pairs.slice(0, limit);
  const rowHeight = 22;
  const left = 280;
  const barWidth = 300;
  const top = 36;
  const width = left + barWidth + 70;
  const height = top + pairs.length * rowHeight + 40;
  const parts: string[] = [];
  parts.push(`<svg xmlns="http://www.w3.org/2000/svg" class="strength-chart" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="Pairs by bias-corrected V">`);
  parts.push(`<text x="4" y="18" ${FONT} font-size="14" font-weight="600">Pairs by bias-corrected V, strongest first</text>`);
  pairs.forEach((p, k) => {
    const y = top + k * rowHeight;
    const v = p.measures.biasCorrectedV ?? 0;
    parts.push(`<text x="${left - 8}" y="${y + 15}" ${FONT} font-size="11" text-anchor="end" fill="${p.passes ? '#222' : '#888'}">${escapeXml(clip(`${p.rows.name} × ${p.cols.name}`, 44))}</text>`);
    parts.push(`<rect class="bar" x="${left}" y="${y + 3}" width="${Math.max(1, barWidth * Math.min(1, v)).toFixed(2)}" height="${rowHeight - 6}" fill="${p.passes ? 'rgb(43,122,120)' : 'rgb(180,180,180)'}"><title>${escapeXml(`${p.rows.name} × ${p.cols.name}: ${formatMeasure(v)}`)}</title></rect>`);
    parts.push(`<text x="${left + barWidth * Math.min(1, v) + 6}" y="${y + 15}" ${FONT} font-size="11">${formatMeasure(v)}</text>`);
  });
  parts.push(`<text x="4" y="${height - 12}" ${FONT} font-size="10" fill="#555">grey bars do not pass after ${escapeXml(report.adjustment)} adjustment at α ${report.alpha}</text>`);
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
