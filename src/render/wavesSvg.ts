import type { WaveRecord, WavesReport } from '../analysis/waves.js';
import { formatMeasure, formatP, formatPercent, formatRatio } from '../readableNumbers.js';
import { keyFor, shownLabel } from './layout.js';
import { escapeXml, FONT, textWidth } from './svg.js';
import { driftTestName } from './wavesWords.js';

/**
 * The pictures of a waves report as SVG strings: the series of V with its
 * interval band, the odds ratio over the waves (2×2), and each margin's
 * shares over the waves. Readable in print and by colour-blind readers:
 * every series differs by marker shape and dash pattern as well as colour
 * (Okabe & Ito's palette), lines are labelled directly, and every point
 * carries its value in a tooltip. Records in, markup out: the positions are
 * layout, the numbers come from the record.
 */

const WIDTH = 720;
const HEIGHT = 320;
const LEFT = 64;
const RIGHT_ROOM = 150;
const TOP = 40;
const BOTTOM = 78;
/** Okabe & Ito (2008), colour-blind safe, in an order that keeps neighbours apart in grey. */
const PALETTE = ['#0072B2', '#E69F00', '#009E73', '#CC79A7', '#56B4E9', '#D55E00', '#000000', '#F0E442'];
const DASHES = ['', '7 4', '2 3', '9 3 2 3', '4 4', '12 4', '1 4', '6 2 1 2'];
const BLUE = '#2166ac';
const BAND = '#c6dbef';
const ORANGE = '#b35806';
const MAX_LINES = 8;

function plotWidth(): number {
  return WIDTH - LEFT - RIGHT_ROOM;
}

/** x of each wave: by its score (time for dated waves), spread over the plot. */
function xPositions(report: WavesReport): number[] {
  const scores = report.waves.map((w) => w.score);
  const low = Math.min(...scores);
  const high = Math.max(...scores);
  const span = high - low || 1;
  return scores.map((s) => LEFT + 10 + ((s - low) / span) * (plotWidth() - 20));
}

/** The opening of a chart: as wide as its plot, or as its widest legend line. */
function open(kind: string, title: string, height: number, legend: readonly string[]): string[] {
  const width = Math.max(WIDTH, textWidth(title, 14) + 12, ...legend.map((l) => textWidth(l, 10) + 12));
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="${kind}" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}" role="img" aria-label="${escapeXml(title)}">`,
    `<text x="4" y="18" ${FONT} font-size="14" font-weight="600">${escapeXml(title)}</text>`,
  ];
}

/** Wave labels under the axis, thinned so that none overlap: the first and the last always, then others left to right where they fit. */
function waveAxis(report: WavesReport, xs: number[], bottom: number): string[] {
  const keys = report.waves.map((w) => shownLabel(w.key));
  const half = keys.map((k) => textWidth(k, 10) / 2);
  const parts = [`<line x1="${LEFT}" y1="${bottom}" x2="${LEFT + plotWidth()}" y2="${bottom}" stroke="#444" stroke-width="1"/>`];
  const last = keys.length - 1;
  const labelled = new Set([0, last]);
  let right = xs[0] + half[0];
  for (let k = 1; k < last; k++) {
    if (xs[k] - half[k] < right + 6 || xs[k] + half[k] > xs[last] - half[last] - 6) continue;
    labelled.add(k);
    right = xs[k] + half[k];
  }
  keys.forEach((key, k) => {
    const shown = labelled.has(k);
    parts.push(`<line x1="${xs[k].toFixed(1)}" y1="${bottom}" x2="${xs[k].toFixed(1)}" y2="${bottom + (shown ? 5 : 3)}" stroke="#444" stroke-width="0.8"/>`);
    if (!shown || (k === last && last > 0 && xs[last] - half[last] < xs[0] + half[0] + 6)) return;
    parts.push(`<text x="${xs[k].toFixed(1)}" y="${bottom + 17}" ${FONT} font-size="10" text-anchor="middle" fill="#333">${escapeXml(key)}</text>`);
  });
  return parts;
}

function gridLine(y: number, label: string): string {
  return `<line x1="${LEFT}" y1="${y.toFixed(1)}" x2="${LEFT + plotWidth()}" y2="${y.toFixed(1)}" stroke="#dddddd" stroke-width="0.8"/><text x="${LEFT - 6}" y="${(y + 3.5).toFixed(1)}" ${FONT} font-size="10" text-anchor="end" fill="#444">${escapeXml(label)}</text>`;
}

/** Runs of consecutive waves that have a value (a line breaks at a wave without one). */
function runs(values: (number | null)[]): number[][] {
  const out: number[][] = [];
  let current: number[] = [];
  values.forEach((v, k) => {
    if (v === null || !Number.isFinite(v)) {
      if (current.length > 0) out.push(current);
      current = [];
    } else current.push(k);
  });
  if (current.length > 0) out.push(current);
  return out;
}

function polyline(points: [number, number][], stroke: string, width: number, dash = ''): string {
  if (points.length === 0) return '';
  return `<polyline points="${points.map(([x, y]) => `${x.toFixed(1)},${y.toFixed(1)}`).join(' ')}" fill="none" stroke="${stroke}" stroke-width="${width}"${dash ? ` stroke-dasharray="${dash}"` : ''}/>`;
}

function marker(shape: number, x: number, y: number, fill: string, title: string): string {
  const t = `<title>${escapeXml(title)}</title>`;
  const p = (pts: [number, number][]) => `<polygon class="point" points="${pts.map(([a, b]) => `${(x + a).toFixed(1)},${(y + b).toFixed(1)}`).join(' ')}" fill="${fill}" stroke="#ffffff" stroke-width="0.8">${t}</polygon>`;
  switch (shape % 8) {
    case 0:
      return `<circle class="point" cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="3.6" fill="${fill}" stroke="#ffffff" stroke-width="0.8">${t}</circle>`;
    case 1:
      return `<rect class="point" x="${(x - 3.4).toFixed(1)}" y="${(y - 3.4).toFixed(1)}" width="6.8" height="6.8" fill="${fill}" stroke="#ffffff" stroke-width="0.8">${t}</rect>`;
    case 2:
      return p([[0, -4.5], [4, 3], [-4, 3]]);
    case 3:
      return p([[0, -4.5], [4.5, 0], [0, 4.5], [-4.5, 0]]);
    case 4:
      return p([[0, 4.5], [4, -3], [-4, -3]]);
    case 5:
      return p([[-1.5, -4.5], [1.5, -4.5], [1.5, -1.5], [4.5, -1.5], [4.5, 1.5], [1.5, 1.5], [1.5, 4.5], [-1.5, 4.5], [-1.5, 1.5], [-4.5, 1.5], [-4.5, -1.5], [-1.5, -1.5]]);
    case 6:
      return `<circle class="point" cx="${x.toFixed(1)}" cy="${y.toFixed(1)}" r="3.6" fill="#ffffff" stroke="${fill}" stroke-width="1.8">${t}</circle>`;
    default:
      return `<rect class="point" x="${(x - 3.4).toFixed(1)}" y="${(y - 3.4).toFixed(1)}" width="6.8" height="6.8" fill="#ffffff" stroke="${fill}" stroke-width="1.8">${t}</rect>`;
  }
}

/** Legend lines under a chart, one per line of text. */
function notes(lines: string[], top: number): string[] {
  return lines.map((line, k) => `<text x="4" y="${top + k * 13}" ${FONT} font-size="10" fill="#444">${escapeXml(line)}</text>`);
}

function testable(w: WaveRecord): w is Extract<WaveRecord, { testable: true }> {
  return w.testable;
}

/** Bias-corrected V wave by wave, with the interval of the population V as a band; waves that stand out ringed. */
export function vSeriesChart(report: WavesReport): string {
  const xs = xPositions(report);
  const v = report.waves.map((w) => (testable(w) ? w.measures.biasCorrectedV : null));
  const lower = report.waves.map((w) => (testable(w) ? (w.measures.cramersVInterval?.lower ?? null) : null));
  const upper = report.waves.map((w) => (testable(w) ? (w.measures.cramersVInterval?.upper ?? null) : null));
  const top = Math.min(1, Math.max(0.05, Math.ceil(Math.max(0, ...upper.map((u) => u ?? 0), ...v.map((x) => x ?? 0)) * 10 - 1e-9) / 10));
  const bottom = HEIGHT - BOTTOM;
  const y = (value: number) => bottom - (value / top) * (bottom - TOP);
  const standing = new Set((report.departures ?? []).filter((d) => d.standsOut).map((d) => d.wave));
  const confidence = `${Math.round(report.settings.confidence * 1000) / 10}%`;
  const legend = [
    `line and dots: bias-corrected V of each wave; band: ${confidence} interval of the population V (noncentral chi-square inversion)`,
    standing.size > 0 ? 'ringed in orange: waves that stand out from the others (Holm-adjusted)' : 'no wave stands out from the others (Holm-adjusted)',
    report.setup.scores.unit === 'year' ? 'waves placed at their dates' : 'waves evenly spaced',
  ];
  const height = HEIGHT - BOTTOM + 42 + legend.length * 13;
  const parts = open('waves-v', `Bias-corrected V over the ${report.waves.length} waves`, height, legend);
  const ticks = Math.round(top / 0.1) <= 6 ? 0.05 : 0.1;
  for (let t = 0; t <= top + 1e-9; t += ticks) parts.push(gridLine(y(t), formatMeasure(t).replace(/0+$/, '').replace(/\.$/, '')));
  for (const run of runs(report.waves.map((_w, k) => (lower[k] !== null && upper[k] !== null ? 1 : null)))) {
    const band = [...run.map((k) => [xs[k], y(upper[k]!)] as [number, number]), ...[...run].reverse().map((k) => [xs[k], y(lower[k]!)] as [number, number])];
    if (run.length === 1) {
      const k = run[0];
      parts.push(`<rect class="band" x="${(xs[k] - 3).toFixed(1)}" y="${y(upper[k]!).toFixed(1)}" width="6" height="${Math.max(1, y(lower[k]!) - y(upper[k]!)).toFixed(1)}" fill="${BAND}"/>`);
    } else parts.push(`<polygon class="band" points="${band.map(([a, b]) => `${a.toFixed(1)},${b.toFixed(1)}`).join(' ')}" fill="${BAND}" stroke="none"/>`);
  }
  for (const run of runs(v)) parts.push(polyline(run.map((k) => [xs[k], y(v[k]!)]), BLUE, 2));
  report.waves.forEach((w, k) => {
    if (v[k] === null) return;
    const interval = lower[k] !== null && upper[k] !== null ? `, interval ${formatMeasure(lower[k])} to ${formatMeasure(upper[k])}` : '';
    if (standing.has(k)) parts.push(`<circle cx="${xs[k].toFixed(1)}" cy="${y(v[k]!).toFixed(1)}" r="7.5" fill="none" stroke="${ORANGE}" stroke-width="2"/>`);
    parts.push(marker(0, xs[k], y(v[k]!), BLUE, `${w.key}: bias-corrected V ${formatMeasure(v[k])}${interval}`));
  });
  parts.push(...waveAxis(report, xs, bottom));
  parts.push(`<text x="${LEFT}" y="${TOP - 8}" ${FONT} font-size="10" fill="#444">bias-corrected V (0 none, 1 complete)</text>`);
  parts.push(...notes(legend, bottom + 38));
  parts.push('</svg>');
  return parts.join('');
}

/** Nice ticks of a log scale between two ratios. */
function ratioTicks(low: number, high: number): number[] {
  const out: number[] = [];
  for (let e = Math.floor(Math.log10(low)) - 1; e <= Math.ceil(Math.log10(high)) + 1; e++) {
    for (const m of [1, 2, 5]) {
      const t = m * 10 ** e;
      if (t >= low * 0.999 && t <= high * 1.001) out.push(t);
    }
  }
  return out;
}

/** 2×2: the odds ratio of each wave with its interval, on a log scale, with the common odds ratio and the fitted trend. */
export function oddsRatioChart(report: WavesReport): string | null {
  const waves = report.waves;
  const or = waves.map((w) => (testable(w) && w.measures.oddsRatio ? w.measures.oddsRatio : null));
  if (!or.some((x) => x !== null && Number.isFinite(x.estimate) && x.estimate > 0)) return null;
  const xs = xPositions(report);
  const common = report.sameAssociation?.equalOdds?.commonOddsRatio.estimate ?? null;
  const fitted = report.trend?.method === 'odds-ratio' ? report.trend.fitted : null;
  const values = [
    ...or.flatMap((x) => (x ? [x.lower, x.upper, x.estimate] : [])),
    ...(common !== null ? [common] : []),
    ...(fitted ?? []),
    1,
  ].filter((x) => Number.isFinite(x) && x > 0);
  const low = Math.min(...values);
  const high = Math.max(...values);
  const logLow = Math.log(low) - 0.05;
  const logHigh = Math.log(high) + 0.05;
  const bottom = HEIGHT - BOTTOM;
  const y = (value: number) => bottom - ((Math.log(value) - logLow) / (logHigh - logLow)) * (bottom - TOP);
  const confidence = `${Math.round(report.settings.confidence * 1000) / 10}%`;
  const legend = [
    `dots and bars: the odds ratio of each wave with its ${confidence} interval (log scale; 1 = no association)`,
    ...(common !== null ? [`dashed: the common odds ratio of all waves (Mantel–Haenszel), ${formatRatio(common)}`] : []),
    ...(fitted ? [`solid grey: the trend fitted to the log odds ratios (${report.designed ? 'GLS on their design-based variances' : 'Woolf-weighted regression'})`] : []),
    ...((report.departures ?? []).some((d) => d.standsOut) ? ['ringed in orange: waves that stand out from the common odds ratio (Holm-adjusted)'] : []),
  ];
  const height = HEIGHT - BOTTOM + 42 + legend.length * 13;
  const parts = open('waves-odds-ratio', `Odds ratio over the ${waves.length} waves`, height, legend);
  for (const t of ratioTicks(Math.exp(logLow), Math.exp(logHigh))) parts.push(gridLine(y(t), formatRatio(t).replace(/\.?0+$/, '')));
  if (low <= 1 && high >= 1) parts.push(`<line x1="${LEFT}" y1="${y(1).toFixed(1)}" x2="${LEFT + plotWidth()}" y2="${y(1).toFixed(1)}" stroke="#888" stroke-width="1.2"/>`);
  if (common !== null) parts.push(`<line x1="${LEFT}" y1="${y(common).toFixed(1)}" x2="${LEFT + plotWidth()}" y2="${y(common).toFixed(1)}" stroke="${ORANGE}" stroke-width="1.5" stroke-dasharray="7 4"/>`);
  if (fitted) parts.push(polyline(fitted.map((f, k) => [xs[k], y(f)]), '#666666', 1.8));
  const standing = new Set((report.departures ?? []).filter((d) => d.standsOut).map((d) => d.wave));
  or.forEach((x, k) => {
    if (!x || !(x.estimate > 0) || !Number.isFinite(x.estimate)) return;
    if (Number.isFinite(x.lower) && Number.isFinite(x.upper) && x.lower > 0) {
      parts.push(`<line class="interval" x1="${xs[k].toFixed(1)}" y1="${y(x.upper).toFixed(1)}" x2="${xs[k].toFixed(1)}" y2="${y(x.lower).toFixed(1)}" stroke="${BLUE}" stroke-width="1.4"/>`);
    }
    if (standing.has(k)) parts.push(`<circle cx="${xs[k].toFixed(1)}" cy="${y(x.estimate).toFixed(1)}" r="7.5" fill="none" stroke="${ORANGE}" stroke-width="2"/>`);
    parts.push(marker(1, xs[k], y(x.estimate), BLUE, `${waves[k].key}: odds ratio ${formatRatio(x.estimate)}, interval ${formatRatio(x.lower)} to ${formatRatio(x.upper)}`));
  });
  parts.push(...waveAxis(report, xs, bottom));
  parts.push(`<text x="${LEFT}" y="${TOP - 8}" ${FONT} font-size="10" fill="#444">odds ratio (log scale)</text>`);
  parts.push(...notes(legend, bottom + 38));
  parts.push('</svg>');
  return parts.join('');
}

/** One margin's shares over the waves: a line per level (the largest eight), each with its own colour, marker and dash, labelled at its end. */
export function marginChart(report: WavesReport, side: 'rows' | 'cols'): string | null {
  const drift = report.marginDrift[side];
  if (!drift) return null;
  const levels = report[side].levels;
  const name = report[side].name;
  const xs = xPositions(report);
  const totals = levels.map((_l, i) => drift.shares.reduce((s, wave) => s + (wave[i] ?? 0), 0));
  const shown = levels.map((_l, i) => i).sort((a, b) => totals[b] - totals[a] || a - b).slice(0, MAX_LINES).sort((a, b) => a - b);
  const top = Math.min(100, Math.max(10, Math.ceil(Math.max(0, ...drift.shares.flatMap((w) => shown.map((i) => w[i] ?? 0))) / 10 - 1e-9) * 10));
  const bottom = HEIGHT - BOTTOM;
  const y = (value: number) => bottom - (value / top) * (bottom - TOP);
  const left = levels.length - shown.length;
  const legend = [
    `share of each level of ${name} in each wave (percent of the wave)`,
    `${drift.drifted ? 'its distribution drifted over the waves' : 'no evidence its distribution drifted'} (${driftTestName(drift.test, name)}, p ${formatP(drift.pValue)})`,
    ...(left > 0 ? [`the ${left} smaller ${left === 1 ? 'level is' : 'levels are'} not drawn (see --format csv or json)`] : []),
  ];
  const labelX = LEFT + plotWidth() + 10;
  const room = WIDTH - labelX - 16;
  const keyed = shown.some((i) => textWidth(shownLabel(levels[i]), 10) > room);
  if (keyed) legend.push(...shown.map((i, line) => `${keyFor(line)} = ${shownLabel(levels[i])}`));
  const height = HEIGHT - BOTTOM + 42 + legend.length * 13;
  const parts = open('waves-margin', `Shares of ${shownLabel(name)} over the waves`, height, legend);
  for (let t = 0; t <= top + 1e-9; t += top > 50 ? 20 : 10) parts.push(gridLine(y(t), `${t}%`));
  const ends: { y: number; label: string; colour: string; shape: number }[] = [];
  shown.forEach((i, line) => {
    const colour = PALETTE[line % PALETTE.length];
    const values = drift.shares.map((w) => w[i]);
    for (const run of runs(values)) parts.push(polyline(run.map((k) => [xs[k], y(values[k]!)]), colour, 1.8, DASHES[line % DASHES.length]));
    values.forEach((v, k) => {
      if (v !== null) parts.push(marker(line, xs[k], y(v), colour, `${report.waves[k].key}: ${shownLabel(levels[i])} ${formatPercent(v)}`));
    });
    const last = [...values].reverse().find((v) => v !== null);
    if (last !== undefined && last !== null) ends.push({ y: y(last), label: shownLabel(levels[i]), colour, shape: line });
  });
  // Direct labels at the right, pushed apart so that none overlap; keys (A, B, …) with a legend when a label does not fit.
  ends.sort((a, b) => a.y - b.y);
  for (let k = 1; k < ends.length; k++) ends[k].y = Math.max(ends[k].y, ends[k - 1].y + 13);
  for (const end of ends) {
    parts.push(marker(end.shape, labelX + 4, end.y - 3.5, end.colour, end.label));
    parts.push(`<text x="${labelX + 12}" y="${end.y.toFixed(1)}" ${FONT} font-size="10" fill="#222">${escapeXml(keyed ? keyFor(end.shape) : end.label)}</text>`);
  }
  parts.push(...waveAxis(report, xs, bottom));
  parts.push(...notes(legend, bottom + 38));
  parts.push('</svg>');
  return parts.join('');
}

/** Every picture of the report, in page order. */
export function wavesCharts(report: WavesReport): string[] {
  return [vSeriesChart(report), oddsRatioChart(report), marginChart(report, 'rows'), marginChart(report, 'cols')].filter((c): c is string => c !== null);
}
