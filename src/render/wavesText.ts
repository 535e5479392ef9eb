import type { ChalkInstance } from 'chalk';
import type { WaveRecord, WavesReport } from '../analysis/waves.js';
import { formatCount, formatMeasure, formatP, formatRatio, formatSigned, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { shiftWords } from './compareText.js';
import { displayWidth, glued, padEnd, padStart, shownLabel, wrapText } from './layout.js';
import { cautionLines, heading } from './pairText.js';
import { strengthBar } from './scanTable.js';
import { acrossTests, dfWords, latestHeadline, levelsWords, patternHeadline, setupWords, slopeWords, wavesStatementWords, weightingWords } from './wavesWords.js';

const BAR = 10;
/** A wave key longer than this is shown by its number, with a key below the series. */
const LONG_KEY = 24;

/** The scale of the V bars: the largest interval end (or V) of the series, rounded up to a twentieth, at most 1. */
export function barScale(report: WavesReport): number {
  let top = 0;
  for (const w of report.waves) {
    if (!w.testable) continue;
    top = Math.max(top, w.measures.cramersVInterval?.upper ?? 0, w.measures.biasCorrectedV ?? 0);
  }
  return Math.min(1, Math.max(0.05, Math.ceil(top * 20 - 1e-9) / 20));
}

interface Column {
  title: string;
  align: 'left' | 'right';
  cells: string[];
}

/** Columns laid out by display width; columns after the first that do not fit the page are left out (named below). */
function columnsWithin(columns: Column[], width: number, paint: ChalkInstance): { lines: string[]; dropped: string[] } {
  const widths = columns.map((c) => Math.max(displayWidth(c.title), ...c.cells.map(displayWidth)));
  const kept: number[] = [];
  let used = 0;
  const dropped: string[] = [];
  columns.forEach((c, k) => {
    const need = widths[k] + (kept.length > 0 ? 2 : 0);
    if (kept.length === 0 || used + need <= width) {
      kept.push(k);
      used += need;
    } else dropped.push(c.title.trim());
  });
  const cell = (k: number, text: string) => (columns[k].align === 'left' ? padEnd(text, widths[k]) : padStart(text, widths[k]));
  const lines = [paint.bold(kept.map((k) => cell(k, columns[k].title)).join('  ').trimEnd())];
  const rows = columns[0].cells.length;
  for (let i = 0; i < rows; i++) lines.push(kept.map((k) => cell(k, columns[k].cells[i])).join('  ').trimEnd());
  return { lines, dropped };
}

function waveColumns(report: WavesReport, paint: ChalkInstance, keyed: boolean): Column[] {
  const scale = barScale(report);
  const twoByTwo = report.rows.levels.length === 2 && report.cols.levels.length === 2;
  const value = (w: WaveRecord, f: (x: Extract<WaveRecord, { testable: true }>) => string) => (w.testable ? f(w) : UNDEFINED);
  const columns: Column[] = [
    { title: 'wave', align: 'left', cells: report.waves.map((w, k) => (keyed ? `#${k + 1}` : shownLabel(w.key))) },
    { title: 'n', align: 'right', cells: report.waves.map((w) => formatCount(w.n)) },
    {
      title: 'leading p',
      align: 'right',
      cells: report.waves.map((w) => value(w, (x) => `${formatP(x.verdict.pValue)}${x.verdict.test === 'pearson' || x.verdict.test === 'designF' ? ' ' : '*'} ${x.verdict.passes ? '■' : '□'}`)),
    },
    {
      title: 'bias-corrected V',
      align: 'left',
      cells: report.waves.map((w) => value(w, (x) => `${padStart(formatMeasure(x.measures.biasCorrectedV), 5)} ${paint.blue(strengthBar(x.measures.biasCorrectedV === null ? null : x.measures.biasCorrectedV / scale, BAR))}`)),
    },
    {
      title: 'V interval',
      align: 'left',
      cells: report.waves.map((w) => value(w, (x) => (x.measures.cramersVInterval ? `${formatMeasure(x.measures.cramersVInterval.lower)}–${formatMeasure(x.measures.cramersVInterval.upper)}` : UNDEFINED))),
    },
  ];
  if (twoByTwo) {
    columns.push({ title: 'odds ratio', align: 'right', cells: report.waves.map((w) => value(w, (x) => formatRatio(x.measures.oddsRatio?.estimate))) });
    columns.push({
      title: 'OR interval',
      align: 'left',
      cells: report.waves.map((w) => value(w, (x) => (x.measures.oddsRatio ? `${formatRatio(x.measures.oddsRatio.lower)}–${formatRatio(x.measures.oddsRatio.upper)}` : UNDEFINED))),
    });
  }
  return columns;
}

function seriesLines(report: WavesReport, paint: ChalkInstance, width: number): string[] {
  const keyed = report.waves.some((w) => displayWidth(shownLabel(w.key)) > LONG_KEY);
  const scale = barScale(report);
  const out = heading(paint, 'Wave by wave', width, `bar: bias-corrected V, 0 to ${formatMeasure(scale)}`);
  const { lines, dropped } = columnsWithin(waveColumns(report, paint, keyed), width, paint);
  out.push(...lines);
  const confidence = report.settings.confidence;
  const exact = report.waves.some((w) => w.testable && w.verdict.test !== 'pearson' && w.verdict.test !== 'designF');
  const notes = [
    ...(report.designed ? ["leading p: each wave's design-based F test (Rao–Scott, second order) under its own design"] : []),
    ...(exact ? ['* exact or simulated p-value: the expected counts of that wave are too small for the chi-square approximation'] : []),
    `■ associated in that wave on its own at ${glued('α', String(report.verdict.alpha))} (□ not shown to be); V interval: ${Math.round(confidence * 1000) / 10}% interval of the population V`,
    ...(dropped.length > 0 ? [`Left out for the page width: ${dropped.join(', ')} (see --format csv).`] : []),
  ];
  for (const note of notes) out.push(...wrapText(note, width).map((l) => paint.dim(l)));
  if (keyed) report.waves.forEach((w, k) => out.push(...wrapText(`#${k + 1} = ${shownLabel(w.key)}`, width, '  ', '    ').map((l) => paint.dim(l))));
  return out;
}

function acrossLines(report: WavesReport, paint: ChalkInstance, width: number): string[] {
  const out = heading(paint, 'Tests across waves', width, '► the two that decide, Holm-adjusted together');
  const tests = acrossTests(report);
  if (tests.length === 0) return [...out, '  none can be computed for these tables'];
  const numbers = tests.map((t) => [formatStatistic(t.statistic), t.denDf === null ? String(t.df) : `${t.df}, ${formatStatistic(t.denDf, 0)}`, formatP(t.pValue), t.adjustedPValue === null ? '' : formatP(t.adjustedPValue)]);
  const titles = ['statistic', 'df', 'p', 'adjusted p'];
  const widths = titles.map((t, k) => Math.max(displayWidth(t), ...numbers.map((r) => displayWidth(r[k]))));
  const numbersWidth = widths.reduce((sum, w) => sum + w + 2, 0);
  const nameWidth = Math.max(24, width - numbersWidth);
  out.push(paint.bold(padEnd('', nameWidth) + titles.map((t, k) => '  ' + padStart(t, widths[k])).join('')));
  tests.forEach((t, row) => {
    const names = wrapText(t.name, nameWidth, t.decides ? '► ' : '  ', '    ');
    const tail = numbers[row].map((x, k) => '  ' + padStart(x, widths[k])).join('');
    names.forEach((line, k) => out.push(k === names.length - 1 ? (padEnd(line, nameWidth) + tail).trimEnd() : line));
  });
  const slope = slopeWords(report);
  if (slope) out.push(...wrapText(slope, width, '  ', '    ').map((l) => paint.dim(l)));
  return out;
}

function departureLines(report: WavesReport, paint: ChalkInstance, width: number): string[] {
  const standing = (report.departures ?? []).filter((d) => d.standsOut);
  if (standing.length === 0) return [];
  const out = heading(paint, 'Waves that stand out', width, 'Holm-adjusted over the waves');
  for (const d of standing) {
    const z = d.z !== null ? glued('z', formatSigned(d.z, 2)) : report.designed ? `${glued('F', formatStatistic(d.statistic))} ${dfWords(d.df, d.denDf)}` : `${glued('G²', formatStatistic(d.statistic))} ${glued('df', String(d.df))}`;
    out.push(...wrapText(`${shownLabel(d.key)}: ${z}, ${glued('p', formatP(d.pValue))}, ${glued('adjusted', 'p', formatP(d.adjustedPValue))}${d.direction ? `, ${d.direction} than the common odds ratio` : ''}`, width, '  ', '    '));
  }
  return out;
}

export function renderWavesText(report: WavesReport, paint: ChalkInstance, options: { width: number }): string {
  const width = options.width;
  const out: string[] = [];
  const K = report.waves.length;
  out.push(...wrapText(`${report.rows.name} × ${report.cols.name}: ${K} waves, ${report.waves[0].key} to ${report.waves[K - 1].key}`, width).map((l) => paint.bold(l)));
  for (const side of [report.rows, report.cols]) if (side.question) out.push(...wrapText(`${side.name}: ${side.question}`, width));
  out.push(...wrapText(setupWords(report), width).map((l) => paint.dim(l)));
  out.push(...wrapText(levelsWords(report), width).map((l) => paint.dim(l)));
  const weighting = weightingWords(report);
  if (weighting) out.push(...wrapText(weighting, width).map((l) => paint.dim(l)));

  out.push(...heading(paint, 'Since the wave before', width));
  const changed = report.latest.verdict?.changed === true;
  out.push(...wrapText(`${changed ? '■' : '□'} ${latestHeadline(report)}`, width, '', '  ').map((l) => paint.bold(l)));
  const delta = report.latest.deltaBiasCorrectedV;
  if (delta !== null) out.push(...wrapText(`change in bias-corrected V: ${formatSigned(delta)}`, width, '  ', '    '));
  out.push(...wrapText(shiftWords(report.latest, 'rows'), width, '  ', '    '));
  out.push(...wrapText(shiftWords(report.latest, 'cols'), width, '  ', '    '));

  out.push(...heading(paint, 'Over all waves', width));
  out.push(...wrapText(`${report.verdict.moved ? '■' : '□'} ${patternHeadline(report)}`, width, '', '  ').map((l) => paint.bold(l)));
  for (const s of report.statements) {
    if (s.kind === 'latest') continue;
    const text = wavesStatementWords(report, s);
    out.push(...wrapText(`· ${text}`, width, '  ', '    ').map((l) => (s.kind === 'many-looks' ? paint.dim(l) : l)));
  }

  out.push(...seriesLines(report, paint, width));
  out.push(...acrossLines(report, paint, width));
  out.push(...departureLines(report, paint, width));
  const warnings = report.warnings;
  if (warnings.length > 0) {
    out.push(...heading(paint, 'Check before relying on it', width));
    for (const w of warnings) out.push(...wrapText(`! ${w.message}`, width, '  ', '    ').map((l) => paint.yellow(l)));
  }
  out.push(...cautionLines(paint, width));
  return out.join('\n') + '\n';
}
