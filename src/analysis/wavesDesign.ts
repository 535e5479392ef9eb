/**
 * The tests across waves under a survey design: every wave is its own
 * independent sample (its own strata and PSUs, or its own replicate
 * weights), so the tests compare each wave's design-based estimates with
 * their design covariances (stats/waldAcrossSamples.ts): the log odds ratios
 * for the association (the same in every wave, a trend, a wave that stands
 * out) and the shares of each margin (drift).
 */
import { TabsightError } from '../errors.js';
import type { DesignEstimate, LonelyPsuTreatment, ReplicateMethod } from '../stats/designCovariance.js';
import { gradientCovariance, logOddsRatios, marginShares } from '../stats/designWald.js';
import { departuresFromOthers, layerEffectWald, linearTrend, precisions, SampleEstimate, WaldAcross, waldHomogeneity } from '../stats/waldAcrossSamples.js';
import type { WaveScores } from '../table/waveKeys.js';
import { designEstimate, type DesignInput } from './design.js';
import type { Warning } from './analyzeTable.js';

/** A design-based Wald test across waves: its F form leads (`statistic`, `df`, `denDf`, `pValue`), or W on χ² when the design df are too few. */
export interface WaveWald {
  statistic: number;
  df: number;
  /** The F form's denominator df; null when W itself is referred to χ². */
  denDf: number | null;
  pValue: number;
  wald: number;
  waldPValue: number;
  /** ν: the design df of the waves in the test together. */
  designDegreesOfFreedom: number;
}

export function waveWald(test: WaldAcross): WaveWald {
  return {
    statistic: test.statistic ?? test.wald,
    df: test.numDf,
    denDf: test.denDf,
    pValue: test.pValue ?? test.waldPValue,
    wald: test.wald,
    waldPValue: test.waldPValue,
    designDegreesOfFreedom: test.designDegreesOfFreedom,
  };
}

/** The survey design of a waves report: what was given, and each wave's own design. */
export interface WavesDesign {
  kind: 'taylor' | 'replicate';
  columns: { strata: string | null; cluster: string | null; fpc: string | null; weight: string | null; replicates: string[] };
  method: ReplicateMethod | null;
  rho: number | null;
  centre: 'replicate-mean' | 'full-sample' | null;
  lonelyPsu: LonelyPsuTreatment | null;
  /** Per wave, in wave order: its strata, PSUs (Taylor) or replicates, and design df; null where the design gives the wave no estimate (`reason`). */
  waves: { key: string; strata: number | null; clusters: number | null; replicates: number | null; degreesOfFreedom: number | null; reason: string | null }[];
  /** ν: the design df of the waves with an estimate, together. */
  degreesOfFreedom: number;
}

export interface DesignAcross {
  design: WavesDesign;
  /** Waves in the association tests (a cell empty in a wave leaves its log odds ratios undefined). */
  associationWaves: number[];
  same: WaveWald | null;
  /** 2×2: GLS regression of the log odds ratio on the score; r×c: the layer-effect model fitted by GLS. */
  linear: ReturnType<typeof linearTrend>;
  layerEffect: ReturnType<typeof layerEffectWald>;
  /** Per association wave (in `associationWaves` order): its departure from the others, or null. */
  departures: ({ test: WaveWald; z: number | null } | null)[] | null;
  /** The precision-weighted common log odds ratio (2×2), or null. */
  commonLogOddsRatio: number | null;
  drift: { rows: WaveWald | null; cols: WaveWald | null };
  warnings: Warning[];
}

function sampleOf(estimate: DesignEstimate, quantities: { values: number[]; gradients: Float64Array[] }): SampleEstimate {
  return { values: quantities.values, covariance: gradientCovariance(estimate.covariance, quantities.gradients), degreesOfFreedom: estimate.degreesOfFreedom };
}

/**
 * The design-based tests across the waves, on the shared levels (each
 * wave's design cells placed by their labels, so a level absent from a wave
 * is a zero there).
 */
export function designAcrossWaves(
  inputs: readonly { key: string; design?: DesignInput | null }[],
  rowLevels: string[],
  colLevels: string[],
  scores: WaveScores,
  confidence: number,
): DesignAcross {
  const r = rowLevels.length;
  const c = colLevels.length;
  const layout = { rowLevels, colLevels };
  const warnings: Warning[] = [];
  const estimates: (DesignEstimate | null)[] = [];
  const reasons: (string | null)[] = [];
  for (const w of inputs) {
    try {
      estimates.push(designEstimate(w.design as DesignInput, layout));
      reasons.push(null);
    } catch (error) {
      if (!(error instanceof TabsightError)) throw error;
      estimates.push(null);
      reasons.push(error.message);
    }
  }
  const first = inputs[0].design as DesignInput;
  const given = first.cells.design;
  const withEstimate = estimates.map((e, k) => ({ e, k })).filter((x): x is { e: DesignEstimate; k: number } => x.e !== null);
  const design: WavesDesign = {
    kind: given.kind,
    columns: {
      strata: given.kind === 'taylor' ? given.strata : null,
      cluster: given.kind === 'taylor' ? given.cluster : null,
      fpc: given.kind === 'taylor' ? given.fpc : null,
      weight: first.cells.weightColumn,
      replicates: first.cells.replicateColumns,
    },
    method: given.kind === 'replicate' ? given.method : null,
    rho: given.kind === 'replicate' && given.method === 'fay' ? given.rho : null,
    centre: given.kind === 'replicate' ? given.centre : null,
    lonelyPsu: given.kind === 'taylor' ? given.lonelyPsu : null,
    waves: inputs.map((w, k) => {
      const e = estimates[k];
      return { key: w.key, strata: e?.strata ?? null, clusters: e?.psus ?? null, replicates: e?.replicates ?? null, degreesOfFreedom: e?.degreesOfFreedom ?? null, reason: reasons[k] };
    }),
    degreesOfFreedom: withEstimate.reduce((s, x) => s + x.e.degreesOfFreedom, 0),
  };
  const failed = inputs.filter((_w, k) => estimates[k] === null).map((w) => w.key);
  if (failed.length > 0) {
    warnings.push({ code: 'design-wave-left-out', message: `${failed.length === 1 ? `wave ${failed[0]} has` : `waves ${failed.join(', ')} have`} no design-based estimate (${reasons.find((x) => x !== null)}) and ${failed.length === 1 ? 'is' : 'are'} left out of the tests across waves` });
  }

  // The association: each wave's (r−1)(c−1) log odds ratios against the last row and column.
  const association: { k: number; sample: SampleEstimate }[] = [];
  const emptyCell: string[] = [];
  for (const { e, k } of withEstimate) {
    const odds = logOddsRatios(e.proportions, r, c);
    if (odds === null) emptyCell.push(inputs[k].key);
    else association.push({ k, sample: sampleOf(e, odds) });
  }
  if (emptyCell.length > 0) {
    warnings.push({
      code: 'design-wave-left-out',
      message: `${emptyCell.length === 1 ? `wave ${emptyCell[0]} has` : `waves ${emptyCell.slice(0, 5).join(', ')}${emptyCell.length > 5 ? ', …' : ''} have`} an empty cell, so ${emptyCell.length === 1 ? 'its' : 'their'} log odds ratios are not defined; ${emptyCell.length === 1 ? 'it is' : 'they are'} left out of the design-based tests of the association across waves (merge sparse levels with --recode or --other to keep ${emptyCell.length === 1 ? 'it' : 'them'})`,
    });
  }
  const samples = association.map((a) => a.sample);
  const associationScores = association.map((a) => scores.values[a.k]);
  const twoByTwo = r === 2 && c === 2;
  let same: WaveWald | null = null;
  let linear: DesignAcross['linear'] = null;
  let layerEffect: DesignAcross['layerEffect'] = null;
  let departures: DesignAcross['departures'] = null;
  let commonLogOddsRatio: number | null = null;
  if (samples.length >= 2) {
    const homogeneity = waldHomogeneity(samples);
    same = homogeneity ? waveWald(homogeneity) : null;
    if (twoByTwo) {
      linear = linearTrend(samples, associationScores, confidence);
      if (linear) commonLogOddsRatio = linear.common;
    } else layerEffect = layerEffectWald(samples, associationScores, confidence);
    const A = samples.length >= 3 ? precisions(samples) : null;
    if (A) departures = departuresFromOthers(samples, A).map((d) => (d === null ? null : { test: waveWald(d.test), z: d.z }));
    if (same === null) warnings.push({ code: 'design-across-untestable', message: 'the design covariance of the waves\' log odds ratios is singular, so the design-based test of the same association in every wave is not defined' });
  } else {
    warnings.push({ code: 'design-across-untestable', message: `fewer than two waves have design-based log odds ratios, so the association cannot be compared across waves under the design` });
  }
  if (same !== null && same.denDf === null) {
    warnings.push({ code: 'few-design-df', message: `the waves' designs have ${same.designDegreesOfFreedom} degrees of freedom together, too few for the F form of the Wald test on ${same.df} df; the χ² form is given, and is optimistic` });
  }

  // The margins: the first r − 1 (c − 1) shares of every wave with an estimate.
  const shift = (by: 'row' | 'col'): WaveWald | null => {
    if (withEstimate.length < 2) return null;
    const test = waldHomogeneity(withEstimate.map(({ e }) => sampleOf(e, marginShares(e.proportions, r, c, by))));
    return test ? waveWald(test) : null;
  };
  return { design, associationWaves: association.map((a) => a.k), same, linear, layerEffect, departures, commonLogOddsRatio, drift: { rows: shift('row'), cols: shift('col') }, warnings };
}
