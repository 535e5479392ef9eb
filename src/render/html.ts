import type { CompareReport } from '../analysis/compare.js';
import type { PairReport } from '../analysis/report.js';
import type { ScanReport } from '../analysis/scan.js';
import { formatCount, formatMeasure, formatP, formatStatistic } from './format.js';
import { CAUTION, inputLine, summarySentence, cellSentence } from './pairText.js';
import { pairFlags } from './scanTable.js';
import { escapeXml, mosaicPlot, residualHeatMap, strengthChart } from './svg.js';

const STYLE = `
  :root { color-scheme: light; }
  body { font: 15px/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; color: #1d1d1d; max-width: 980px; margin: 2rem auto; padding: 0 1.2rem; }
  h1 { font-size: 1.5rem; margin-bottom: 0.2rem; }
  h2 { font-size: 1.1rem; border-bottom: 2px solid #2b7a78; padding-bottom: 0.2rem; margin-top: 2rem; }
  .meta { color: #555; margin-top: 0; }
  table { border-collapse: collapse; margin: 0.6rem 0; font-variant-numeric: tabular-nums; }
  th, td { padding: 0.25rem 0.6rem; border-bottom: 1px solid #ddd; text-align: right; }
  th:first-child, td:first-child { text-align: left; }
  .figures { display: flex; flex-wrap: wrap; gap: 1.5rem; align-items: flex-start; }
  .figures svg { max-width: 100%; height: auto; }
  .note { background: #f4f1ea; border-left: 4px solid #c45a38; padding: 0.5rem 0.8rem; margin: 0.4rem 0; }
  .caution { color: #555; font-size: 0.9rem; margin-top: 2rem; }
  .dim { color: #888; }
  @media print { body { margin: 0; max-width: none; } h2 { break-after: avoid; } .figures { break-inside: avoid; } }
`;

function page(title: string, body: string): string {
  return `<!doctype html>\n<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${escapeXml(title)}</title><style>${STYLE}</style></head><body>${body}<p class="caution">${escapeXml(CAUTION)}</p></body></html>\n`;
}

function pairBody(report: PairReport): string {
  const t = report.tests;
  const m = report.measures;
  const rows = report.rows.levels
    .map((l, i) => `<tr><th>${escapeXml(l)}</th>${report.counts[i].map((v, j) => `<td>${formatCount(v)}<br><span class="dim">${report.expected[i][j].toFixed(1)}</span></td>`).join('')}</tr>`)
    .join('');
  const tests = [
    ['Pearson chi-square', t.pearson],
    ['likelihood ratio G²', t.likelihoodRatio],
    ['continuity-corrected', t.yates],
    ['linear-by-linear', t.linearByLinear],
  ]
    .filter(([, v]) => v)
    .map(([name, v]) => {
      const r = v as { statistic: number; df: number; pValue: number };
      return `<tr><td>${name}</td><td>${formatStatistic(r.statistic)}</td><td>${r.df}</td><td>${formatP(r.pValue)}</td></tr>`;
    })
    .join('');
  const exact = [t.fisher ? `<tr><td>exact</td><td></td><td></td><td>${formatP(t.fisher.pValue)}</td></tr>` : '', t.monteCarlo ? `<tr><td>simulated exact</td><td></td><td></td><td>${formatP(t.monteCarlo.pValue)}</td></tr>` : ''].join('');
  const measures = (
    [
      ['bias-corrected V', m.biasCorrectedV],
      ["Cramér's V", m.cramersV],
      ['phi', m.phi],
      ['contingency C', m.contingencyC],
      ['corrected C', m.correctedC],
      ["Tschuprow's T", m.tschuprowT],
      ["Yule's Q", m.yulesQ],
    ] as [string, number | null][]
  )
    .filter(([, v]) => v !== null)
    .map(([name, v]) => `<tr><td>${name}</td><td>${formatMeasure(v)}</td></tr>`)
    .join('');
  const notes = report.warnings.map((w) => `<p class="note">${escapeXml(w.message)}</p>`).join('');
  const cells = report.findings.notableCells.slice(0, 8).map((c) => `<li>${escapeXml(cellSentence(report, c))}</li>`).join('');
  return `<h1>${escapeXml(report.rows.name)} × ${escapeXml(report.cols.name)}</h1>
<p class="meta">${escapeXml(inputLine(report))}</p>
<p>${escapeXml(summarySentence(report))}</p>${cells ? `<ul>${cells}</ul>` : ''}
<h2>Pictures</h2><div class="figures">${residualHeatMap(report)}${mosaicPlot(report)}</div>
<h2>Counts</h2><table><tr><th>${escapeXml(report.rows.name)} \\ ${escapeXml(report.cols.name)}</th>${report.cols.levels.map((l) => `<th>${escapeXml(l)}</th>`).join('')}</tr>${rows}</table>
<p class="dim">Each cell: the count, and below it the count expected under independence.</p>
<h2>Evidence</h2><table><tr><th>test</th><th>statistic</th><th>df</th><th>p-value</th></tr>${tests}${exact}</table>
<h2>Strength</h2><table>${measures}</table>
${notes ? `<h2>Checks</h2>${notes}` : ''}`;
}

export function renderPairHtml(report: PairReport): string {
  return page(`${report.rows.name} × ${report.cols.name}`, pairBody(report));
}

export function renderScanHtml(report: ScanReport): string {
  const rows = report.pairs
    .map((p) => `<tr class="${p.passes ? '' : 'dim'}"><td>${p.rank}</td><td>${escapeXml(p.rows.name)} × ${escapeXml(p.cols.name)}</td><td>${formatMeasure(p.measures.biasCorrectedV)}</td><td>${formatMeasure(p.measures.cramersV)}</td><td>${formatP(p.pAdjusted)}</td><td>${pairFlags(p).join(' ')}</td></tr>`)
    .join('');
  const skipped = report.skipped.map((s) => `<li>${escapeXml(s.column)}: ${escapeXml(s.reason)}</li>`).join('');
  const body = `<h1>Pairs of ${escapeXml(report.input.file)}</h1>
<p class="meta">${formatCount(report.n)} rows, ${report.pairsTested} pairs tested, ${escapeXml(report.adjustment)} adjustment at α ${report.alpha}: ${report.pairsPassing} pass.</p>
<div class="figures">${strengthChart(report)}</div>
<h2>All pairs</h2><table><tr><th>#</th><th>pair</th><th>bias-corrected V</th><th>Cramér's V</th><th>adjusted p</th><th>flags</th></tr>${rows}</table>
${skipped ? `<h2>Columns left out</h2><ul>${skipped}</ul>` : ''}`;
  return page(`Pairs of ${report.input.file}`, body);
}

export function renderCompareHtml(report: CompareReport): string {
  const side = (label: string, r: CompareReport['before']) =>
    r.testable
      ? `<div><h2>${escapeXml(label)}</h2><p>bias-corrected V ${formatMeasure(r.measures.biasCorrectedV)}, p ${formatP(r.findings.primaryTest.pValue)}, n ${formatCount(r.n)}</p><div class="figures">${residualHeatMap(r, `Adjusted residuals, ${label}`)}</div></div>`
      : `<div><h2>${escapeXml(label)}</h2><p class="note">${escapeXml(r.reason)}</p></div>`;
  const change = report.change ? `${report.change.method === 'breslow-day' ? 'Breslow–Day' : 'no three-way interaction (G²)'}: ${formatStatistic(report.change.statistic)}, df ${report.change.df}, p ${formatP(report.change.pValue)}` : 'not computable';
  const notes = report.warnings.map((w) => `<p class="note">${escapeXml(w.message)}</p>`).join('');
  const body = `<h1>${escapeXml(report.rows.name)} × ${escapeXml(report.cols.name)}: ${escapeXml(report.before.label)} against ${escapeXml(report.after.label)}</h1>
<p>Did the association change? ${escapeXml(change)}. Change in bias-corrected V: ${report.deltaBiasCorrectedV === null ? '—' : (report.deltaBiasCorrectedV >= 0 ? '+' : '') + report.deltaBiasCorrectedV.toFixed(3)}.</p>
<p>Row distribution shift: p ${formatP(report.rowShift?.pValue)} · column distribution shift: p ${formatP(report.colShift?.pValue)}</p>
${notes}<div class="figures">${side(report.before.label, report.before)}${side(report.after.label, report.after)}</div>`;
  return page(`${report.rows.name} × ${report.cols.name}: ${report.before.label} against ${report.after.label}`, body);
}
