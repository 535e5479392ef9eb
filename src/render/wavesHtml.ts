import type { WavesReport } from '../analysis/waves.js';
import { formatCount, formatMeasure, formatP, formatRatio, formatSigned, formatStatistic, UNDEFINED } from '../readableNumbers.js';
import { shiftWords } from './compareText.js';
import { e, notes, page } from './html.js';
import { testName } from './words.js';
import { marginChart, oddsRatioChart, vSeriesChart } from './wavesSvg.js';
import { acrossTests, latestHeadline, levelsWords, patternHeadline, setupWords, slopeWords, wavesStatementWords, weightingWords } from './wavesWords.js';

/** The waves report as one self-contained page: the two answers, the charts, the series, the tests across waves. */
export function renderWavesHtml(report: WavesReport): string {
  const K = report.waves.length;
  const twoByTwo = report.rows.levels.length === 2 && report.cols.levels.length === 2;
  const title = `${report.rows.name} × ${report.cols.name}: ${K} waves, ${report.waves[0].key} to ${report.waves[K - 1].key}`;
  const latest = report.latest;
  const delta = latest.deltaBiasCorrectedV === null ? '' : `<p>Change in bias-corrected V: ${formatSigned(latest.deltaBiasCorrectedV)}.</p>`;
  const latestBox = `<h2>Since the wave before</h2><div class="answer${latest.verdict?.changed ? '' : ' fails'}"><p class="lead">${e(latestHeadline(report))}</p>${delta}
<p>${e(shiftWords(latest, 'rows'))}</p><p>${e(shiftWords(latest, 'cols'))}</p></div>`;
  const statements = report.statements
    .filter((s) => s.kind !== 'latest')
    .map((s) => `<li${s.kind === 'many-looks' ? ' class="dim"' : ''}>${e(wavesStatementWords(report, s))}</li>`)
    .join('');
  const overBox = `<h2>Over all waves</h2><div class="answer${report.verdict.moved ? '' : ' fails'}"><p class="lead">${e(patternHeadline(report))}</p><ul>${statements}</ul>${
    weightingWords(report) ? `<p>${e(weightingWords(report) as string)}</p>` : ''
  }</div>`;
  const odds = oddsRatioChart(report);
  const figures = `<div class="figures">${vSeriesChart(report)}${odds ?? ''}</div>`;
  const head = `<tr><th>wave</th><th>n</th><th>leading p<br><span class="dim">test</span></th><th>associated</th><th>bias-corrected V<br><span class="dim">interval of V</span></th>${twoByTwo ? '<th>odds ratio<br><span class="dim">interval</span></th>' : ''}<th>stands out<br><span class="dim">adjusted p</span></th></tr>`;
  const rows = report.waves
    .map((w, k) => {
      const d = report.departures?.find((x) => x.wave === k);
      const departure = d ? `${d.standsOut ? '<strong>yes</strong>' : 'no'}<br><span class="dim">${formatP(d.adjustedPValue)}</span>` : UNDEFINED;
      if (!w.testable) return `<tr><td>${e(w.key)}</td><td>${formatCount(w.n)}</td><td colspan="${twoByTwo ? 4 : 3}">not testable: ${e(w.reason)}</td><td>${departure}</td></tr>`;
      const vi = w.measures.cramersVInterval;
      const or = w.measures.oddsRatio;
      return `<tr><td>${e(w.key)}</td><td>${formatCount(w.n)}</td><td>${formatP(w.verdict.pValue)}<br><span class="dim">${e(testName(w.verdict.test, w))}</span></td><td>${w.verdict.passes ? 'yes' : 'no'}</td><td>${formatMeasure(w.measures.biasCorrectedV)}<br><span class="dim">${vi ? `${formatMeasure(vi.lower)}–${formatMeasure(vi.upper)}` : UNDEFINED}</span></td>${
        twoByTwo ? `<td>${formatRatio(or?.estimate)}<br><span class="dim">${or ? `${formatRatio(or.lower)}–${formatRatio(or.upper)}` : UNDEFINED}</span></td>` : ''
      }<td>${departure}</td></tr>`;
    })
    .join('');
  const tests = acrossTests(report)
    .map((t) => `<tr${t.decides ? ' class="lead"' : ''}><td>${t.decides ? '► ' : ''}${e(t.name)}</td><td>${formatStatistic(t.statistic)}</td><td>${t.denDf === null ? t.df : `${t.df} and ${formatStatistic(t.denDf, 0)}`}</td><td>${formatP(t.pValue)}</td><td>${t.adjustedPValue === null ? '' : formatP(t.adjustedPValue)}</td></tr>`)
    .join('');
  const slope = slopeWords(report);
  const margins = [marginChart(report, 'rows'), marginChart(report, 'cols')].filter((c) => c !== null).join('');
  const questions = [report.rows, report.cols].filter((s) => s.question).map((s) => `<p class="meta">${e(s.name)}: ${e(s.question as string)}</p>`).join('');
  const body = `<h1>${e(title)}</h1>${questions}
<p class="meta">${e(setupWords(report))}</p><p class="meta">${e(levelsWords(report))}</p>
${latestBox}
${overBox}
${figures}
<h2>Wave by wave</h2><p class="dim">Leading p: the test each wave's own table deserves, as in a single report; associated: at α ${report.verdict.alpha} on its own. The interval is that of the population V (${Math.round(report.settings.confidence * 1000) / 10}%, noncentral chi-square inversion). Departure: each wave against the association the other waves share, Holm-adjusted over the waves.</p>
<table>${head}${rows}</table>
<h2>Tests across waves</h2><table><tr><th>test (► the two that decide, Holm-adjusted together)</th><th>statistic</th><th>df</th><th>p-value</th><th>adjusted p</th></tr>${tests}</table>${slope ? `<p class="dim">${e(slope)}.</p>` : ''}
${margins ? `<h2>The margins over the waves</h2><div class="figures">${margins}</div>` : ''}
${notes(report.warnings)}`;
  return page(title, body);
}
