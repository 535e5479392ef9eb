/**
 * Many waves of the same pair of questions: each wave analysed as `pair`
 * analyses one table, the change between the last two waves as `compare`
 * reports it, and the tests across all waves — is the association the same
 * in every wave, does it grow or fade over them, does one wave stand out,
 * did each margin drift — with the one decision of the record and the facts
 * its sentences state.
 */
import type { TestResult } from '../stats/chiSquareTests.js';
import { upperTailChiSquare } from '../stats/chiSquareDistribution.js';
import { layerEffectTrend, LayerEffectTrend } from '../stats/layerEffectTrend.js';
import { DriftTest, marginDrift } from '../stats/marginDrift.js';
import { holm } from '../stats/multipleTesting.js';
import { breslowDayResiduals, breslowDayTarone, breslowDayTrend, CommonOddsRatio, mantelHaenszelOddsRatio } from '../stats/stratified.js';
import { layerDepartures, noThreeWayInteraction, NoThreeWayInteractionFit } from '../stats/threeWay.js';
import { LogOddsRatioTrend, woolfTrend } from '../stats/woolfTrend.js';
import { dataError } from '../errors.js';
import { dropEmptyLevels, relabelTable } from '../table/twoWayTable.js';
import type { WaveKeyKind, WaveScores } from '../table/waveKeys.js';
import { rescaleToEffectiveSize } from '../table/weighting.js';
import { TOOL_VERSION } from '../version.js';
import { AnalysisOptions, Evidence, evidenceOf, NamedVariable, Warning } from './analyzeTable.js';
import { unknownOrderWarnings } from './report.js';
import { ChangeTest, compareReport, CompareReport, PeriodInput, PeriodRecord, periodRecord, unionOfLevels } from './compare.js';
import { DesignAcross, designAcrossWaves, waveWald as waveWaldOf, WavesDesign, WaveWald } from './wavesDesign.js';

/** One wave as counted: the period of `compare`, plus the short name the report shows. */
export interface WaveInput extends PeriodInput {
  /** The wave's short name: its date, week or number as written, its period level, or its file's base name. */
  key: string;
}

/** How the waves came and in what order they stand. */
export interface WaveSetup {
  /** 'files': several files (or a pattern); 'column': one file with a period column. */
  source: 'files' | 'column';
  /** The period column (source 'column'), else null. */
  period: string | null;
  /** The patterns (with *, ?, [...]) the files came from, as given. */
  patterns: string[];
  /** 'names': by the keys in the file names; 'given': as given; 'natural': period levels in natural order; 'codebook': period levels in the order of the column's codebook (and recodes); 'listed': as listed by --levels. */
  orderedBy: 'names' | 'given' | 'natural' | 'codebook' | 'listed';
  /** The kind of key every wave carries, or null. */
  keyKind: WaveKeyKind | null;
  scores: WaveScores;
  /** With a period column: rows whose period value is missing (they belong to no wave). */
  withoutWave: number;
}

export type WaveRecord = PeriodRecord & { key: string; score: number };

export interface SameAssociation {
  /** The test that decides: Breslow–Day with Tarone's correction for 2×2 tables, else the G² of no three-way interaction; with a survey design the design-based Wald test of equal log odds ratios. */
  test: 'breslow-day-tarone' | 'no-three-way-interaction' | 'design-wald';
  statistic: number;
  df: number;
  pValue: number;
  /** No three-way interaction (all shapes), fitted by IPF. */
  interaction: {
    statistic: number;
    df: number;
    pValue: number;
    pearson: TestResult;
    iterations: number;
    converged: boolean;
    nominalDf: number;
    dfAdjusted: boolean;
    zeroFittedCells: number;
  } | null;
  /** 2×2: equal odds ratios in every wave (Breslow–Day, Tarone's correction), around the Mantel–Haenszel common odds ratio. */
  equalOdds: (TestResult & { uncorrected: number; commonOddsRatio: CommonOddsRatio }) | null;
  /** With a survey design: the Wald test (F form and W) and the waves it compares (those with defined log odds ratios). */
  design: (WaveWald & { waves: string[] }) | null;
}

export interface WavesTrend {
  /** 'odds-ratio' (2×2: score test of Breslow & Day, size by Woolf-weighted regression) or 'layer-effect' (r×c: Xie 1992). */
  method: 'odds-ratio' | 'layer-effect';
  /** The test that decides, on 1 df. */
  statistic: number;
  df: number;
  pValue: number;
  /** Change per unit of score: in the log odds ratio (odds-ratio) or in the log of the association's strength (layer-effect, β). */
  slope: number;
  lower: number | null;
  upper: number | null;
  confidence: number;
  /** exp(slope), exp(lower), exp(upper): the factor on the odds ratio (odds-ratio) or on every log odds ratio (layer-effect) per unit. */
  factor: number;
  factorLower: number | null;
  factorUpper: number | null;
  unit: WaveScores['unit'];
  /** Dated waves: the same change over one average step between waves (`spacing`, in years): factor^spacing, and its interval. */
  perAverageWave: { spacing: number; factor: number; factorLower: number | null; factorUpper: number | null } | null;
  /** Whether the association grows (moves away from independence) or fades; null when it cannot be told (no slope, an odds ratio of 1). */
  direction: 'grows' | 'fades' | null;
  /** False when a fit reached its sweep bound before settling (the numbers are then provisional). */
  converged: boolean;
  /** Per wave: the odds ratio on the fitted Woolf line, exp(intercept + slope · score) (odds-ratio), or φ_k, the wave's strength relative to the mean wave (layer-effect). */
  fitted: number[];
  scoreTest: (TestResult & { direction: -1 | 0 | 1 }) | null;
  woolf: LogOddsRatioTrend | null;
  layerEffect: Omit<LayerEffectTrend, 'test'> | null;
  /** With a survey design: the trend fitted by GLS to each wave's design-based log odds ratios (the Wald test, F form on 1 and ν df). */
  design: {
    test: WaveWald;
    standardError: number;
    /** The waves in the fit (those with defined log odds ratios). */
    waves: string[];
    /** 2×2: the waves about the line (Q on K − 2 df); r×c: the trend model's own fit (Q on (K−1)(r−1)(c−1) − 1 df). */
    scatter: TestResult | null;
    /** r×c: the common pattern of log odds ratios at the mean score; 2×2: null. */
    pattern: number[] | null;
  } | null;
}

export interface WaveDeparture {
  /** The wave's position in `waves`. */
  wave: number;
  key: string;
  /** 2×2: (a − A)/√Var around the common odds ratio (Breslow & Day); r×c: null. */
  z: number | null;
  /** 2×2: z²; r×c: G² of no three-way interaction minus that of the other waves; with a survey design the Wald F of the wave against the others' common log odds ratios. */
  statistic: number;
  df: number;
  /** With a survey design: the F form's denominator df (null when W is referred to χ²); otherwise null. */
  denDf: number | null;
  pValue: number;
  /** Holm's adjustment over the waves tested. */
  adjustedPValue: number;
  /** adjustedPValue ≤ alpha. */
  standsOut: boolean;
  /** 2×2: whether this wave's odds ratio lies further from 1 than the common one ('stronger') or nearer; r×c: null. */
  direction: 'stronger' | 'weaker' | null;
}

export interface WaveDrift {
  /** The test that decides: Pearson's chi-square of margin × wave, or with a survey design the design-based Wald test of equal shares. */
  test: 'pearson' | 'design-wald';
  statistic: number;
  df: number;
  pValue: number;
  /** Without a design: the tests of homogeneity of margin × wave; null with a design. */
  pearson: TestResult | null;
  likelihoodRatio: TestResult | null;
  /** With a survey design: the Wald test (F form and W). */
  design: WaveWald | null;
  /** pValue ≤ alpha. */
  drifted: boolean;
  /** Each wave's shares of the margin's levels, in percent (rows: waves, columns: levels), from the weighted counts shown. */
  shares: (number | null)[][];
}

export interface PartialLevel {
  level: string;
  /** Keys of the waves the level does not occur in (it is counted as zero there). */
  absentFrom: string[];
}

export interface WavesVerdict {
  alpha: number;
  /** Did the association move over the waves: the trend test or the test of the same association in every wave passes after Holm's adjustment for the two. */
  moved: boolean;
  /** 'grows'/'fades': the trend test passes; 'uneven': only the same-association test does; 'differs': it does and no trend could be fitted; 'stable': neither; 'untestable': no test could be computed. */
  pattern: 'grows' | 'fades' | 'uneven' | 'differs' | 'stable' | 'untestable';
  trend: { pValue: number; adjustedPValue: number; passes: boolean } | null;
  sameAssociation: { pValue: number; adjustedPValue: number; passes: boolean } | null;
  /** The smallest adjusted p-value of the two, the one `moved` rests on. */
  decidingPValue: number | null;
  evidence: Evidence;
}

/** Sentence facts, in reading order; renderers put them into words. */
export type WavesStatement =
  | { kind: 'latest'; from: string; to: string; changed: boolean | null; pValue: number | null; test: ChangeTest['method'] | null; deltaBiasCorrectedV: number | null; noSharedLevel: string[] }
  | { kind: 'pattern'; pattern: WavesVerdict['pattern']; waves: number; first: string; last: string; test: SameAssociation['test'] | null; pValue: number | null; adjustedPValue: number | null; passes: boolean | null }
  | { kind: 'trend'; method: WavesTrend['method']; direction: WavesTrend['direction']; passes: boolean; factor: number; factorLower: number | null; factorUpper: number | null; confidence: number; unit: WavesTrend['unit']; perAverageWave: WavesTrend['perAverageWave']; pValue: number; adjustedPValue: number }
  | { kind: 'stands-out'; key: string; direction: WaveDeparture['direction']; z: number | null; adjustedPValue: number }
  | { kind: 'more-stand-out'; count: number }
  | { kind: 'margin'; side: 'rows' | 'cols'; name: string; drifted: boolean; pValue: number; test: WaveDrift['test'] }
  | { kind: 'many-looks'; waves: number };

export interface WavesReport {
  tool: { name: 'tabsight'; version: string };
  command: 'waves';
  /** With --codebook describing the column: its question, ordered flag and the codes of each level, as in pair. */
  rows: NamedVariable;
  cols: NamedVariable;
  setup: WaveSetup;
  waves: WaveRecord[];
  /** The last two waves compared, field for field as `compare` reports them: the weekly question. */
  latest: CompareReport;
  sameAssociation: SameAssociation | null;
  trend: WavesTrend | null;
  /** From three waves on: each wave's departure from the association the others share, Holm-adjusted over the waves. */
  departures: WaveDeparture[] | null;
  marginDrift: { rows: WaveDrift | null; cols: WaveDrift | null };
  /** Levels that occur in some waves only. */
  partialLevels: { rows: PartialLevel[]; cols: PartialLevel[] };
  /**
   * Waves that share no level of a side with any other wave: their
   * association can be compared with none of the others', so the tests
   * across waves (same association, trend, departures) leave them out; with
   * fewer than two waves left, no comparison is possible ('untestable').
   */
  isolatedWaves: string[];
  verdict: WavesVerdict;
  statements: WavesStatement[];
  /** Sampling weights: every test across waves uses each wave's table rescaled to its effective sample size (without a design). */
  weighted: boolean;
  /** A survey design: each wave its own sample, each wave's leading test design-based, the tests across waves design-based Wald tests. */
  designed: boolean;
  design: WavesDesign | null;
  settings: { alpha: number; confidence: number; spacing: 'auto' | 'even' };
  warnings: Warning[];
}

const MAX_NAMED_DEPARTURES = 3;

/** What --exit-status cannot answer from the waves: no test across them could be computed (why, in words); null when the verdict decides. */
export function undecidedWaves(report: Pick<WavesReport, 'verdict' | 'isolatedWaves' | 'waves'>): string | null {
  if (report.verdict.pattern !== 'untestable') return null;
  if (report.waves.length - report.isolatedWaves.length < 2) return `fewer than two of the ${report.waves.length} waves share levels of both sides with another wave, so no comparison over the waves is possible`;
  return `whether the association moved over the ${report.waves.length} waves cannot be tested for these tables`;
}

function partial(levels: readonly string[], present: readonly (readonly string[])[], keys: readonly string[]): PartialLevel[] {
  const out: PartialLevel[] = [];
  for (const level of levels) {
    const absentFrom = keys.filter((_k, w) => !present[w].includes(level));
    if (absentFrom.length > 0) out.push({ level, absentFrom });
  }
  return out;
}

function sameAssociation(stack: number[][][], fit: NoThreeWayInteractionFit | null, twoByTwo: boolean, confidence: number): SameAssociation | null {
  const interaction = fit
    ? { statistic: fit.statistic, df: fit.df, pValue: fit.pValue, pearson: fit.pearson, iterations: fit.iterations, converged: fit.converged, nominalDf: fit.nominalDf, dfAdjusted: fit.dfAdjusted, zeroFittedCells: fit.zeroFittedCells }
    : null;
  let equalOdds: SameAssociation['equalOdds'] = null;
  if (twoByTwo) {
    const common = mantelHaenszelOddsRatio(stack, confidence);
    const bdt = common ? breslowDayTarone(stack, common.estimate) : null;
    if (common && bdt) equalOdds = { ...bdt, commonOddsRatio: common };
  }
  if (equalOdds) return { test: 'breslow-day-tarone', statistic: equalOdds.statistic, df: equalOdds.df, pValue: equalOdds.pValue, interaction, equalOdds, design: null };
  if (interaction) return { test: 'no-three-way-interaction', statistic: interaction.statistic, df: interaction.df, pValue: interaction.pValue, interaction, equalOdds: null, design: null };
  return null;
}

/** The change over one average step between dated waves. */
/** A trend's slope in the log strength with its interval, as a factor per unit of the scores and per average wave. */
function slopeFields(scores: WaveScores, slope: number, lower: number | null, upper: number | null, confidence: number) {
  const factorOf = (x: number | null) => (x === null ? null : Math.exp(x));
  return { slope, lower, upper, confidence, factor: Math.exp(slope), factorLower: factorOf(lower), factorUpper: factorOf(upper), unit: scores.unit, perAverageWave: perAverageWave(scores, slope, lower, upper) };
}

function perAverageWave(scores: WaveScores, slope: number, lower: number | null, upper: number | null): WavesTrend['perAverageWave'] {
  if (scores.unit !== 'year' || scores.values.length < 2) return null;
  const spacing = (Math.max(...scores.values) - Math.min(...scores.values)) / (scores.values.length - 1);
  const at = (x: number | null) => (x === null ? null : Math.exp(x * spacing));
  return { spacing, factor: Math.exp(slope * spacing), factorLower: at(lower), factorUpper: at(upper) };
}

function trendOf(stack: number[][][], scores: WaveScores, twoByTwo: boolean, confidence: number, commonLogOdds: number | null): WavesTrend | null {
  if (twoByTwo) {
    const common = mantelHaenszelOddsRatio(stack, confidence);
    if (!common) return null;
    const score = breslowDayTrend(stack, scores.values, common.estimate);
    const woolf = woolfTrend(stack, scores.values, confidence);
    if (!score || !woolf) return null;
    const slope = woolf.slope;
    const logOdds = commonLogOdds ?? 0;
    const direction = slope === 0 || logOdds === 0 ? null : Math.sign(slope) === Math.sign(logOdds) ? 'grows' : 'fades';
    return {
      method: 'odds-ratio',
      statistic: score.statistic,
      df: score.df,
      pValue: score.pValue,
      ...slopeFields(scores, slope, woolf.lower, woolf.upper, confidence),
      direction,
      converged: true,
      fitted: scores.values.map((x) => Math.exp(woolf.intercept + slope * x)),
      scoreTest: score,
      woolf,
      layerEffect: null,
      design: null,
    };
  }
  const fit = layerEffectTrend(stack, scores.values, confidence);
  if (!fit) return null;
  const { test, ...layerEffect } = fit;
  return {
    method: 'layer-effect',
    statistic: test.statistic,
    df: test.df,
    pValue: test.pValue,
    ...slopeFields(scores, fit.slope, fit.lower, fit.upper, confidence),
    direction: fit.slope > 0 ? 'grows' : fit.slope < 0 ? 'fades' : null,
    converged: fit.converged,
    fitted: fit.layerStrength,
    scoreTest: null,
    woolf: null,
    layerEffect,
    design: null,
  };
}

function departuresOf(stack: number[][][], fit: NoThreeWayInteractionFit | null, keys: readonly string[], twoByTwo: boolean, alpha: number, commonOddsRatio: number | null): WaveDeparture[] | null {
  if (stack.length < 3) return null;
  const raw: ({ z: number | null; statistic: number; df: number; pValue: number } | null)[] = [];
  if (twoByTwo) {
    if (commonOddsRatio === null) return null;
    for (const z of breslowDayResiduals(stack, commonOddsRatio)) raw.push(z === null ? null : { z, statistic: z * z, df: 1, pValue: upperTailChiSquare(z * z, 1) });
  } else {
    const tests = layerDepartures(stack, {}, fit);
    if (tests === null) return null;
    for (const t of tests) raw.push(t === null ? null : { z: null, statistic: t.statistic, df: t.df, pValue: t.pValue });
  }
  const tested = raw.map((r, w) => ({ r, w })).filter((x) => x.r !== null);
  if (tested.length < 3) return null;
  const adjusted = holm(tested.map((x) => x.r!.pValue));
  return tested.map(({ r, w }, k) => {
    const z = r!.z;
    const direction = z === null || commonOddsRatio === null || commonOddsRatio === 1 || z === 0 ? null : (z > 0) === (commonOddsRatio > 1) ? 'stronger' : 'weaker';
    return { wave: w, key: keys[w], z, statistic: r!.statistic, df: r!.df, denDf: null, pValue: r!.pValue, adjustedPValue: adjusted[k], standsOut: adjusted[k] <= alpha, direction };
  });
}

function sharesOf(margins: number[][]): (number | null)[][] {
  return margins.map((m) => {
    const total = m.reduce((s, v) => s + v, 0);
    return m.map((v) => (total > 0 ? (100 * v) / total : null));
  });
}

function driftOf(test: DriftTest | null, margins: number[][], alpha: number): WaveDrift | null {
  if (test === null) return null;
  const p = test.pearson;
  return { test: 'pearson', statistic: p.statistic, df: p.df, pValue: p.pValue, pearson: p, likelihoodRatio: test.likelihoodRatio, design: null, drifted: p.pValue <= alpha, shares: sharesOf(margins) };
}

function designDriftOf(test: WaveWald | null, margins: number[][], alpha: number): WaveDrift | null {
  if (test === null) return null;
  return { test: 'design-wald', statistic: test.statistic, df: test.df, pValue: test.pValue, pearson: null, likelihoodRatio: null, design: test, drifted: test.pValue <= alpha, shares: sharesOf(margins) };
}

/** The design-based trend record from the GLS fits. */
function designTrendOf(across: DesignAcross, scores: WaveScores, keys: readonly string[], confidence: number): WavesTrend | null {
  const used = across.associationWaves.map((k) => keys[k]);
  if (across.linear) {
    const fit = across.linear;
    const test = waveWaldOf(fit.test);
    const common = across.commonLogOddsRatio ?? 0;
    const direction = fit.slope === 0 || common === 0 ? null : Math.sign(fit.slope) === Math.sign(common) ? 'grows' : 'fades';
    return {
      method: 'odds-ratio',
      statistic: test.statistic,
      df: test.df,
      pValue: test.pValue,
      ...slopeFields(scores, fit.slope, fit.lower, fit.upper, confidence),
      direction,
      converged: true,
      fitted: scores.values.map((x) => Math.exp(fit.intercept + fit.slope * x)),
      scoreTest: null,
      woolf: null,
      layerEffect: null,
      design: { test, standardError: fit.standardError, waves: used, scatter: fit.scatter, pattern: null },
    };
  }
  if (across.layerEffect) {
    const fit = across.layerEffect;
    const test = waveWaldOf(fit.test);
    return {
      method: 'layer-effect',
      statistic: test.statistic,
      df: test.df,
      pValue: test.pValue,
      ...slopeFields(scores, fit.slope, fit.lower, fit.upper, confidence),
      direction: fit.slope > 0 ? 'grows' : fit.slope < 0 ? 'fades' : null,
      converged: true,
      fitted: scores.values.map((x) => Math.exp(fit.slope * (x - fit.scoreCentre))),
      scoreTest: null,
      woolf: null,
      layerEffect: null,
      design: { test, standardError: fit.standardError, waves: used, scatter: fit.fit, pattern: fit.pattern },
    };
  }
  return null;
}

/** Each association wave's departure from the others' common log odds ratios, Holm-adjusted over the waves tested. */
function designDeparturesOf(across: DesignAcross, keys: readonly string[], alpha: number): WaveDeparture[] | null {
  if (across.departures === null) return null;
  const tested = across.departures.map((d, at) => ({ d, w: across.associationWaves[at] })).filter((x) => x.d !== null);
  if (tested.length < 3) return null;
  const adjusted = holm(tested.map((x) => x.d!.test.pValue));
  const common = across.commonLogOddsRatio;
  return tested.map(({ d, w }, k) => {
    const z = d!.z;
    const direction = z === null || common === null || common === 0 || z === 0 ? null : (z > 0) === (common > 0) ? 'stronger' : 'weaker';
    return { wave: w, key: keys[w], z, statistic: d!.test.statistic, df: d!.test.df, denDf: d!.test.denDf, pValue: d!.test.pValue, adjustedPValue: adjusted[k], standsOut: adjusted[k] <= alpha, direction };
  });
}

function verdictOf(trend: WavesTrend | null, same: SameAssociation | null, alpha: number): WavesVerdict {
  const ps = [trend?.pValue, same?.pValue].filter((p): p is number => p !== undefined);
  const adjusted = holm(ps);
  let at = 0;
  const entry = (p: number | undefined) => {
    if (p === undefined) return null;
    const adjustedPValue = adjusted[at++];
    return { pValue: p, adjustedPValue, passes: adjustedPValue <= alpha };
  };
  const t = entry(trend?.pValue);
  const s = entry(same?.pValue);
  const deciding = ps.length > 0 ? Math.min(...adjusted) : null;
  const pattern: WavesVerdict['pattern'] =
    t === null && s === null ? 'untestable' : t?.passes ? (trend!.direction === 'fades' ? 'fades' : 'grows') : s?.passes ? (t === null ? 'differs' : 'uneven') : 'stable';
  const moved = (t?.passes ?? false) || (s?.passes ?? false);
  return { alpha, moved, pattern, trend: t, sameAssociation: s, decidingPValue: deciding, evidence: deciding === null ? 'none' : evidenceOf(deciding, alpha) };
}

/**
 * The waves report: K ≥ 2 waves of the same pair, in wave order, with the
 * scores a trend is measured on. Levels are the union of the waves' levels
 * (those named by --row-order/--col-order first); a level absent from a
 * wave counts zero there and is listed. Tests across waves use each wave's
 * table rescaled to its effective sample size under sampling weights.
 */
export function analyzeWaves(inputs: readonly WaveInput[], setup: WaveSetup, options: AnalysisOptions, order: { rows?: string[]; cols?: string[] } = {}, spacing: 'auto' | 'even' = 'auto', extraWarnings: Warning[] = []): WavesReport {
  const K = inputs.length;
  if (K < 2) throw dataError(`waves needs at least two waves; found ${K}`);
  if (setup.scores.values.length !== K) throw new Error(`analyzeWaves: ${K} waves but ${setup.scores.values.length} scores`);
  const alpha = options.alpha;
  const keys = inputs.map((w) => w.key);
  const rowName = inputs[0].table.rowName;
  const colName = inputs[0].table.colName;
  const present = inputs.map((w) => dropEmptyLevels(w.table));
  const rowLevels = unionOfLevels(present.map((t) => t.rowLevels), order.rows);
  const colLevels = unionOfLevels(present.map((t) => t.colLevels), order.cols);
  for (const [name, levels] of [
    [rowName, rowLevels],
    [colName, colLevels],
  ] as const) {
    if (levels.length < 2) throw dataError(`column "${name}" has ${levels.length === 0 ? 'no value' : `a single level ("${levels[0]}")`} in the counted rows of every wave; an association needs at least two`);
  }
  const twoByTwo = rowLevels.length === 2 && colLevels.length === 2;

  // Each wave on the shared levels, in the report's level order.
  const aligned = inputs.map((w) => ({ ...w, table: relabelTable(w.table, rowLevels, colLevels) }));
  const waves: WaveRecord[] = aligned.map((w, k) => ({ ...periodRecord(w, options), key: w.key, score: setup.scores.values[k] }));
  const stack = aligned.map((w) => rescaleToEffectiveSize(w.table.counts, w.weighting));
  const latest = compareReport(inputs[K - 2], inputs[K - 1], options, order);

  // A wave that shares no level of a side with the others has an association comparable with none of theirs: left out of the tests across waves.
  const shares = (levels: readonly string[], others: readonly (readonly string[])[]) => levels.some((l) => others.some((o) => o.includes(l)));
  const isolated = present.map((t, w) => {
    const others = present.filter((_t, k) => k !== w);
    return !shares(t.rowLevels, others.map((o) => o.rowLevels)) || !shares(t.colLevels, others.map((o) => o.colLevels));
  });
  const kept = keys.map((_k, w) => w).filter((w) => !isolated[w]);
  const compared = kept.length >= 2;
  const shownRowMargins = aligned.map((w) => w.table.counts.map((row) => row.reduce((s, v) => s + v, 0)));
  const shownColMargins = aligned.map((w) => colLevels.map((_l, j) => w.table.counts.reduce((s, row) => s + row[j], 0)));
  const designed = inputs.every((w) => w.design);

  let same: SameAssociation | null;
  let trend: WavesTrend | null;
  let departures: WaveDeparture[] | null;
  let marginDriftRecord: WavesReport['marginDrift'];
  let across: DesignAcross | null = null;
  if (designed) {
    // Each wave its own sample: design-based Wald tests on each wave's estimates and design covariance.
    across = designAcrossWaves(inputs, rowLevels, colLevels, setup.scores, options.confidence);
    const used = across.associationWaves.map((k) => keys[k]);
    same = across.same ? { test: 'design-wald', statistic: across.same.statistic, df: across.same.df, pValue: across.same.pValue, interaction: null, equalOdds: null, design: { ...across.same, waves: used } } : null;
    trend = designTrendOf(across, setup.scores, keys, options.confidence);
    departures = designDeparturesOf(across, keys, alpha);
    marginDriftRecord = { rows: designDriftOf(across.drift.rows, shownRowMargins, alpha), cols: designDriftOf(across.drift.cols, shownColMargins, alpha) };
  } else {
    const keptStack = kept.map((w) => stack[w]);
    // The fit of no three-way interaction serves the same-association test and, r×c, each wave's departure from it.
    const interactionFit = compared ? noThreeWayInteraction(keptStack) : null;
    same = compared ? sameAssociation(keptStack, interactionFit, twoByTwo, options.confidence) : null;
    const common = same?.equalOdds?.commonOddsRatio.estimate ?? (twoByTwo && compared ? (mantelHaenszelOddsRatio(keptStack, options.confidence)?.estimate ?? null) : null);
    trend = compared ? trendOf(keptStack, { ...setup.scores, values: kept.map((w) => setup.scores.values[w]) }, twoByTwo, options.confidence, common === null ? null : Math.log(common)) : null;
    departures = compared ? (departuresOf(keptStack, interactionFit, kept.map((w) => keys[w]), twoByTwo, alpha, common)?.map((d) => ({ ...d, wave: kept[d.wave] })) ?? null) : null;
    const drift = marginDrift(stack);
    marginDriftRecord = { rows: driftOf(drift.rows, shownRowMargins, alpha), cols: driftOf(drift.columns, shownColMargins, alpha) };
  }
  if (!compared) {
    // Fewer than two waves share levels with another: nothing across waves can be compared, under a design or not.
    same = null;
    trend = null;
    departures = null;
  }
  const partialLevels = { rows: partial(rowLevels, present.map((t) => t.rowLevels), keys), cols: partial(colLevels, present.map((t) => t.colLevels), keys) };
  const verdict = verdictOf(trend, same, alpha);

  const warnings: Warning[] = [
    ...extraWarnings,
    ...unknownOrderWarnings('--row-order', (order.rows ?? []).filter((l) => !rowLevels.includes(l))),
    ...unknownOrderWarnings('--col-order', (order.cols ?? []).filter((l) => !colLevels.includes(l))),
    ...(across?.warnings ?? []),
  ];
  const describe = (name: string, levels: PartialLevel[]) =>
    levels.map((p) => `${name} "${p.level}" (absent from ${p.absentFrom.length === 1 ? `wave ${p.absentFrom[0]}` : `${p.absentFrom.length} waves: ${p.absentFrom.slice(0, 5).join(', ')}${p.absentFrom.length > 5 ? ', …' : ''}`})`);
  const partialWords = [...describe(rowName, partialLevels.rows), ...describe(colName, partialLevels.cols)];
  if (partialWords.length > 0) {
    warnings.push({ code: 'level-in-some-waves', message: `levels that occur in some waves only are counted as zero in the others: ${partialWords.join('; ')}` });
  }
  const isolatedWaves = keys.filter((_k, w) => isolated[w]);
  if (isolatedWaves.length > 0) {
    warnings.unshift({
      code: 'wave-shares-no-level',
      message: compared
        ? `${isolatedWaves.length === 1 ? `wave ${isolatedWaves[0]} shares` : `waves ${isolatedWaves.slice(0, 5).join(', ')}${isolatedWaves.length > 5 ? ', …' : ''} share`} no level of ${rowName} or of ${colName} with the other waves, so ${isolatedWaves.length === 1 ? 'its' : 'their'} association can be compared with none of theirs${designed ? '' : ': left out of the tests across waves'}; check the labels, or map the levels onto each other with --recode`
        : `fewer than two waves share levels of both ${rowName} and ${colName} with another wave, so no comparison over the waves is possible; check the labels, or map the levels onto each other with --recode`,
    });
  }
  const untestable = waves.filter((w) => !w.testable);
  if (untestable.length > 0) {
    const who = untestable.length === 1 ? `wave ${untestable[0].key} has` : `waves ${untestable.map((w) => w.key).join(', ')} have`;
    if (designed) {
      // Under a design a wave can also lack a test because its design gives no variance (the reason says which).
      const reasons = [...new Set(untestable.map((w) => (w.testable ? '' : w.reason)))];
      warnings.push({ code: 'wave-not-testable', message: `${who} no test of their own: ${reasons.join('; ')}` });
    } else {
      warnings.push({ code: 'wave-not-testable', message: `${who} fewer than two levels on a side and no test of their own; they still count in the tests across waves` });
    }
  }
  const sparse = waves.filter((w) => w.testable && !w.expectedCountRule.passes).map((w) => w.key);
  if (sparse.length > 0) {
    warnings.push({
      code: 'sparse-waves',
      message: `${sparse.length === 1 ? `wave ${sparse[0]} fails` : `${sparse.length} of ${K} waves fail`} the expected-count rule${sparse.length > 1 ? ` (${sparse.slice(0, 5).join(', ')}${sparse.length > 5 ? ', …' : ''})` : ''}: ${designed ? 'exact tests are not defined under a survey design, so their own tests and' : 'their own p-values are exact or simulated, but'} the tests across waves rest on ${designed ? 'large-sample' : 'chi-square'} approximations; read them with care, or merge sparse levels (--recode, --other)`,
    });
  }
  if (same?.interaction && !same.interaction.converged) {
    warnings.push({ code: 'fit-not-converged', message: `the fit of the same association in every wave did not settle within ${same.interaction.iterations} sweeps; its G² is provisional` });
  }
  if (trend && !trend.converged) {
    warnings.push({ code: 'fit-not-converged', message: 'the fit of the trend model did not settle within its sweep bound; the trend and its interval are provisional' });
  }
  const span = Math.max(...setup.scores.values) - Math.min(...setup.scores.values);
  if (trend === null && span > 0 && compared) {
    warnings.push({
      code: 'trend-not-fitted',
      message: designed
        ? 'no design-based trend could be estimated: fewer than two waves have defined log odds ratios with an invertible design covariance'
        : twoByTwo
        ? 'no trend in the odds ratio could be estimated: fewer than two waves have a defined odds ratio'
        : 'no trend could be estimated: the trend model does not settle on these sparse tables (cells of zero leave its fit without a finite estimate); merge sparse levels (--recode, --other) to test for a trend',
    });
  }
  if (setup.withoutWave > 0) {
    warnings.push({ code: 'no-wave', message: `${setup.withoutWave.toLocaleString('en-US')} ${setup.withoutWave === 1 ? 'row is' : 'rows are'} in no wave: ${setup.withoutWave === 1 ? 'its' : 'their'} value of ${setup.period ?? 'the period column'} is missing (or its level has no row with both values of the pair)` });
  }

  const statements: WavesStatement[] = [];
  statements.push({
    kind: 'latest',
    from: keys[K - 2],
    to: keys[K - 1],
    changed: latest.verdict?.changed ?? null,
    pValue: latest.verdict?.pValue ?? null,
    test: latest.change?.method ?? null,
    deltaBiasCorrectedV: latest.deltaBiasCorrectedV,
    noSharedLevel: latest.noSharedLevel,
  });
  statements.push({
    kind: 'pattern',
    pattern: verdict.pattern,
    // The waves the tests across waves compared (those sharing levels with the others).
    waves: compared ? kept.length : K,
    first: keys[compared ? kept[0] : 0],
    last: keys[compared ? kept[kept.length - 1] : K - 1],
    test: same?.test ?? null,
    pValue: same?.pValue ?? null,
    adjustedPValue: verdict.sameAssociation?.adjustedPValue ?? null,
    passes: verdict.sameAssociation?.passes ?? null,
  });
  if (trend && verdict.trend) {
    statements.push({
      kind: 'trend',
      method: trend.method,
      direction: trend.direction,
      passes: verdict.trend.passes,
      factor: trend.factor,
      factorLower: trend.factorLower,
      factorUpper: trend.factorUpper,
      confidence: trend.confidence,
      unit: trend.unit,
      perAverageWave: trend.perAverageWave,
      pValue: trend.pValue,
      adjustedPValue: verdict.trend.adjustedPValue,
    });
  }
  const standing = (departures ?? []).filter((d) => d.standsOut).sort((a, b) => a.adjustedPValue - b.adjustedPValue);
  for (const d of standing.slice(0, MAX_NAMED_DEPARTURES)) statements.push({ kind: 'stands-out', key: d.key, direction: d.direction, z: d.z, adjustedPValue: d.adjustedPValue });
  if (standing.length > MAX_NAMED_DEPARTURES) statements.push({ kind: 'more-stand-out', count: standing.length - MAX_NAMED_DEPARTURES });
  if (marginDriftRecord.rows) statements.push({ kind: 'margin', side: 'rows', name: rowName, drifted: marginDriftRecord.rows.drifted, pValue: marginDriftRecord.rows.pValue, test: marginDriftRecord.rows.test });
  if (marginDriftRecord.cols) statements.push({ kind: 'margin', side: 'cols', name: colName, drifted: marginDriftRecord.cols.drifted, pValue: marginDriftRecord.cols.pValue, test: marginDriftRecord.cols.test });
  statements.push({ kind: 'many-looks', waves: K });

  return {
    tool: { name: 'tabsight', version: TOOL_VERSION },
    command: 'waves',
    rows: { name: rowName, levels: rowLevels },
    cols: { name: colName, levels: colLevels },
    setup,
    waves,
    latest,
    sameAssociation: same,
    trend,
    departures,
    marginDrift: marginDriftRecord,
    partialLevels,
    isolatedWaves,
    verdict,
    statements,
    weighted: inputs.some((w) => w.weighting.kind === 'weight'),
    designed,
    design: across?.design ?? null,
    settings: { alpha, confidence: options.confidence, spacing },
    warnings,
  };
}
