/**
 * The self-contained HTML pages of pair, scan and compare (inline CSS, SVG
 * pictures).
 */
import type { AnalysisRecord } from '../analysis/analyzeTable.js';
import type { CompareReport } from '../analysis/compare.js';
import type { PairReport } from '../analysis/report.js';
import type { ScanReport } from '../analysis/scan.js';
import { formatCount, formatExpected, formatMeasure, formatP, formatPercent, formatRatio, formatSigned, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { changeLine, compareHeadline, compareWarnings, compareWeightingWords, shiftWords, sideBySide } from './compareText.js';
import { inputLine } from './pairText.js';
import { pairFlags, scanSummary, FLAG_LEGEND, SCAN_LEFT_OUT_HEADING, SCAN_LEFT_OUT_NOTE } from './scanTable.js';
import { escapeXml, mosaicPlot, residualHeatMap, strengthChart } from './svg.js';
import { ADJUSTMENT_NAMES, CAUTION, comparison, designEffectWords, designIntervalWords, designVWords, designWords, excludedByWords, headline, intervalWords, leftOutWords, markLegend, reasonSentence, statementWords, strengthPhrase, testName, vIntervalWords } from './words.js';

const STYLE = `
  :root { color-scheme: light; }
  body { font: 15px/1.45 system-ui, -apple-system, "Segoe UI", sans-serif; color: #1d1d1d; max-width: 1000px; margin: 2rem auto; padding: 0 1.2rem; }
  h1 { font-size: 1.5rem; margin-bottom: 0.2rem; }
  h2 { font-size: 1.1rem; border-bottom: 2px solid #2166ac; padding-bottom: 0.2rem; margin-top: 2rem; }
  h3 { font-size: 1rem; margin: 1.2rem 0 0.3rem; }
  .meta { color: #555; margin-top: 0; }
  .answer { border-left: 5px solid #2166ac; background: #f3f6fa; padding: 0.6rem 1rem; }
  .answer.fails { border-left-color: #999; background: #f5f5f5; }
  .answer p { margin: 0.3rem 0; }
  table { border-collapse: collapse; margin: 0.6rem 0; font-variant-numeric: tabular-nums; display: block; max-width: 100%; overflow-x: auto; }
  th, td { padding: 0.25rem 0.6rem; border-bottom: 1px solid #ddd; text-align: right; vertical-align: top; }
  th:first-child, td:first-child { text-align: left; }
  td.margin, th.margin { border-left: 2px solid #bbb; }
  tr.margin td, tr.margin th { border-top: 2px solid #bbb; }
  .share { color: #666; font-size: 0.85em; margin-left: 0.3em; }
  .figures { display: flex; flex-wrap: wrap; gap: 1.5rem; align-items: flex-start; }
  .figures svg { max-width: 100%; height: auto; }
  .note { background: #fdf6e8; border-left: 4px solid #b35806; padding: 0.5rem 0.8rem; margin: 0.4rem 0; }
  .caution { color: #555; font-size: 0.9rem; margin-top: 2rem; }
  .dim { color: #777; }
  .lead { font-weight: 600; }
  details { margin: 0.6rem 0; }
  @media print { body { margin: 0; max-width: none; } table { display: table; overflow: visible; } h2 { break-after: avoid; } .figures { break-inside: avoid; } details { display: block; } }
`;

/** Text from the record or the data, escaped for HTML (glue as plain spaces). */
export const e = (s: string) => escapeXml(s.replace(/\u00a0/g, ' '));

/** A self-contained page: inline style, the body, the cautions. */
export function page(title: string, body: string): string {
  return `<!doctype html>\n<html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width, initial-scale=1"><title>${e(title)}</title><style>${STYLE}</style></head><body>${body}<p class="caution">${e(CAUTION)}</p></body></html>\n`;
}

type Cell = (i: number, j: number) => string;

/** A table of the record with margins: totals and their shares of the whole. */
function gridTable(record: AnalysisRecord, cell: Cell, margins: boolean): string {
  const share = (x: number) => (record.n > 0 ? formatPercent((100 * x) / record.n) : UNDEFINED);
  const head = `<tr><th>${e(record.rows.name)} ↓ · ${e(record.cols.name)} →</th>${record.cols.levels.map((l) => `<th>${e(l)}</th>`).join('')}${margins ? '<th class="margin">all</th>' : ''}</tr>`;
  const body = record.rows.levels
    .map(
      (l, i) =>
        `<tr><th>${e(l)}</th>${record.cols.levels.map((_c, j) => `<td>${cell(i, j)}</td>`).join('')}${margins ? `<td class="margin">${formatCount(record.rowTotals[i])}<span class="share">${share(record.rowTotals[i])}</span></td>` : ''}</tr>`,
    )
    .join('');
  const foot = margins
    ? `<tr class="margin"><th>all</th>${record.colTotals.map((t) => `<td>${formatCount(t)}<span class="share">${share(t)}</span></td>`).join('')}<td class="margin">${formatCount(record.n)}<span class="share">100%</span></td></tr>`
    : '';
  return `<table>${head}${body}${foot}</table>`;
}

function residualCell(record: AnalysisRecord, i: number, j: number): string {
  const v = record.residuals.adjusted[i][j];
  if (v === null) return UNDEFINED;
  const t = record.findings.cellThreshold;
  const mark = Math.abs(v) > t.adjusted ? (v > 0 ? '▲▲ ' : '▼▼ ') : Math.abs(v) > t.single ? (v > 0 ? '▲ ' : '▼ ') : '';
  return `${mark}${formatSigned(v, 1)}`;
}

/** The answer, the table in every view, where it sits, and every supporting number the text report has. */
function recordSections(record: AnalysisRecord, by?: string): string {
  const v = record.verdict;
  const m = record.measures;
  const t = record.tests;
  const lead = record.findings.primaryTest.test;
  const compare = comparison(v.adjustment ? v.decidingPValue : v.pValue, v.alpha, v.passes, v.adjustment !== null);
  const answer = `<div class="answer${v.passes ? '' : ' fails'}"><p class="lead">${e(`${headline(v, by)}: ${compare}, ${testName(v.test, record)}`)}</p>
<p>${e(reasonSentence(record, by))}</p>
<p>Strength: ${e(strengthPhrase(record))}</p>${
    record.design
      ? `<p>Design: ${e(`${designEffectWords(record.design)}.`)}</p>`
      : record.weighted
        ? `<p>Counts are sums of sampling weights; the tests use the effective sample of ${formatCount(Math.round(record.effectiveN * 10) / 10)}, which does not account for clustering or stratification.</p>`
        : ''
  }</div>`;
  const compact = gridTable(record, (i, j) => `${formatCount(record.counts[i][j])}<span class="share">${formatPercent(record.percentages.row[i][j], 0)}</span>`, true);
  const views = [
    ['Shares of each column', (i: number, j: number) => formatPercent(record.percentages.col[i][j])],
    ['Shares of the whole table', (i: number, j: number) => formatPercent(record.percentages.total[i][j])],
    ['Counts expected if the two were independent', (i: number, j: number) => formatExpected(record.expected[i][j])],
  ] as const;
  const more = views.map(([title, cell]) => `<details><summary>${title}</summary>${gridTable(record, cell, false)}</details>`).join('');
  const statements = record.findings.statements.map((s) => `<li>${e(statementWords(record, s))}</li>`).join('');
  const testRow = (name: string, r: { statistic: number; df: number; pValue: number } | null, isLead: boolean) =>
    r ? `<tr${isLead ? ' class="lead"' : ''}><td>${isLead ? '► ' : ''}${name}</td><td>${formatStatistic(r.statistic)}</td><td>${r.df}</td><td>${formatP(r.pValue)}</td></tr>` : '';
  const designTests =
    t.designF && t.designPearson && t.designLikelihoodRatio
      ? [
          `<tr${lead === 'designF' ? ' class="lead"' : ''}><td>${lead === 'designF' ? '► ' : ''}design-based F (Rao–Scott, 2nd order)</td><td>${formatStatistic(t.designF.statistic)}</td><td>${formatStatistic(t.designF.numDf)} and ${formatStatistic(t.designF.denDf, 1)}</td><td>${formatP(t.designF.pValue)}</td></tr>`,
          testRow('X² ÷ mean design effect (1st order)', t.designPearson, false),
          testRow('G² ÷ mean design effect (1st order)', t.designLikelihoodRatio, false),
          `<tr><td>X² ignoring the design (not a valid test here)</td><td>${formatStatistic(t.designPearson.uncorrected)}</td><td>${t.designPearson.df}</td><td></td></tr>`,
        ].join('')
      : null;
  const tests = [
    designTests ?? testRow("chi-square (Pearson's X²)", t.pearson, lead === 'pearson' && v.test !== 'cmh'),
    designTests ? '' : testRow('likelihood ratio (G²)', t.likelihoodRatio, false),
    testRow("chi-square, Yates' correction", t.yates, false),
    t.fisher ? `<tr${lead === 'fisher' ? ' class="lead"' : ''}><td>${lead === 'fisher' ? '► ' : ''}${e(testName('fisher', record))}</td><td></td><td></td><td>${formatP(t.fisher.pValue)}</td></tr>` : '',
    t.monteCarlo
      ? `<tr${lead === 'monteCarlo' ? ' class="lead"' : ''}><td>${lead === 'monteCarlo' ? '► ' : ''}simulated exact test (${formatCount(t.monteCarlo.simulations)} tables, seed ${t.monteCarlo.seed})</td><td></td><td></td><td>${formatP(t.monteCarlo.pValue)} ± ${formatP(t.monteCarlo.standardError)}</td></tr>`
      : '',
    testRow('trend across ordered levels', t.linearByLinear, false),
  ].join('');
  const measureRow = (name: string, value: string, detail = '') => `<tr><td>${e(name)}</td><td>${value}</td><td>${e(detail)}</td></tr>`;
  const vi = m.cramersVInterval;
  const strength = [
    measureRow('bias-corrected V', formatMeasure(m.biasCorrectedV), v.strength ?? ''),
    measureRow("Cramér's V", formatMeasure(m.cramersV), vi ? `population ${formatMeasure(vi.estimate)}, ${intervalWords(vi.lower, vi.upper, vi.confidence, formatMeasure)}` : ''),
    measureRow('phi', formatMeasure(m.phi)),
    measureRow("Tschuprow's T", formatMeasure(m.tschuprowT)),
    measureRow('contingency coefficient', formatMeasure(m.contingencyC), `corrected ${formatMeasure(m.correctedC)}`),
    m.designCramersV ? measureRow("design-scaled Cramér's V", formatMeasure(m.designCramersV.value), designVWords(m.designCramersV).replace(/^[^:]*: /, '')) : '',
  ].join('');
  const corrected = m.zeroCellCorrection ? ' (0.5 added to every cell: a cell is zero)' : '';
  const twoByTwo =
    m.oddsRatio || m.yulesQ !== null
      ? `<h3>Two by two: direction and size${e(corrected)}</h3><table>${[
          m.oddsRatio ? measureRow('odds ratio', formatRatio(m.oddsRatio.estimate), intervalWords(m.oddsRatio.lower, m.oddsRatio.upper, m.oddsRatio.confidence)) : '',
          m.relativeRisk
            ? measureRow('ratio of shares', formatRatio(m.relativeRisk.estimate), `share of "${m.relativeRisk.outcome}" among "${m.relativeRisk.exposed}" ÷ among "${m.relativeRisk.reference}"; ${intervalWords(m.relativeRisk.lower, m.relativeRisk.upper, m.relativeRisk.confidence)}`)
            : '',
          m.yulesQ !== null ? measureRow("Yule's Q", formatSigned(m.yulesQ), `Yule's Y ${formatSigned(m.yulesY)}`) : '',
        ].join('')}</table>`
      : '';
  const guessing = `<h3>Guessing one from the other (share of errors removed)</h3><table><tr><th></th><th>lambda</th><th>tau</th><th>Theil's U</th></tr>
<tr><td>${e(`${record.cols.name} from ${record.rows.name}`)}</td><td>${formatMeasure(m.lambdaColsGivenRows)}</td><td>${formatMeasure(m.gkTauColsGivenRows)}</td><td>${formatMeasure(m.uncertaintyColsGivenRows)}</td></tr>
<tr><td>${e(`${record.rows.name} from ${record.cols.name}`)}</td><td>${formatMeasure(m.lambdaRowsGivenCols)}</td><td>${formatMeasure(m.gkTauRowsGivenCols)}</td><td>${formatMeasure(m.uncertaintyRowsGivenCols)}</td></tr>
<tr><td>either way</td><td>${formatMeasure(m.lambdaSymmetric)}</td><td>${UNDEFINED}</td><td>${formatMeasure(m.uncertaintySymmetric)}</td></tr></table>`;
  const o = record.ordinal;
  const ordinal = o
    ? `<h3>With order (--ordinal: levels read in the order shown)</h3><table><tr><th></th><th>estimate</th><th>se</th><th>p</th></tr>${(
        [
          ['gamma', o.gamma],
          ["Kendall's tau-b", o.kendallTauB],
          ["Stuart's tau-c", o.kendallTauC],
          [`Somers' d, ${record.cols.name} predicted`, o.somersDColsGivenRows],
          [`Somers' d, ${record.rows.name} predicted`, o.somersDRowsGivenCols],
        ] as const
      )
        .map(([name, x]) => `<tr><td>${e(name)}</td><td>${formatSigned(x.estimate)}</td><td>${formatMeasure(x.standardError)}</td><td>${formatP(x.pValue)}</td></tr>`)
        .join('')}</table><p class="dim">The standard errors come from the observed table; each p-value from the standard error under independence.</p>`
    : '';
  return `${answer}
<h2>The table</h2><p class="dim">Each cell: the count and its share of the row; "all": totals with their share of the whole table.</p>${compact}${more}
<h2>Where it sits</h2><div class="figures">${residualHeatMap(record)}${mosaicPlot(record)}</div>
<details><summary>Adjusted residuals as numbers</summary>${gridTable(record, (i, j) => residualCell(record, i, j), false)}<p class="dim">${e(markLegend(record))}</p></details>
<ul>${statements}</ul>
${designSection(record)}
<!--held-fixed-->
<h2>Supporting numbers</h2><h3>The same question, other tests (► the one that leads)</h3><table><tr><th>test</th><th>statistic</th><th>df</th><th>p-value</th></tr>${tests}</table>
<h3>Strength on other scales (0 none, 1 complete)</h3><table>${strength}</table>${twoByTwo}${guessing}${ordinal}`;
}

/** With a survey design: the design, each cell's design effect, the shares with their intervals. */
function designSection(record: AnalysisRecord): string {
  const d = record.design;
  if (!d) return '';
  const effects = record.designEffects;
  const shares = record.designPercentages;
  const interval = (x: { lower: number | null; upper: number | null; method: string }) => (x.lower === null || x.upper === null ? UNDEFINED : `${formatPercent(x.lower)}–${formatPercent(x.upper)}${x.method === 'korn-graubard' ? '*' : ''}`);
  return `<h2>The survey design</h2><p>${e(`${designWords(d)}; ${designEffectWords(d)}.`)}</p>${
    effects ? `<h3>Design effect of each cell</h3>${gridTable(record, (i, j) => formatRatio(effects[i][j]), false)}` : ''
  }${
    shares
      ? `<h3>Shares of each row, with their intervals</h3>${gridTable(record, (i, j) => `${formatPercent(shares.row[i][j].estimate)}<span class="share">${interval(shares.row[i][j])}</span>`, false)}<details><summary>Shares of each column</summary>${gridTable(record, (i, j) => `${formatPercent(shares.col[i][j].estimate)}<span class="share">${interval(shares.col[i][j])}</span>`, false)}</details><details><summary>Shares of the whole table</summary>${gridTable(record, (i, j) => `${formatPercent(shares.total[i][j].estimate)}<span class="share">${interval(shares.total[i][j])}</span>`, false)}</details><p class="dim">${e(`${designIntervalWords(shares.confidence, shares.degreesOfFreedom)}.`)}</p>`
      : ''
  }${record.measures.designCramersV ? `<p>${e(`${designVWords(record.measures.designCramersV)}.`)}</p>` : ''}`;
}

function heldFixedSection(report: PairReport): string {
  const { stratified, strata } = report;
  if (!stratified || !strata) return '';
  const twoByTwo = report.rows.levels.length === 2 && report.cols.levels.length === 2;
  const rows = strata
    .map((s) =>
      s.testable
        ? `<tr><td>${e(s.level)}</td><td>${formatCount(s.n)}</td><td>${formatP(s.verdict.pValue)}</td><td>${e(testName(s.verdict.test, s))}</td><td>${formatMeasure(s.measures.biasCorrectedV)}</td>${twoByTwo ? `<td>${formatRatio(s.measures.oddsRatio?.estimate)}</td>` : ''}</tr>`
        : `<tr><td>${e(s.level)}</td><td>${formatCount(s.n)}</td><td colspan="${twoByTwo ? 4 : 3}">not testable: ${e(s.reason)}</td></tr>`,
    )
    .join('');
  const c = stratified.cmh;
  const o = stratified.commonOddsRatio;
  const b = stratified.breslowDay;
  const tests = [
    c ? `<tr class="lead"><td>► Cochran–Mantel–Haenszel (association within the levels)</td><td>${formatStatistic(c.statistic)}</td><td>${c.df}</td><td>${formatP(c.pValue)}</td></tr>` : '<tr><td>Cochran–Mantel–Haenszel</td><td colspan="3">not computable for these levels</td></tr>',
    o ? `<tr><td>common odds ratio (Mantel–Haenszel)</td><td>${formatRatio(o.estimate)}</td><td></td><td>${e(intervalWords(o.lower, o.upper, o.confidence))}</td></tr>` : '',
    stratified.pooledOddsRatio !== null ? `<tr><td>odds ratio, pooled table</td><td>${formatRatio(stratified.pooledOddsRatio)}</td><td></td><td></td></tr>` : '',
    b ? `<tr><td>equal odds in every level? (Breslow–Day)</td><td>${formatStatistic(b.statistic)}</td><td>${b.df}</td><td>${formatP(b.pValue)}</td></tr>` : '',
  ].join('');
  return `<h2>Within each level of ${e(stratified.by)}</h2><table><tr><th>${e(stratified.by)}</th><th>n</th><th>p</th><th>test</th><th>bias-corrected V</th>${twoByTwo ? '<th>odds ratio</th>' : ''}</tr>${rows}</table>
<table><tr><th>pooling the levels</th><th>statistic / estimate</th><th>df</th><th>p-value / interval</th></tr>${tests}</table>`;
}

/** The "check before relying on it" section. */
export function notes(warnings: readonly { message: string }[]): string {
  return warnings.length === 0 ? '' : `<h2>Check before relying on it</h2>${warnings.map((w) => `<p class="note">${e(w.message)}</p>`).join('')}`;
}

export function renderPairHtml(report: PairReport): string {
  const questions = [report.rows, report.cols].filter((side) => side.question).map((side) => `<p class="meta">${e(side.name)}: ${e(side.question as string)}</p>`).join('');
  const body = `<h1>${e(report.rows.name)} × ${e(report.cols.name)}</h1>${questions}
<p class="meta">${e(inputLine(report))}</p>
${recordSections(report, report.stratified?.by).replace('<!--held-fixed-->', heldFixedSection(report))}
${notes(report.warnings)}`;
  return page(`${report.rows.name} × ${report.cols.name}`, body);
}

export function renderScanHtml(report: ScanReport): string {
  const rows = report.pairs
    .map(
      (p) =>
        `<tr class="${p.passes ? '' : 'dim'}"><td>${p.rank}</td><td>${p.passes ? '✓ passes' : '—'}</td><td>${e(p.rows.name)} × ${e(p.cols.name)}</td><td>${formatMeasure(p.measures.biasCorrectedV)}</td><td>${formatMeasure(p.measures.cramersV)}</td><td>${formatP(p.verdict.pValue)}</td><td>${e(testName(p.verdict.test, p))}</td><td>${formatP(p.pAdjusted)}</td><td>${pairFlags(p).join(' ')}</td></tr>`,
    )
    .join('');
  const skipped = report.skipped.map((s) => `<li>${e(s.column)}: ${e(s.reason)}</li>`).join('');
  const untestable = report.untestable.map((u) => `<li>${e(u.rows)} × ${e(u.cols)}: ${e(u.reason)}</li>`).join('');
  const derived = (report.derived ?? []).map((d) => `<li>${e(d.rows)} × ${e(d.cols)}: ${e(d.reason)}</li>`).join('');
  const leftOut = excludedByWords(report.excludedBy ?? []).map((w) => `<li>${e(w)}</li>`).join('');
  const used = [...new Set(report.pairs.flatMap(pairFlags))];
  const body = `<h1>Pairs of ${e(report.input.file)}</h1>
<p class="meta">${e(scanSummary(report))}</p>
<p>Adjustment for multiple testing: ${e(ADJUSTMENT_NAMES[report.adjustment])}, over the ${report.pairsTested} pairs tested; a pair passes when its adjusted leading p-value is at most α ${report.alpha}.</p>
<div class="figures">${strengthChart(report)}</div>
<h2>Pairs, strongest first</h2><table><tr><th>#</th><th>passes</th><th>pair</th><th>bias-corrected V</th><th>Cramér's V</th><th>leading p</th><th>test</th><th>adjusted p</th><th>notes</th></tr>${rows}</table>
${used.length ? `<p class="dim">${e(used.map((f) => `${f} = ${FLAG_LEGEND[f]}`).join('; '))}</p>` : ''}
${report.pairs.length < report.pairsTested ? `<p class="dim">${report.pairsTested - report.pairs.length} weaker pairs not shown (--top); ${report.pairsPassing} of all ${report.pairsTested} pairs pass.</p>` : ''}
${skipped ? `<h2>Columns left out</h2><ul>${skipped}</ul>` : ''}${untestable ? `<h2>Pairs that could not be tested</h2><ul>${untestable}</ul>` : ''}${derived ? `<h2>One column a recoding of the other (not ranked)</h2><ul>${derived}</ul>` : ''}${leftOut ? `<h2>${e(SCAN_LEFT_OUT_HEADING)}</h2><p class="dim">${e(SCAN_LEFT_OUT_NOTE)}</p><ul>${leftOut}</ul>` : ''}
${notes(report.warnings ?? [])}`;
  return page(`Pairs of ${report.input.file}`, body);
}

export function renderCompareHtml(report: CompareReport): string {
  const side = (r: CompareReport['before']) =>
    r.testable
      ? `<div><h2>${e(r.label)}</h2><div class="answer${r.verdict.passes ? '' : ' fails'}"><p class="lead">${e(`${headline(r.verdict)}: ${comparison(r.verdict.pValue, r.verdict.alpha, r.verdict.passes)}, ${testName(r.verdict.test, r)}`)}</p><p>n ${formatCount(r.n)}; bias-corrected V ${formatMeasure(r.measures.biasCorrectedV)}; ${e(vIntervalWords(r))}${r.ordinal ? `; gamma ${formatSigned(r.ordinal.gamma.estimate)}, Kendall&#39;s tau-b ${formatSigned(r.ordinal.kendallTauB.estimate)}` : ''}</p>${r.excluded > 0 ? `<p class="meta">${e(leftOutWords(r.excluded, r.excludedBy))}</p>` : ''}</div>
<p class="dim">Each cell: the count and its share of the row.</p>${gridTable(r, (i, j) => `${formatCount(r.counts[i][j])}<span class="share">${formatPercent(r.percentages.row[i][j], 0)}</span>`, true)}
<div class="figures">${residualHeatMap(r, `Adjusted residuals, ${r.label}`)}</div></div>`
      : `<div><h2>${e(r.label)}</h2><p class="note">${e(r.reason)}</p></div>`;
  const figures = sideBySide(report)
    .map(([label, a, b, change]) => `<tr><th>${e(label.trim())}</th><td>${e(a)}</td><td>${e(b)}</td><td>${e(change)}</td></tr>`)
    .join('');
  const table = `<h2>Side by side</h2><table><tr><th></th><th>${e(report.before.label)}</th><th>${e(report.after.label)}</th><th>change</th></tr>${figures}</table>`;
  const questions = [report.rows, report.cols].filter((s) => s.question).map((s) => `<p class="meta">${e(s.name)}: ${e(s.question as string)}</p>`).join('');
  const body = `<h1>${e(report.rows.name)} × ${e(report.cols.name)}: ${e(report.before.label)} against ${e(report.after.label)}</h1>${questions}
<div class="answer${report.verdict?.changed ? '' : ' fails'}"><p class="lead">${e(compareHeadline(report))}</p>${changeLine(report) ? `<p>${e(changeLine(report) as string)}.</p>` : ''}
<p>${e(shiftWords(report, 'rows'))}</p><p>${e(shiftWords(report, 'cols'))}</p>${compareWeightingWords(report) ? `<p>${e(compareWeightingWords(report) as string)}</p>` : ''}</div>
${table}
${side(report.before)}${side(report.after)}
${notes(compareWarnings(report).map((message) => ({ message })))}`;
  return page(`${report.rows.name} × ${report.cols.name}: ${report.before.label} against ${report.after.label}`, body);
}
