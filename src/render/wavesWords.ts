import type { WavesReport, WavesStatement } from '../analysis/waves.js';
import { formatMeasure, formatP, formatRatio, formatSigned } from '../readableNumbers.js';
import { changeTestName } from './compareText.js';
import { GLUE, glued } from './layout.js';
import { alphaPhrase, comparison, evidenceWords, quoteLevel } from './words.js';

/**
 * The words of the waves report, shared by every human-facing format: the
 * record's facts put into sentences; nothing here decides.
 */

const KEY_NAMES: Record<string, string> = { date: 'date', week: 'ISO week', month: 'month', year: 'year', number: 'number' };

export function sameTestName(test: 'breslow-day-tarone' | 'no-three-way-interaction' | 'design-wald'): string {
  if (test === 'design-wald') return 'design-based Wald test of equal log odds ratios in every wave';
  return test === 'breslow-day-tarone' ? "Breslow–Day test of equal odds ratios with Tarone's correction" : 'G² test of no three-way interaction';
}

export function trendTestName(method: 'odds-ratio' | 'layer-effect', designed = false): string {
  if (designed) return method === 'odds-ratio' ? 'design-based Wald test of a linear trend in the log odds ratio' : 'design-based Wald test of a trend in the layer-effect model (Xie 1992, fitted by GLS)';
  return method === 'odds-ratio' ? 'score test for a trend in the odds ratio (Breslow & Day)' : 'likelihood-ratio test of a trend in the layer-effect model (Xie 1992)';
}

/** The margin's drift test in a few words. */
export function driftTestName(test: 'pearson' | 'design-wald', name: string): string {
  return test === 'design-wald' ? `design-based Wald test of equal shares of ${name} in every wave` : `chi-square of ${name} by wave`;
}

/** "df 3" or, for the F form of a design-based Wald test, "df 3 and 14". */
export function dfWords(df: number, denDf: number | null | undefined): string {
  return denDf === null || denDf === undefined ? glued('df', String(df)) : glued('df', String(df), 'and', String(denDf));
}

/**
 * How the waves were weighted, in one sentence: the survey design (each wave its own sample), or, with
 * sampling weights alone, that clustering and stratification are not accounted for; null without weights.
 */
export function weightingWords(report: WavesReport): string | null {
  const d = report.design;
  if (report.designed && d) {
    const given =
      d.kind === 'replicate'
        ? `--replicate-method ${d.method}${d.rho !== null ? `, ${glued('ρ', String(d.rho))}` : ''}${d.centre === 'full-sample' ? ', centred at the full-sample estimate' : ''}`
        : [d.columns.strata !== null ? `--strata ${d.columns.strata}` : '', d.columns.cluster !== null ? `--cluster ${d.columns.cluster}` : 'each row its own PSU', d.columns.fpc !== null ? `--fpc ${d.columns.fpc}` : ''].filter((x) => x !== '').join(', ');
    const dfs = d.waves.flatMap((w) => (w.degreesOfFreedom === null ? [] : [w.degreesOfFreedom]));
    const low = Math.min(...dfs);
    const high = Math.max(...dfs);
    const each = dfs.length === 0 ? 'no wave has a design-based estimate' : `${glued(String(low === high ? low : `${low} to ${high}`), 'design', 'df')} a wave, ${glued(String(d.degreesOfFreedom), 'together')}`;
    return `Survey design (${given}): each wave is its own sample with its own ${d.kind === 'replicate' ? 'replicate weights' : 'strata and PSUs'} (${each}); each wave's leading test is the design-based F test (Rao–Scott), and the tests across waves are design-based Wald tests for independent samples.`;
  }
  if (report.weighted) return "Counts are sums of sampling weights; each wave is tested on its table rescaled to Kish's effective sample size, which does not account for clustering or stratification.";
  return null;
}

/** "a wave" / "a year". */
export function perUnit(unit: 'year' | 'wave'): string {
  return unit === 'year' ? 'a year' : 'a wave';
}

/** Where the waves came from, their order, and what the trend is measured in. */
export function setupWords(report: WavesReport): string {
  const s = report.setup;
  const kind = s.keyKind ? KEY_NAMES[s.keyKind] : null;
  const order =
    s.orderedBy === 'names'
      ? `Waves sorted by the ${kind} in their file names`
      : s.orderedBy === 'given'
        ? 'Waves in the order the files were given'
        : s.orderedBy === 'listed'
          ? `Waves are the levels of ${s.period} listed by --levels, in that order`
          : s.orderedBy === 'codebook'
            ? `Waves are the levels of ${s.period}, in the order of its codebook entry and recodes`
            : `Waves are the levels of ${s.period}, in natural order`;
  const spacing = s.scores.unit === 'year' ? `the trend is measured per year, each wave placed at its ${kind}` : 'the trend is measured per wave, the waves evenly spaced';
  return `${order}; ${spacing}.`;
}

/** The levels of the table, and for 2×2 which way the odds ratio reads: every format names them. */
export function levelsWords(report: WavesReport): string {
  const { rows, cols } = report;
  const list = (levels: readonly string[]) => levels.map(quoteLevel).join(', ');
  const table = `The table: ${rows.name} (${list(rows.levels)}) by ${cols.name} (${list(cols.levels)})`;
  if (rows.levels.length !== 2 || cols.levels.length !== 2) return `${table}.`;
  const [r1, r2] = rows.levels.map(quoteLevel);
  const [c1, c2] = cols.levels.map(quoteLevel);
  return `${table}; each odds ratio is the odds of ${cols.name} ${c1} (against ${c2}) with ${rows.name} ${r1}, over those with ${rows.name} ${r2}.`;
}

/** The across-wave decision in a few words. */
export function patternHeadline(report: WavesReport): string {
  const v = report.verdict;
  const K = report.waves.length;
  const p = v.decidingPValue;
  const rest = p === null ? '' : `: ${comparison(p, v.alpha, v.moved, true)} (Holm, over the two tests across waves)`;
  switch (v.pattern) {
    case 'grows':
      return `Over the ${K} waves the association grows (${evidenceWords(v.evidence)})${rest}`;
    case 'fades':
      return `Over the ${K} waves the association fades (${evidenceWords(v.evidence)})${rest}`;
    case 'uneven':
      return `Over the ${K} waves the association is not the same in every wave, without a steady trend (${evidenceWords(v.evidence)})${rest}`;
    case 'differs':
      return `Over the ${K} waves the association is not the same in every wave (${evidenceWords(v.evidence)})${rest}; no trend could be tested`;
    case 'stable':
      return `No evidence that the association moved over the ${K} waves${rest}`;
    case 'untestable':
      if (report.waves.length - report.isolatedWaves.length < 2) return `No comparison over the ${K} waves is possible: fewer than two waves share levels with another on both sides`;
      return `Whether the association moved over the ${K} waves cannot be tested for these tables`;
  }
}

/** The change between the last two waves, in a few words. */
export function latestHeadline(report: WavesReport): string {
  const v = report.latest.verdict;
  const K = report.waves.length;
  const from = report.waves[K - 2].key;
  const to = report.waves[K - 1].key;
  if (!v && report.latest.noSharedLevel.length > 0) return `No comparison is possible from ${from} to ${to}: the two waves share no level of ${report.latest.noSharedLevel.join(' or of ')}`;
  if (!v) return `Whether the association changed from ${from} to ${to} cannot be tested for these tables`;
  return v.changed
    ? `The association changed from ${from} to ${to} (${evidenceWords(v.evidence)}): ${comparison(v.pValue, v.alpha, true)}, ${changeTestName(v.test)}`
    : `No evidence that the association changed from ${from} to ${to}: ${comparison(v.pValue, v.alpha, false)}, ${changeTestName(v.test)}`;
}

/** A factor per unit in words: "3.5% less a wave (×0.965)", "8.2 times a year". */
export function factorWords(factor: number, unit: 'year' | 'wave'): string {
  const per = perUnit(unit);
  if (factor >= 2 || factor <= 0.5) return `${glued('×' + formatRatio(factor), per)}`;
  const percent = (factor - 1) * 100;
  const size = Math.abs(percent);
  const shown = size >= 10 ? size.toFixed(0) : size >= 1 ? size.toFixed(1) : size.toPrecision(2);
  return `${glued(shown + '%', percent >= 0 ? 'more' : 'less', per)} (${glued('×' + formatRatio(factor))})`;
}

/** A spacing in years in words: days below two months, months below two years, else years. */
export function spacingWords(years: number): string {
  const days = years * 365.2425;
  if (days < 61) return glued(String(Math.round(days * 10) / 10), Math.round(days * 10) / 10 === 1 ? 'day' : 'days');
  if (years < 2) return glued(String(Math.round(years * 120) / 10), 'months');
  return glued(String(Math.round(years * 10) / 10), 'years');
}

function intervalOfFactor(lower: number | null, upper: number | null, confidence: number): string {
  const end = (x: number | null) => (x === null ? 'beyond the search range' : '×' + formatRatio(x));
  return `${glued(`${Number((confidence * 100).toPrecision(6))}%`, 'interval')} ${glued(end(lower), 'to', end(upper))}`;
}

/** Each statement of the waves record in words, in the record's order. */
export function wavesStatementWords(report: WavesReport, s: WavesStatement): string {
  const alpha = report.verdict.alpha;
  const K = report.waves.length;
  switch (s.kind) {
    case 'latest': {
      const delta = s.deltaBiasCorrectedV === null ? '' : `; bias-corrected V ${glued(formatSigned(s.deltaBiasCorrectedV))}`;
      if ((s.noSharedLevel ?? []).length > 0) return `From ${s.from} to ${s.to}: no comparison is possible, the two waves share no level of ${s.noSharedLevel.join(' or of ')}.`;
      if (s.changed === null || s.pValue === null || s.test === null) return `From ${s.from} to ${s.to}: whether the association changed cannot be tested${delta}.`;
      return `From ${s.from} to ${s.to}: ${s.changed ? 'the association changed' : 'no evidence that the association changed'} (${comparison(s.pValue, alpha, s.changed)}, ${changeTestName(s.test)})${delta}.`;
    }
    case 'pattern': {
      const same =
        s.test === null || s.pValue === null || s.adjustedPValue === null || s.passes === null
          ? ''
          : ` (${sameTestName(s.test)}, ${glued('p', formatP(s.pValue))}, ${comparison(s.adjustedPValue, alpha, s.passes, true)})`;
      switch (s.pattern) {
        case 'stable':
          return `Across the ${s.waves} waves from ${s.first} to ${s.last} there is no convincing evidence that the association differs from wave to wave${same}.`;
        case 'uneven':
          return `The association is not the same in every wave${same}, but it shows no steady trend: it moves up and down.`;
        case 'differs':
          return `The association is not the same in every wave${same}.`;
        case 'grows':
        case 'fades':
          if (same === '') return `The association ${s.pattern} from ${s.first} to ${s.last}.`;
          return s.passes
            ? `The association is not the same in every wave${same}.`
            : `The test of the same association in every wave, which spreads its power over every kind of difference, does not reject it on its own${same}.`;
        case 'untestable':
          return 'No test across the waves can be computed for these tables.';
      }
      break;
    }
    case 'trend': {
      const what = s.method === 'odds-ratio' ? 'the odds ratio' : 'every log odds ratio (the strength of the whole pattern)';
      const step = s.perAverageWave;
      const perWave = step === null ? '' : `; that is ${factorWords(step.factor, 'wave')} at the waves' average spacing of ${spacingWords(step.spacing)}`;
      const size = `${what} changes by ${factorWords(s.factor, s.unit)}, ${intervalOfFactor(s.factorLower, s.factorUpper, s.confidence)}${perWave}`;
      const test = `${trendTestName(s.method, report.designed)}, ${glued('p', formatP(s.pValue))}, ${comparison(s.adjustedPValue, alpha, s.passes, true)}`;
      const direction = s.direction === null ? 'moves' : s.direction;
      if (s.passes) return `It ${direction}: ${size} (${test}).`;
      return `In this sample ${size}, but the data do not show a trend beyond chance (${test}).`;
    }
    case 'stands-out': {
      const how =
        s.direction === 'stronger'
          ? 'its odds ratio lies further from 1 than the common one'
          : s.direction === 'weaker'
            ? 'its odds ratio lies nearer to 1 than the common one'
            : 'its association differs from the one the other waves share';
      const z = s.z === null ? '' : `z ${glued(formatSigned(s.z, 2))}, `;
      return `Wave ${s.key} stands out: ${how} (${z}${glued('Holm-adjusted', 'p', formatP(s.adjustedPValue))} over the ${K} waves).`;
    }
    case 'more-stand-out':
      return `And ${s.count} more ${s.count === 1 ? 'wave stands' : 'waves stand'} out (all are in --format json).`;
    case 'margin': {
      return `${s.name}: ${s.drifted ? 'its distribution drifted over the waves' : 'no evidence its distribution drifted over the waves'} (${comparison(s.pValue, alpha, s.drifted)}, ${driftTestName(s.test, s.name)}).`;
    }
    case 'many-looks':
      return `${s.waves} waves are ${s.waves} looks at the data: a change from one wave to the next "significant at ${alphaPhrase(alpha)}" turns up by chance in about one comparison in ${Math.round(1 / alpha)} even when nothing moves, so weigh the tests across all waves above any single change.`;
  }
}

/** "0.182 (0.150 to 0.214)" — a wave's bias-corrected V and the interval of the population V. */
export function vWithInterval(v: number | null, lower: number | null | undefined, upper: number | null | undefined): string {
  if (lower === null || lower === undefined || upper === null || upper === undefined) return formatMeasure(v);
  return `${formatMeasure(v)}${GLUE}(${formatMeasure(lower)}–${formatMeasure(upper)})`;
}

/** A test across waves as the tables show it: a stable id (CSV), a short name, the numbers, and whether it is one of the two that decide. */
export interface AcrossTest {
  id: string;
  name: string;
  statistic: number;
  df: number;
  /** The F form's denominator df (design-based Wald tests), else null. */
  denDf: number | null;
  pValue: number;
  adjustedPValue: number | null;
  decides: boolean;
}

/** The tests across waves in the order the tables show them: the two that decide (Holm-adjusted together), then the others. */
export function acrossTests(report: WavesReport): AcrossTest[] {
  const out: AcrossTest[] = [];
  const same = report.sameAssociation;
  const trend = report.trend;
  const v = report.verdict;
  const add = (id: string, name: string, t: { statistic: number; df: number; pValue: number; denDf?: number | null }, adjustedPValue: number | null = null, decides = false) =>
    out.push({ id, name, statistic: t.statistic, df: t.df, denDf: t.denDf ?? null, pValue: t.pValue, adjustedPValue, decides });
  if (report.designed) {
    if (trend?.design) add(trend.method === 'odds-ratio' ? 'trend_odds_ratio_design' : 'trend_layer_effect_design', trend.method === 'odds-ratio' ? 'trend in the log odds ratio (design-based Wald F)' : 'trend in strength (layer-effect, design-based Wald F)', trend.design.test, v.trend?.adjustedPValue ?? null, true);
    if (same?.design) add('same_association_design', 'same log odds ratios in every wave (design-based Wald F)', same.design, v.sameAssociation?.adjustedPValue ?? null, true);
    if (trend?.design?.scatter) add('scatter_about_trend', trend.method === 'odds-ratio' ? 'waves about the trend line (Q)' : 'waves about the trend (Q)', trend.design.scatter);
    if (report.marginDrift.rows) add('drift_rows', `drift of ${report.rows.name} (design-based Wald F)`, report.marginDrift.rows.design ?? report.marginDrift.rows);
    if (report.marginDrift.cols) add('drift_cols', `drift of ${report.cols.name} (design-based Wald F)`, report.marginDrift.cols.design ?? report.marginDrift.cols);
    return out;
  }
  if (trend) add(trend.method === 'odds-ratio' ? 'trend_odds_ratio_score' : 'trend_layer_effect', trend.method === 'odds-ratio' ? 'trend in the odds ratio (score test)' : 'trend in strength (layer-effect model)', trend, v.trend?.adjustedPValue ?? null, true);
  if (same) add(same.test === 'breslow-day-tarone' ? 'same_odds_ratio' : 'same_association', same.test === 'breslow-day-tarone' ? 'same odds ratio in every wave (Breslow–Day–Tarone)' : 'same association in every wave (G²)', same, v.sameAssociation?.adjustedPValue ?? null, true);
  if (same?.equalOdds && same.interaction) add('no_three_way_interaction', 'no three-way interaction (G²)', same.interaction);
  if (trend?.woolf) add('trend_woolf', 'trend, Woolf-weighted regression (Wald)', trend.woolf.test);
  if (trend?.woolf?.residualHeterogeneity) add('scatter_about_trend', 'waves about the trend line (Q)', trend.woolf.residualHeterogeneity);
  if (trend?.layerEffect?.fit) add('scatter_about_trend', 'waves about the trend (G²)', trend.layerEffect.fit);
  if (report.marginDrift.rows) add('drift_rows', `drift of ${report.rows.name} (chi-square)`, report.marginDrift.rows);
  if (report.marginDrift.cols) add('drift_cols', `drift of ${report.cols.name} (chi-square)`, report.marginDrift.cols);
  return out;
}

/** "−0.0065 log strength per year, 95% interval −0.0087 to −0.0043". */
export function slopeWords(report: WavesReport): string | null {
  const t = report.trend;
  if (!t) return null;
  const what = t.method === 'odds-ratio' ? (t.design ? 'in the log odds ratio (GLS on the design-based variances)' : 'in the log odds ratio (Woolf)') : 'in the log strength (β)';
  const end = (x: number | null) => (x === null ? 'beyond the search range' : formatSigned(x, 4));
  return `slope ${formatSigned(t.slope, 4)} ${what} per ${t.unit}, ${Math.round(t.confidence * 1000) / 10}% interval ${end(t.lower)} to ${end(t.upper)}`;
}

