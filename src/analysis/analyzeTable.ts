import { pearsonChiSquare, likelihoodRatioChiSquare, yatesChiSquare, TestResult } from '../stats/chiSquareTests.js';
import { expectedCounts, margins } from '../stats/contingency.js';
import { expectedCountRule, ExpectedCountCheck } from '../stats/expectedCountRule.js';
import { ExactDeclined, ExactOutcome, fisherExact2x2, fisherFreemanHalton } from '../stats/fisherExact.js';
import { DEFAULT_SEED, DEFAULT_SIMULATIONS, monteCarloExactTest, MonteCarloResult } from '../stats/monteCarlo.js';
import { cramersVInterval } from '../stats/noncentralChiSquare.js';
import { linearByLinear, ordinalMeasures, OrdinalMeasures } from '../stats/ordinal.js';
import {
  goodmanKruskalTauColsGivenRows,
  goodmanKruskalTauRowsGivenCols,
  lambdaColsGivenRows,
  lambdaRowsGivenCols,
  lambdaSymmetric,
  uncertaintyColsGivenRows,
  uncertaintyRowsGivenCols,
  uncertaintySymmetric,
} from '../stats/predictive.js';
import { adjustedResiduals, chiSquareContributions, pearsonResiduals, percentages, Percentages } from '../stats/residuals.js';
import { IntervalEstimate, oddsRatio, relativeRisk } from '../stats/riskMeasures.js';
import {
  biasCorrectedCramersV,
  contingencyCoefficient,
  correctedContingencyCoefficient,
  cramersV,
  phiCoefficient,
  tschuprowT,
  yulesQ,
  yulesY,
} from '../stats/strength.js';
import { TwoWayTable } from '../table/twoWayTable.js';
import { effectiveSampleSize, rescaleToEffectiveSize, unweighted, Weighting } from '../table/weighting.js';

export type ExactPolicy = 'auto' | 'always' | 'never';

export interface AnalysisOptions {
  ordinal: boolean;
  confidence: number;
  exact: ExactPolicy;
  simulations: number;
  seed: number;
  /** Work bound of the r×c exact test (network node expansions). */
  exactWorkLimit: number;
}

export const DEFAULT_ANALYSIS_OPTIONS: AnalysisOptions = {
  ordinal: false,
  confidence: 0.95,
  exact: 'auto',
  simulations: DEFAULT_SIMULATIONS,
  seed: DEFAULT_SEED,
  exactWorkLimit: 2_000_000,
};

export interface Warning {
  code: string;
  message: string;
}

export interface NamedVariable {
  name: string;
  levels: string[];
}

export interface NotableCell {
  row: string;
  col: string;
  adjustedResidual: number;
  /** 'more' when the cell holds more than independence predicts. */
  direction: 'more' | 'fewer';
  /** 2 when |r| > 2, 3 when |r| > 3. */
  level: 2 | 3;
}

export type Strength = 'negligible' | 'weak' | 'moderate' | 'strong';

export interface Findings {
  /** Strength word for the bias-corrected V (common practice thresholds 0.1 / 0.2 / 0.4). */
  strength: Strength | null;
  /** For 2×2: which diagonal holds more than its share. */
  diagonal: 'main' | 'off' | 'balanced' | null;
  /** Cells whose adjusted residual passes ±2, largest first. */
  notableCells: NotableCell[];
  /** The p-value the report leads with, and why. */
  primaryTest: { test: 'pearson' | 'fisher' | 'monteCarlo'; pValue: number; reason: string };
}

export interface AnalysisRecord {
  rows: NamedVariable;
  cols: NamedVariable;
  /** Observations in the table: Σw when weighted. */
  n: number;
  excluded: number;
  weighting: Weighting['kind'];
  weighted: boolean;
  /** The sample size the tests use: Kish's n_eff for sampling weights, n otherwise. */
  effectiveN: number;
  /** Data rows in the table. */
  unweightedN: number;
  counts: number[][];
  /** Row and column totals of `counts`. */
  rowTotals: number[];
  colTotals: number[];
  expected: number[][];
  tests: {
    pearson: TestResult;
    likelihoodRatio: TestResult;
    yates: TestResult | null;
    fisher: { pValue: number; method: string } | null;
    /** Why an exact p-value that was wanted was not computed (its work estimate and bound). */
    exactDeclined: Omit<ExactDeclined, 'status'> | null;
    monteCarlo: MonteCarloResult | null;
    linearByLinear: TestResult | null;
  };
  measures: {
    phi: number | null;
    contingencyC: number | null;
    correctedC: number | null;
    cramersV: number | null;
    cramersVInterval: { lower: number; upper: number; confidence: number; method: string } | null;
    tschuprowT: number | null;
    biasCorrectedV: number | null;
    yulesQ: number | null;
    yulesY: number | null;
    oddsRatio: (IntervalEstimate & { confidence: number }) | null;
    relativeRisk: (IntervalEstimate & { confidence: number; outcome: string; exposed: string; reference: string }) | null;
    lambdaColsGivenRows: number | null;
    lambdaRowsGivenCols: number | null;
    lambdaSymmetric: number | null;
    gkTauColsGivenRows: number | null;
    gkTauRowsGivenCols: number | null;
    uncertaintyColsGivenRows: number | null;
    uncertaintyRowsGivenCols: number | null;
    uncertaintySymmetric: number | null;
  };
  ordinal: OrdinalMeasures | null;
  residuals: { pearson: number[][]; adjusted: (number | null)[][] };
  contributions: number[][];
  percentages: Percentages;
  expectedCountRule: ExpectedCountCheck;
  findings: Findings;
  warnings: Warning[];
}

export function strengthOf(v: number | null): Strength | null {
  if (v === null) return null;
  if (v < 0.1) return 'negligible';
  if (v < 0.2) return 'weak';
  if (v < 0.4) return 'moderate';
  return 'strong';
}

function isIntegerTable(counts: number[][]): boolean {
  return counts.every((row) => row.every((v) => Number.isInteger(v)));
}

function formatNumber(x: number): string {
  return x.toLocaleString('en-US', { maximumFractionDigits: 1 });
}

/**
 * Joins a table to the statistics it deserves and returns one plain record,
 * the same record every renderer reads. The table must have at least two
 * levels on each side (the caller refuses it otherwise).
 */
export function analyzeTable(
  table: TwoWayTable,
  excluded: number,
  options: AnalysisOptions = DEFAULT_ANALYSIS_OPTIONS,
  weighting: Weighting = unweighted(margins(table.counts).total),
): AnalysisRecord {
  const weightedCounts = table.counts;
  const r = weightedCounts.length;
  const c = weightedCounts[0].length;
  const { rowTotals, colTotals, total: n } = margins(weightedCounts);
  // Sampling weights: the tests, intervals and residuals use the weighted
  // table rescaled to Kish's effective sample size (Kish 1965), not Σw.
  const effectiveN = weighting.kind === 'weight' ? effectiveSampleSize(weighting) : n;
  const counts = rescaleToEffectiveSize(weightedCounts, weighting);
  const expected = expectedCounts(counts);
  const pearson = pearsonChiSquare(counts);
  const likelihoodRatio = likelihoodRatioChiSquare(counts);
  const yates = yatesChiSquare(counts);
  const rule = expectedCountRule(expected);
  const warnings: Warning[] = [];
  const integerCounts = isIntegerTable(counts);

  // Exact and simulated p-values.
  let fisher: AnalysisRecord['tests']['fisher'] = null;
  let exactDeclined: AnalysisRecord['tests']['exactDeclined'] = null;
  let monteCarlo: MonteCarloResult | null = null;
  if (integerCounts) {
    let exact: ExactOutcome | null = null;
    if (r === 2 && c === 2) {
      exact = fisherExact2x2(counts);
    } else if (options.exact !== 'never' && (options.exact === 'always' || !rule.passes || n <= 300)) {
      exact = fisherFreemanHalton(counts, { maxWork: options.exactWorkLimit });
    }
    if (exact?.status === 'computed') fisher = { pValue: exact.pValue, method: exact.method };
    else if (exact?.status === 'declined') {
      const { status: _status, ...declined } = exact;
      exactDeclined = declined;
    }
    const wantSimulation = options.exact === 'always' || (options.exact === 'auto' && !rule.passes);
    const simulated = wantSimulation && fisher === null && options.simulations > 0 ? monteCarloExactTest(counts, options.simulations, options.seed) : null;
    if (simulated?.status === 'computed') {
      const { status: _status, ...result } = simulated;
      monteCarlo = result;
      warnings.push({
        code: 'exact-out-of-reach',
        message: `the exact test was not run (${exactDeclined?.reason ?? 'out of reach'}); a simulated p-value from ${options.simulations.toLocaleString('en-US')} random tables (seed ${options.seed}) stands in for it`,
      });
    } else if (simulated?.status === 'declined') {
      warnings.push({
        code: 'exact-declined',
        message: `no exact p-value: ${exactDeclined === null ? '' : `the exact test was not run because ${exactDeclined.reason}, and `}the simulation was not run because ${simulated.reason}`,
      });
    } else if (exactDeclined !== null) {
      warnings.push({ code: 'exact-declined', message: `no exact p-value: the exact test was not run because ${exactDeclined.reason}` });
    }
  }

  // The p-value to lead with.
  let primaryTest: Findings['primaryTest'] = { test: 'pearson', pValue: pearson.pValue, reason: 'the expected counts are large enough for the chi-square approximation' };
  if (!rule.passes) {
    if (fisher !== null) primaryTest = { test: 'fisher', pValue: fisher.pValue, reason: 'expected counts are small, so the exact test replaces the chi-square approximation' };
    else if (monteCarlo !== null) primaryTest = { test: 'monteCarlo', pValue: monteCarlo.pValue, reason: 'expected counts are small and the exact test is out of reach, so a simulated exact p-value replaces the chi-square approximation' };
    else primaryTest = { test: 'pearson', pValue: pearson.pValue, reason: 'expected counts are small but no exact p-value was computed; treat this p-value with care' };
  }

  if (!rule.passes) {
    const cellWord = rule.cellsBelowFive === 1 ? 'cell has' : 'cells have';
    warnings.push({
      code: 'low-expected',
      message:
        `${rule.cellsBelowFive} of ${rule.cells} ${cellWord} an expected count below 5 (smallest ${rule.smallestExpected.toPrecision(3)}), ` +
        `so the chi-square p-value may be off; ` +
        (fisher !== null || monteCarlo !== null ? 'rely on the exact p-value, or merge sparse levels' : 'use --exact always for an exact p-value, or merge sparse levels'),
    });
  }

  const phi = phiCoefficient(pearson.statistic, effectiveN);
  const biasCorrectedV = biasCorrectedCramersV(pearson.statistic, effectiveN, r, c);
  const vInterval = cramersVInterval(pearson.statistic, pearson.df, effectiveN, r, c, options.confidence);
  const or = oddsRatio(counts, options.confidence);
  const rr = relativeRisk(counts, options.confidence);
  if (or?.haldaneCorrection) {
    warnings.push({ code: 'zero-cell', message: 'a cell is zero, so 0.5 was added to every cell before computing the odds ratio (Haldane) and its interval' });
  }
  if (weighting.kind === 'weight') {
    warnings.push({
      code: 'weighted',
      message: `counts are sums of sampling weights (n = ${formatNumber(n)} from ${weighting.unweightedN.toLocaleString('en-US')} rows); tests use the table rescaled to Kish's effective sample size ${formatNumber(effectiveN)}, an approximation that ignores clustering and stratification of the survey design`,
    });
  } else if (!integerCounts) {
    warnings.push({ code: 'non-integer-counts', message: 'the counts are not whole numbers, so exact and simulated tests were not computed' });
  }
  if (effectiveN >= 10_000 && pearson.pValue < 0.05 && biasCorrectedV !== null && biasCorrectedV < 0.1) {
    warnings.push({
      code: 'large-sample',
      message: `with ${formatNumber(Math.round(effectiveN))} observations even a negligible association is statistically significant; judge it by its strength (bias-corrected V ${biasCorrectedV.toFixed(3)})`,
    });
  }

  const adjusted = adjustedResiduals(counts);
  const notableCells: NotableCell[] = [];
  adjusted.forEach((row, i) =>
    row.forEach((value, j) => {
      if (value !== null && Math.abs(value) > 2) {
        notableCells.push({
          row: table.rowLevels[i],
          col: table.colLevels[j],
          adjustedResidual: value,
          direction: value > 0 ? 'more' : 'fewer',
          level: Math.abs(value) > 3 ? 3 : 2,
        });
      }
    }),
  );
  notableCells.sort((x, y) => Math.abs(y.adjustedResidual) - Math.abs(x.adjustedResidual));

  const q = yulesQ(counts);
  const diagonal = r === 2 && c === 2 ? (q === null || q === 0 ? 'balanced' : q > 0 ? 'main' : 'off') : null;

  let ordinal: OrdinalMeasures | null = null;
  let lbl: TestResult | null = null;
  if (options.ordinal) {
    ordinal = ordinalMeasures(counts);
    lbl = linearByLinear(counts);
  }

  return {
    rows: { name: table.rowName, levels: table.rowLevels },
    cols: { name: table.colName, levels: table.colLevels },
    n,
    excluded,
    weighting: weighting.kind,
    weighted: weighting.kind === 'weight',
    effectiveN,
    unweightedN: weighting.unweightedN,
    counts: weightedCounts,
    rowTotals,
    colTotals,
    expected: expectedCounts(weightedCounts),
    tests: { pearson, likelihoodRatio, yates, fisher, exactDeclined, monteCarlo, linearByLinear: lbl },
    measures: {
      phi,
      contingencyC: contingencyCoefficient(pearson.statistic, effectiveN),
      correctedC: correctedContingencyCoefficient(pearson.statistic, effectiveN, r, c),
      cramersV: cramersV(pearson.statistic, effectiveN, r, c),
      cramersVInterval: vInterval === null ? null : { ...vInterval, confidence: options.confidence, method: 'noncentral-chi-square inversion' },
      tschuprowT: tschuprowT(pearson.statistic, effectiveN, r, c),
      biasCorrectedV,
      yulesQ: q,
      yulesY: yulesY(counts),
      oddsRatio: or === null ? null : { ...or, confidence: options.confidence },
      relativeRisk:
        rr === null
          ? null
          : { ...rr, confidence: options.confidence, outcome: table.colLevels[0], exposed: table.rowLevels[0], reference: table.rowLevels[1] },
      lambdaColsGivenRows: lambdaColsGivenRows(counts),
      lambdaRowsGivenCols: lambdaRowsGivenCols(counts),
      lambdaSymmetric: lambdaSymmetric(counts),
      gkTauColsGivenRows: goodmanKruskalTauColsGivenRows(counts),
      gkTauRowsGivenCols: goodmanKruskalTauRowsGivenCols(counts),
      uncertaintyColsGivenRows: uncertaintyColsGivenRows(counts),
      uncertaintyRowsGivenCols: uncertaintyRowsGivenCols(counts),
      uncertaintySymmetric: uncertaintySymmetric(counts),
    },
    ordinal,
    residuals: { pearson: pearsonResiduals(counts), adjusted },
    contributions: chiSquareContributions(counts, pearson.statistic),
    percentages: percentages(weightedCounts),
    expectedCountRule: rule,
    findings: { strength: strengthOf(biasCorrectedV), diagonal, notableCells, primaryTest },
    warnings,
  };
}
