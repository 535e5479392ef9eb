import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { ROOT } from '../helpers.js';

/** Values recorded by scripts/record_waves_reference.py (numpy, scipy, statsmodels; data from R packages and statsmodels). */
export interface WavesReference {
  recordedWith: Record<string, string>;
  noThreeWay: {
    name: string;
    layers: number[][][];
    structuralZeros: boolean[][][] | null;
    ipfStatistic: number;
    nominalDf: number;
    statistic: number;
    pearson: number;
    df: number;
    pValue: number;
    pearsonPValue: number;
    departures: { statistic: number; df: number; pValue: number }[];
  }[];
  equalOdds: {
    name: string;
    strata: number[][][];
    commonOddsRatio: number;
    breslowDay: { statistic: number; pValue: number };
    tarone: { statistic: number; pValue: number };
  }[];
  oddsRatioTrend: {
    name: string;
    strata: number[][][];
    scores: number[];
    breslowDayTrend: { statistic: number; pValue: number; residuals: (number | null)[] };
    woolf: {
      slope: number;
      standardError: number;
      z: number;
      pValue: number;
      lower: number;
      upper: number;
      intercept: number;
      residualHeterogeneity: { statistic: number; df: number; pValue: number };
    };
  }[];
  layerTrend: {
    name: string;
    layers: number[][][];
    scores: number[];
    homogeneousDeviance: number;
    trendDeviance: number;
    beta: number;
    statistic: number;
    pValue: number;
    lower: number;
    upper: number;
  }[];
  marginDrift: {
    name: string;
    layers: number[][][];
    rows: { pearson: { statistic: number; pValue: number; df: number }; likelihoodRatio: { statistic: number; pValue: number } };
    columns: { pearson: { statistic: number; pValue: number; df: number }; likelihoodRatio: { statistic: number; pValue: number } };
  }[];
  columnProportions: {
    name: string;
    columns: { label: string; count: number; base: number; effectiveBase: number; unweightedBase: number }[];
    pairs: { a: number; b: number; z: number; pValue: number }[];
  }[];
  multipleResponse: {
    groups: MultipleResponseReference & { groups: number[]; items: number[][]; itemStatistics: number[]; itemStatisticsScipy: number[] };
    pairs: MultipleResponseReference & { W: number[][]; Y: number[][]; pairStatistics: number[][] };
  };
  welch: {
    name: string;
    groups: { label: string; mean: number; sd: number; n: number }[];
    pairs: { a: number; b: number; t: number; pValue: number; df: number }[];
  }[];
}

interface MultipleResponseReference {
  name: string;
  statistic: number;
  df: number;
  sumEigenvalues: number;
  sumSquaredEigenvalues: number;
  firstOrder: { statistic: number; df: number; pValue: number };
  secondOrder: { statistic: number; df: number; pValue: number };
}

export const wavesReference: WavesReference = JSON.parse(readFileSync(join(ROOT, 'fixtures/reference/waves-banner.json'), 'utf8'));
