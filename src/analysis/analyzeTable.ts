/**
 * The analysis of one table: joins the counted table to every statistic it
 * deserves and returns the one record (tests, measures, residuals, the
 * leading p-value, the verdict) that every renderer reads.
 */
import { pearsonChiSquare, likelihoodRatioChiSquare, yatesChiSquare, TestResult } from '../stats/chiSquareTests.js';
import { expectedCounts, margins } from '../stats/contingency.js';
import { expectedCountRule, ExpectedCountCheck } from '../stats/expectedCountRule.js';
import { ExactDeclined, ExactOutcome, fisherExact2x2, fisherFreemanHalton } from '../stats/fisherExact.js';
import { DEFAULT_SEED, DEFAULT_SIMULATION_BOUND, DEFAULT_SIMULATIONS, monteCarloExactTest, MonteCarloResult, simulationWorkPerTable } from '../stats/monteCarlo.js';
import { cramersVInterval, cramersVMedianEstimate } from '../stats/noncentralChiSquare.js';
import { normalQuantile } from '../stats/normalDistribution.js';
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
import { dataError } from '../errors.js';
import { TwoWayTable } from '../table/twoWayTable.js';
import { formatCount, formatExpected, formatMeasure } from '../readableNumbers.js';
import { effectiveSampleSize, rescaleToEffectiveSize, unweighted, Weighting } from '../table/weighting.js';
import { analyzeDesign, type DesignAnalysis, type DesignInput, type DesignPercentageRecord, type DesignSummary } from './design.js';
import type { DesignChiSquare, DesignFTest } from '../stats/raoScott.js';

export type ExactPolicy = 'auto' | 'always' | 'never';

export interface AnalysisOptions {
  ordinal: boolean;
  confidence: number;
  /** The significance level every decision of the record uses. */
  alpha: number;
  exact: ExactPolicy;
  simulations: number;
  seed: number;
  /** Work bound of the r×c exact test (network node expansions); the same for pair and scan. */
  exactWorkLimit: number;
  /**
   * 'full': a simulated p-value draws all `simulations` tables (pair).
   * 'deferred': it is left for the caller to draw, sequentially (scan).
   */
  simulation: 'full' | 'deferred';
  /** With a survey design: compute the percentages with their design-based intervals (pair; scan only with --full). */
  designPercentages?: boolean;
}

/**
 * Work bound of the r×c exact test, shared by pair and scan so that both
 * give the same record for the same table. A table the network algorithm
 * cannot finish within it gets a simulated p-value instead.
 */
export const EXACT_WORK_LIMIT = 2_000_000;

export const DEFAULT_ANALYSIS_OPTIONS: AnalysisOptions = {
  ordinal: false,
  confidence: 0.95,
  alpha: 0.05,
  exact: 'auto',
  simulations: DEFAULT_SIMULATIONS,
  seed: DEFAULT_SEED,
  exactWorkLimit: EXACT_WORK_LIMIT,
  simulation: 'full',
};

export interface Warning {
  code: string;
  message: string;
}

export interface NamedVariable {
  name: string;
  levels: string[];
  /** With --codebook describing the column: the question as asked. */
  question?: string | null;
  /** With --codebook: whether the codebook marks the column ordered. */
  ordered?: boolean;
  /** With --codebook: per level, the codes of the data that carry it (several when codes share a label; empty for a level with no listed code). */
  codes?: string[][];
}

export interface NotableCell {
  row: string;
  col: string;
  adjustedResidual: number;
  /** 'more' when the cell holds more than independence predicts. */
  direction: 'more' | 'fewer';
  /**
   * 2: beyond the single-cell critical value (findings.cellThreshold.single);
   * 3: beyond the critical value adjusted for the number of cells (.adjusted).
   */
  level: 2 | 3;
}

export type Strength = 'negligible' | 'weak' | 'moderate' | 'strong';
export type Evidence = 'strong' | 'clear' | 'some' | 'none';

/** The tests a verdict can rest on: four of `tests`, or the layered test of `stratified`. */
export type TestName = 'pearson' | 'fisher' | 'monteCarlo' | 'designF' | 'cmh';

/** Why a test leads. */
export type LeadReason =
  /** The expected counts pass the rule: the chi-square approximation holds. */
  | 'expected-counts-large'
  /** The expected counts fail the rule and the exact test finished. */
  | 'exact-for-small-counts'
  /** The expected counts fail the rule, the exact test is out of reach (or declined): simulated. */
  | 'simulated-for-small-counts'
  /** The expected counts fail the rule and no exact or simulated p-value exists (see `exactUnavailable`). */
  | 'small-counts-no-exact'
  /** A survey design was given: the second-order Rao–Scott F test carries it. */
  | 'survey-design'
  /** --by: the layered test asks the question within levels of the variable held fixed. */
  | 'held-fixed';

/** How a p-value was reached. */
export type Route = 'chi-square' | 'exact' | 'simulated' | 'simulated-sequential' | 'design-based';

/** Why no exact or simulated p-value exists for a sparse table. */
export type ExactUnavailable = 'weighted' | 'non-integer' | 'exact-never' | 'no-simulations' | 'declined' | 'design' | null;

export interface LeadingTest {
  test: 'pearson' | 'fisher' | 'monteCarlo' | 'designF';
  pValue: number;
  /** A sentence saying why (kept for readers of earlier versions; `reasonCode` is the fact). */
  reason: string;
  reasonCode: Exclude<LeadReason, 'held-fixed'>;
  route: Route;
  exactUnavailable: ExactUnavailable;
}

/** The decision of the record: every renderer and the exit status show this, and only this. */
export interface Verdict {
  test: TestName;
  /** The leading p-value, before any adjustment for multiple testing. */
  pValue: number;
  reason: LeadReason;
  route: Route;
  /** scan: where a sequentially simulated p-value stopped and why. */
  stoppedBecause: 'clearly-passes' | 'clearly-fails' | 'limit' | null;
  /** scan: the leading p-value adjusted for the pairs tested. */
  adjustment: { method: 'bh' | 'holm' | 'bonferroni' | 'none'; tests: number; pValue: number } | null;
  /** The p-value compared with alpha: the adjusted one in scan, the leading one otherwise. */
  decidingPValue: number;
  alpha: number;
  confidence: number;
  passes: boolean;
  /** Word for the deciding p-value: strong ≤ α/50, clear ≤ α/5, some ≤ α, none above (at α 0.05: 0.001, 0.01, 0.05; common practice). */
  evidence: Evidence;
  /** Word for the bias-corrected V (thresholds 0.1, 0.2, 0.4; common practice). */
  strength: Strength | null;
}

export interface CellThreshold {
  alpha: number;
  /** Cells that carry distinct information: r·c, but one per mirror pair in a table with two rows or two columns. */
  cells: number;
  /** z at 1 − α/2: a single cell looked at on its own. */
  single: number;
  /** z at 1 − α/(2·cells): Bonferroni-adjusted for the cells looked at (Beasley & Schumacker 1995; Sharpe 2015). */
  adjusted: number;
}

/** Sentence facts, in reading order; renderers put them into words. */
export type Statement =
  | { kind: 'held-fixed'; by: string; test: 'cmh'; pValue: number; passes: boolean; evidence: Evidence; pooledPasses: boolean; commonOddsRatio: number | null }
  | { kind: 'association'; scope: 'table' | 'pooled'; test: LeadingTest['test']; pValue: number; decidingPValue: number; adjusted: boolean; passes: boolean; evidence: Evidence; strength: Strength | null; biasCorrectedV: number | null }
  | { kind: 'diagonal'; which: 'main' | 'off'; first: [string, string]; second: [string, string]; yulesQ: number; earned: boolean; corrected: boolean }
  | { kind: 'cell'; row: string; col: string; direction: 'more' | 'fewer'; adjustedResidual: number }
  | { kind: 'more-cells'; count: number }
  | { kind: 'no-cell-stands-out'; because: 'not-significant' | 'none-beyond-threshold'; critical: number }
  | { kind: 'mirror-cells'; removed: number };

export interface Findings {
  /** Strength word for the bias-corrected V (common practice thresholds 0.1 / 0.2 / 0.4). */
  strength: Strength | null;
  /** For 2×2: which diagonal holds more than its share. */
  diagonal: 'main' | 'off' | 'balanced' | null;
  /** Critical values for adjusted residuals. */
  cellThreshold: CellThreshold;
  /** Cells whose adjusted residual passes the single-cell critical value, largest first. */
  notableCells: NotableCell[];
  /** The p-value of this table (pooled over any layer), and why it leads. */
  primaryTest: LeadingTest;
  /** What "In words" says, as facts. */
  statements: Statement[];
}
export interface AnalysisRecord {
  rows: NamedVariable;
  cols: NamedVariable;
  /** Observations in the table: Σw when weighted. */
  n: number;
  excluded: number;
  weighting: Weighting['kind'];
  weighted: boolean;
  /** The sample size the tests use: n / mean design effect with a survey design, Kish's n_eff for sampling weights, n otherwise. */
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
    monteCarlo: (MonteCarloResult & { sequential: boolean }) | null;
    linearByLinear: TestResult | null;
    /** With a survey design: Rao–Scott first order, X²/δ̄ and G²/δ̄, and second order (F, the leading test). */
    designPearson: (DesignChiSquare & { uncorrected: number }) | null;
    designLikelihoodRatio: (DesignChiSquare & { uncorrected: number }) | null;
    designF: DesignFTest | null;
  };
  measures: {
    phi: number | null;
    contingencyC: number | null;
    correctedC: number | null;
    cramersV: number | null;
    cramersVInterval: { estimate: number; lower: number; upper: number; confidence: number; method: string } | null;
    tschuprowT: number | null;
    biasCorrectedV: number | null;
    yulesQ: number | null;
    yulesY: number | null;
    /** True when ½ was added to every cell of a 2×2 table with a zero cell, for the odds ratio, risk ratio, Q and Y alike. */
    zeroCellCorrection: boolean;
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
    /** With a survey design: Cramér's V of the design-scaled statistic, with the design-effective sample size. */
    designCramersV: { value: number; effectiveSampleSize: number } | null;
  };
  ordinal: OrdinalMeasures | null;
  residuals: { pearson: number[][]; adjusted: (number | null)[][] };
  contributions: number[][];
  percentages: Percentages;
  expectedCountRule: ExpectedCountCheck;
  findings: Findings;
  verdict: Verdict;
  warnings: Warning[];
  /** The survey design the tests account for, or null (none given). */
  design: DesignSummary | null;
  /** With a survey design: each cell's design effect (Kish's, of its share of the table). */
  designEffects: (number | null)[][] | null;
  /** With a survey design: weighted percentages with design-based standard errors and intervals. */
  designPercentages: DesignPercentageRecord | null;
}

export function strengthOf(v: number | null): Strength | null {
  if (v === null) return null;
  if (v < 0.1) return 'negligible';
  if (v < 0.2) return 'weak';
  if (v < 0.4) return 'moderate';
  return 'strong';
}

/** Evidence word for a p-value judged at α: strong ≤ α/50, clear ≤ α/5, some ≤ α (common practice, scaled to α). */
export function evidenceOf(p: number, alpha: number): Evidence {
  if (!(p <= alpha)) return 'none';
  if (p <= alpha / 50) return 'strong';
  if (p <= alpha / 5) return 'clear';
  return 'some';
}

/**
 * Critical values for adjusted residuals: z at 1 − α/2 for one cell on its
 * own, and the Bonferroni-adjusted z at 1 − α/(2k) for k cells looked at
 * together (Beasley & Schumacker 1995, J. Exp. Educ. 64, 79–93; Sharpe 2015,
 * Pract. Assess. Res. Eval. 20(8)). In a table with two rows (or two
 * columns) the cells of each column (row) mirror each other, residuals of
 * equal size and opposite sign, so k counts one of each mirror pair.
 */
export function cellThresholdFor(r: number, c: number, alpha: number): CellThreshold {
  const cells = (r === 2 ? 1 : r) * (c === 2 ? 1 : c);
  return { alpha, cells, single: quantileOf(1 - alpha / 2), adjusted: quantileOf(1 - alpha / (2 * cells)) };
}

/**
 * The normal quantiles of the cell thresholds, each computed once: a scan
 * asks for the same few (one α, a few table sizes) for every pair, and each
 * is an iteration on the normal tail (a visible part of a scan of a small
 * file; README, Speed). The same numbers as normalQuantile's.
 */
const thresholdQuantiles = new Map<number, number>();
function quantileOf(p: number): number {
  let z = thresholdQuantiles.get(p);
  if (z === undefined) {
    z = normalQuantile(p);
    if (thresholdQuantiles.size < 1024) thresholdQuantiles.set(p, z);
  }
  return z;
}

function isIntegerTable(counts: number[][]): boolean {
  return counts.every((row) => row.every((v) => Number.isInteger(v)));
}

function formatNumber(x: number): string {
  return formatCount(Math.round(x * 10) / 10);
}

const REASONS: Record<LeadingTest['reasonCode'], string> = {
  'expected-counts-large': 'the expected counts are large enough for the chi-square approximation',
  'exact-for-small-counts': 'expected counts are small, so the exact test replaces the chi-square approximation',
  'simulated-for-small-counts': 'expected counts are small and the exact test is out of reach, so a simulated exact p-value replaces the chi-square approximation',
  'small-counts-no-exact': 'expected counts are small but no exact p-value exists for this table; treat this p-value with care',
  'survey-design': 'a survey design was given: the second-order Rao–Scott F test accounts for its strata, clusters and weights',
};

function leadingTest(
  rulePasses: boolean,
  fisher: AnalysisRecord['tests']['fisher'],
  simulated: { pValue: number; sequential: boolean } | null,
  pearson: TestResult,
  exactUnavailable: ExactUnavailable,
): LeadingTest {
  const lead = (test: LeadingTest['test'], pValue: number, reasonCode: LeadingTest['reasonCode'], route: Route): LeadingTest => ({
    test,
    pValue,
    reason: REASONS[reasonCode],
    reasonCode,
    route,
    exactUnavailable: reasonCode === 'small-counts-no-exact' ? exactUnavailable : null,
  });
  if (rulePasses) return lead('pearson', pearson.pValue, 'expected-counts-large', 'chi-square');
  if (fisher !== null) return lead('fisher', fisher.pValue, 'exact-for-small-counts', 'exact');
  if (simulated !== null) return lead('monteCarlo', simulated.pValue, 'simulated-for-small-counts', simulated.sequential ? 'simulated-sequential' : 'simulated');
  return lead('pearson', pearson.pValue, 'small-counts-no-exact', 'chi-square');
}

/** The verdict of one table on its own (no adjustment, no layer). */
function tableVerdict(lead: LeadingTest, options: Pick<AnalysisOptions, 'alpha' | 'confidence'>, strength: Strength | null): Verdict {
  return {
    test: lead.test,
    pValue: lead.pValue,
    reason: lead.reasonCode,
    route: lead.route,
    stoppedBecause: null,
    adjustment: null,
    decidingPValue: lead.pValue,
    alpha: options.alpha,
    confidence: options.confidence,
    passes: lead.pValue <= options.alpha,
    evidence: evidenceOf(lead.pValue, options.alpha),
    strength,
  };
}

/**
 * Weighted sums beyond the range of doubles cannot be analysed, and must not
 * be dropped quietly: refuse them in one line. The tests do not depend on the
 * scale of the weights (Kish's effective size is scale-free), so dividing the
 * weight column by a constant is always a remedy.
 */
function refuseOverflowingWeights(table: TwoWayTable, n: number, weighting: Weighting): void {
  if (weighting.kind === 'none') return;
  const option = weighting.kind === 'weight' ? '--weight' : '--freq';
  const where = `the table of ${table.rowName} by ${table.colName}`;
  if (!Number.isFinite(n) || table.counts.some((row) => row.some((v) => !Number.isFinite(v)))) {
    throw dataError(`${where}: the ${option} values add up beyond the largest number (about 1.8e308); divide that column by a constant (the tests do not depend on the scale of the weights)`);
  }
  if (weighting.kind === 'weight' && n > 0 && !(Number.isFinite(weighting.sumSquaredWeights) && weighting.sumSquaredWeights > 0)) {
    const overflow = weighting.sumSquaredWeights !== 0;
    const direction = overflow ? 'overflow (weights above about 1e154)' : 'underflow (weights below about 1e-162)';
    throw dataError(
      `${where}: the squares of the --weight values ${direction}, so the effective sample size cannot be formed; ${overflow ? 'divide' : 'multiply'} that column by a constant (the tests do not depend on the scale of the weights)`,
    );
  }
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
  design: DesignInput | null = null,
): AnalysisRecord {
  // Two tables: reportedCounts are the counts as counted (Σw with sampling
  // weights), the record's `counts`; testedCounts are what every test,
  // interval and residual uses (the same, rescaled to the effective sample
  // size: n/δ̄ with a survey design, Kish's n_eff with sampling weights alone).
  const reportedCounts = table.counts;
  const r = reportedCounts.length;
  const c = reportedCounts[0].length;
  const { rowTotals, colTotals, total: n } = margins(reportedCounts);
  refuseOverflowingWeights(table, n, weighting);
  const designed: DesignAnalysis | null = design ? analyzeDesign(design, table, { confidence: options.confidence, percentages: options.designPercentages !== false }) : null;
  // Kish's effective sample size (Kish 1965) for sampling weights, not Σw;
  // with a design, the design-effective size n/δ̄ (Rao & Scott 1981).
  const effectiveN = designed ? designed.summary.effectiveSampleSize : weighting.kind === 'weight' ? effectiveSampleSize(weighting) : n;
  const testedCounts = designed ? reportedCounts.map((row) => row.map((v) => (v * effectiveN) / n)) : rescaleToEffectiveSize(reportedCounts, weighting);
  const expected = expectedCounts(testedCounts);
  const shownExpected = expectedCounts(reportedCounts);
  const pearson = pearsonChiSquare(testedCounts);
  const likelihoodRatio = likelihoodRatioChiSquare(testedCounts);
  const yates = yatesChiSquare(testedCounts);
  const rule = expectedCountRule(expected);
  const warnings: Warning[] = [];
  const integerCounts = isIntegerTable(testedCounts);

  // Exact and simulated p-values.
  let fisher: AnalysisRecord['tests']['fisher'] = null;
  let exactDeclined: AnalysisRecord['tests']['exactDeclined'] = null;
  let monteCarlo: AnalysisRecord['tests']['monteCarlo'] = null;
  let simulationPending = false;
  let simulationDeclined: string | null = null;
  // Exact tests condition on the margins of a simple random sample; under a design they are not defined.
  if (integerCounts && !designed) {
    let exact: ExactOutcome | null = null;
    if (r === 2 && c === 2) {
      exact = fisherExact2x2(testedCounts);
    } else if (options.exact !== 'never' && (options.exact === 'always' || !rule.passes || n <= 300)) {
      exact = fisherFreemanHalton(testedCounts, { maxWork: options.exactWorkLimit });
    }
    if (exact?.status === 'computed') fisher = { pValue: exact.pValue, method: exact.method };
    else if (exact?.status === 'declined') {
      const { status: _status, ...declined } = exact;
      exactDeclined = declined;
    }
    const wantSimulation = options.exact === 'always' || (options.exact === 'auto' && !rule.passes);
    if (wantSimulation && fisher === null && options.simulations > 0) {
      if (options.simulation === 'deferred') {
        // Drawn later, sequentially, under the same work bound as a full run.
        const { rowTotals: rt, colTotals: ct } = margins(testedCounts);
        const work = options.simulations * simulationWorkPerTable(rt.filter((t) => t > 0), ct.filter((t) => t > 0));
        if (work > DEFAULT_SIMULATION_BOUND.maxWork || n > Number.MAX_SAFE_INTEGER) simulationDeclined = `its work estimate (${work.toExponential(2)} steps) is above the bound of ${DEFAULT_SIMULATION_BOUND.maxWork.toExponential(2)}`;
        else simulationPending = true;
      } else {
        const simulated = monteCarloExactTest(testedCounts, options.simulations, options.seed);
        if (simulated?.status === 'computed') {
          const { status: _status, ...result } = simulated;
          monteCarlo = { ...result, sequential: false };
        } else if (simulated?.status === 'declined') simulationDeclined = simulated.reason;
      }
    }
    if (monteCarlo !== null || simulationPending) {
      warnings.push({
        code: 'exact-out-of-reach',
        message: `the exact test was not run (${exactDeclined?.reason ?? 'out of reach'}); a simulated p-value from random tables with the same margins stands in for it`,
      });
    } else if (simulationDeclined !== null) {
      warnings.push({
        code: 'exact-declined',
        message: `no exact p-value: ${exactDeclined === null ? '' : `the exact test was not run because ${exactDeclined.reason}, and `}the simulation was not run because ${simulationDeclined}`,
      });
    } else if (exactDeclined !== null) {
      warnings.push({ code: 'exact-declined', message: `no exact p-value: the exact test was not run because ${exactDeclined.reason}` });
    }
  }
  const exactUnavailable: ExactUnavailable = designed
    ? 'design'
    : weighting.kind === 'weight'
      ? 'weighted'
      : !integerCounts ? 'non-integer' : options.exact === 'never' ? 'exact-never' : options.simulations <= 0 ? 'no-simulations' : simulationDeclined !== null || exactDeclined !== null ? 'declined' : null;

  const lead = designed
    ? { test: 'designF' as const, pValue: designed.designF.pValue, reason: REASONS['survey-design'], reasonCode: 'survey-design' as const, route: 'design-based' as const, exactUnavailable: null }
    : leadingTest(rule.passes, fisher, monteCarlo ?? (simulationPending ? { pValue: Number.NaN, sequential: true } : null), pearson, exactUnavailable);

  if (!rule.passes) {
    // The rule is judged on the table the tests use; with sampling weights
    // that is the effective-size table, whose expected counts differ from
    // the weighted ones shown beside the counts, so both are named.
    const smallest = formatExpected(rule.smallestExpected);
    const scale = designed || weighting.kind === 'weight' ? ` on the effective-sample scale the tests use; ${formatExpected(Math.min(...shownExpected.flat()))} in the weighted table shown` : '';
    const advice = designed
      ? 'exact tests are not defined under a survey design (they assume a simple random sample), and the design-based F test is itself a large-sample approximation; merge sparse levels (--recode, --other)'
      : lead.test !== 'pearson'
        ? 'the exact p-value leads instead; merging sparse levels (--recode, --other) also helps'
        : exactUnavailable === 'weighted'
          ? 'exact tests need whole counts, which sampling weights do not give; merge sparse levels (--recode, --other)'
          : exactUnavailable === 'non-integer'
            ? 'exact tests need whole counts; merge sparse levels (--recode, --other)'
            : exactUnavailable === 'exact-never'
              ? 'drop --exact never for an exact or simulated p-value, or merge sparse levels (--recode, --other)'
              : exactUnavailable === 'no-simulations'
                ? 'give --simulations more than 0 for a simulated p-value, or merge sparse levels (--recode, --other)'
                : exactUnavailable === 'declined'
                  ? 'the exact test and the simulation are beyond their work bounds here; merge sparse levels (--recode, --other)'
                : 'merge sparse levels (--recode, --other)';
    warnings.push({
      code: 'low-expected',
      message:
        `sparse table: ${rule.cellsBelowFive} of ${rule.cells} expected counts are under 5 and ${rule.cellsBelowOne} under 1 (lowest ${smallest}${scale}); ` +
        `the chi-square approximation asks for none under 1 and at most a fifth under 5 (a 2×2 table: none under 5; Cochran 1954). ${advice[0].toUpperCase()}${advice.slice(1)}`,
    });
  }

  const phi = phiCoefficient(pearson.statistic, effectiveN);
  const biasCorrectedV = biasCorrectedCramersV(pearson.statistic, effectiveN, r, c);
  const vInterval = cramersVInterval(pearson.statistic, pearson.df, effectiveN, r, c, options.confidence);
  const vMedian = cramersVMedianEstimate(pearson.statistic, pearson.df, effectiveN, r, c);
  // A 2×2 table with a zero cell: ½ is added to every cell (Haldane 1956)
  // for the odds ratio, the risk ratio, Q and Y alike, so that all four
  // describe one table and agree in direction.
  const zeroCell = r === 2 && c === 2 && testedCounts.some((row) => row.some((v) => v === 0));
  const ratioTable = zeroCell ? testedCounts.map((row) => row.map((v) => v + 0.5)) : testedCounts;
  const or = oddsRatio(ratioTable, options.confidence);
  const rr = relativeRisk(ratioTable, options.confidence);
  const q = yulesQ(ratioTable);
  if (zeroCell) {
    warnings.push({ code: 'zero-cell', message: "a cell is zero, so 0.5 was added to every cell before computing the odds ratio, the risk ratio, Yule's Q and Y and their intervals (Haldane 1956)" });
  }
  if (designed) warnings.push(...designWarnings(designed));
  else if (weighting.kind === 'weight') {
    warnings.push({
      code: 'weighted',
      message: `counts are sums of sampling weights (n = ${formatNumber(n)} from ${formatCount(weighting.unweightedN)} rows); tests use the table rescaled to Kish's effective sample size ${formatNumber(effectiveN)}, an approximation that ignores clustering and stratification of the survey design`,
    });
  } else if (!integerCounts) {
    warnings.push({ code: 'non-integer-counts', message: 'the counts are not whole numbers, so exact and simulated tests were not computed' });
  }

  const adjusted = adjustedResiduals(testedCounts);
  const cellThreshold = cellThresholdFor(r, c, options.alpha);
  const notableCells: NotableCell[] = [];
  adjusted.forEach((row, i) =>
    row.forEach((value, j) => {
      if (value !== null && Math.abs(value) > cellThreshold.single) {
        notableCells.push({
          row: table.rowLevels[i],
          col: table.colLevels[j],
          adjustedResidual: value,
          direction: value > 0 ? 'more' : 'fewer',
          level: Math.abs(value) > cellThreshold.adjusted ? 3 : 2,
        });
      }
    }),
  );
  notableCells.sort((x, y) => Math.abs(y.adjustedResidual) - Math.abs(x.adjustedResidual));

  const diagonal = r === 2 && c === 2 ? (q === null || q === 0 ? 'balanced' : q > 0 ? 'main' : 'off') : null;

  let ordinal: OrdinalMeasures | null = null;
  let lbl: TestResult | null = null;
  if (options.ordinal) {
    ordinal = ordinalMeasures(testedCounts);
    lbl = linearByLinear(testedCounts);
  }
  const strength = strengthOf(biasCorrectedV);

  const record: AnalysisRecord = {
    rows: { name: table.rowName, levels: table.rowLevels },
    cols: { name: table.colName, levels: table.colLevels },
    n,
    excluded,
    weighting: weighting.kind,
    weighted: weighting.kind === 'weight',
    effectiveN,
    unweightedN: weighting.unweightedN,
    counts: reportedCounts,
    rowTotals,
    colTotals,
    expected: shownExpected,
    tests: {
      pearson,
      likelihoodRatio,
      yates,
      fisher,
      exactDeclined,
      monteCarlo,
      linearByLinear: lbl,
      designPearson: designed ? { ...designed.designPearson, uncorrected: designed.summary.uncorrected.pearson } : null,
      designLikelihoodRatio: designed ? { ...designed.designLikelihoodRatio, uncorrected: designed.summary.uncorrected.likelihoodRatio } : null,
      designF: designed ? designed.designF : null,
    },
    measures: {
      phi,
      contingencyC: contingencyCoefficient(pearson.statistic, effectiveN),
      correctedC: correctedContingencyCoefficient(pearson.statistic, effectiveN, r, c),
      cramersV: cramersV(pearson.statistic, effectiveN, r, c),
      cramersVInterval:
        vInterval === null || vMedian === null
          ? null
          : {
              estimate: vMedian,
              lower: vInterval.lower,
              upper: vInterval.upper,
              confidence: options.confidence,
              method: vInterval.tails === 'edgeworth' ? 'noncentral-chi-square inversion, Edgeworth tails' : 'noncentral-chi-square inversion',
            },
      tschuprowT: tschuprowT(pearson.statistic, effectiveN, r, c),
      biasCorrectedV,
      yulesQ: q,
      yulesY: yulesY(ratioTable),
      zeroCellCorrection: zeroCell,
      oddsRatio: or === null ? null : { ...or, haldaneCorrection: zeroCell, confidence: options.confidence },
      relativeRisk:
        rr === null
          ? null
          : { ...rr, haldaneCorrection: zeroCell, confidence: options.confidence, outcome: table.colLevels[0], exposed: table.rowLevels[0], reference: table.rowLevels[1] },
      lambdaColsGivenRows: lambdaColsGivenRows(testedCounts),
      lambdaRowsGivenCols: lambdaRowsGivenCols(testedCounts),
      lambdaSymmetric: lambdaSymmetric(testedCounts),
      gkTauColsGivenRows: goodmanKruskalTauColsGivenRows(testedCounts),
      gkTauRowsGivenCols: goodmanKruskalTauRowsGivenCols(testedCounts),
      uncertaintyColsGivenRows: uncertaintyColsGivenRows(testedCounts),
      uncertaintyRowsGivenCols: uncertaintyRowsGivenCols(testedCounts),
      uncertaintySymmetric: uncertaintySymmetric(testedCounts),
      designCramersV: designed ? designed.cramersV : null,
    },
    ordinal,
    residuals: { pearson: pearsonResiduals(testedCounts), adjusted },
    contributions: chiSquareContributions(testedCounts, pearson.statistic),
    percentages: percentages(reportedCounts),
    expectedCountRule: rule,
    findings: { strength, diagonal, cellThreshold, notableCells, primaryTest: lead, statements: [] },
    verdict: tableVerdict(lead, options, strength),
    warnings,
    design: designed ? designed.summary : null,
    designEffects: designed ? designed.cellDesignEffects : null,
    designPercentages: designed ? designed.percentages : null,
  };
  if (!simulationPending) decide(record, { large: largeSampleLimit(effectiveN) });
  return record;
}

/** Design df below this make every design-based p-value rough (common practice; docs/design-based.md). */
const FEW_DESIGN_DF = 20;

/** What a reader of a design-based record should check: treated lone PSUs, few degrees of freedom, dropped replicates. */
function designWarnings(designed: DesignAnalysis): Warning[] {
  const d = designed.summary;
  const out: Warning[] = [];
  if (d.lonelyStrata.length > 0) {
    const names = d.lonelyStrata.slice(0, 5).map((s) => `"${s}"`).join(', ') + (d.lonelyStrata.length > 5 ? `, … (${d.lonelyStrata.length} in all)` : '');
    const how = { certainty: 'adds nothing to the variance (certainty)', adjust: 'is measured from the grand mean (adjust)', average: 'takes the average variance of the other strata (average)', fail: '' }[d.lonelyPsu ?? 'fail'];
    out.push({ code: 'lonely-psu', message: `${d.lonelyStrata.length === 1 ? 'stratum' : 'strata'} ${names} ${d.lonelyStrata.length === 1 ? 'has' : 'have'} a single PSU; by --lonely-psu ${d.lonelyPsu}, each ${how}` });
  }
  if (d.degreesOfFreedom < FEW_DESIGN_DF) {
    out.push({
      code: 'few-design-df',
      message: `the design has ${d.degreesOfFreedom} degrees of freedom (${d.kind === 'taylor' ? 'PSUs minus strata' : 'replicates minus one'}); with fewer than ${FEW_DESIGN_DF} the design-based p-values and intervals are rough`,
    });
  }
  if (d.droppedReplicates > 0) {
    out.push({ code: 'dropped-replicates', message: `${d.droppedReplicates} replicate${d.droppedReplicates === 1 ? '' : 's'} left out: ${d.droppedReplicates === 1 ? 'its' : 'their'} weights sum to zero on the rows of this table` });
  }
  return out;
}

/** Effective samples from this size on get the large-sample caution when significant but negligible (common practice). */
function largeSampleLimit(effectiveN: number): boolean {
  return effectiveN >= 10_000;
}

/** Whether the record still waits for a simulated p-value (analysis with simulation 'deferred'). */
export function simulationPending(record: AnalysisRecord): boolean {
  return record.findings.primaryTest.test === 'monteCarlo' && record.tests.monteCarlo === null;
}

/** Gives a deferred record its simulated p-value and settles its own verdict. */
export function completeSimulation(record: AnalysisRecord, result: MonteCarloResult, stoppedBecause: Verdict['stoppedBecause']): void {
  record.tests.monteCarlo = { ...result, sequential: true };
  record.findings.primaryTest = { ...record.findings.primaryTest, pValue: result.pValue };
  record.verdict = { ...record.verdict, pValue: result.pValue, decidingPValue: result.pValue, stoppedBecause };
  decide(record, { large: largeSampleLimit(record.effectiveN) });
}

/** A deferred record whose table cannot be simulated: the chi-square p-value leads, flagged. */
export function abandonSimulation(record: AnalysisRecord): void {
  const lead = leadingTest(false, null, null, record.tests.pearson, null);
  record.findings.primaryTest = lead;
  record.verdict = tableVerdict(lead, record.verdict, record.findings.strength);
  record.warnings = record.warnings.filter((w) => w.code !== 'exact-out-of-reach');
  decide(record, { large: largeSampleLimit(record.effectiveN) });
}

export interface Decision {
  /** scan: the leading p-value adjusted for the pairs tested. */
  adjustment?: Verdict['adjustment'];
  /** --by: the layered test decides. */
  heldFixed?: { by: string; pValue: number; commonOddsRatio: number | null } | null;
  large: boolean;
}

/**
 * Settles the verdict of a record from its leading test (and, in scan, the
 * adjustment; with --by, the layered test), and the facts "In words" states.
 * The one place where a p-value meets alpha.
 */
export function decide(record: AnalysisRecord, decision: Decision): void {
  const { alpha, confidence } = record.verdict;
  const lead = record.findings.primaryTest;
  const pooledDeciding = decision.adjustment && !decision.heldFixed ? decision.adjustment.pValue : lead.pValue;
  const pooledPasses = pooledDeciding <= alpha;
  const held = decision.heldFixed ?? null;
  const deciding = held ? (decision.adjustment ? decision.adjustment.pValue : held.pValue) : pooledDeciding;
  const verdict: Verdict = {
    test: held ? 'cmh' : lead.test,
    pValue: held ? held.pValue : lead.pValue,
    reason: held ? 'held-fixed' : lead.reasonCode,
    route: held ? 'chi-square' : lead.route,
    stoppedBecause: held ? null : record.verdict.stoppedBecause,
    adjustment: decision.adjustment ?? null,
    decidingPValue: deciding,
    alpha,
    confidence,
    passes: deciding <= alpha,
    evidence: evidenceOf(deciding, alpha),
    strength: record.findings.strength,
  };
  record.verdict = verdict;

  const statements: Statement[] = [];
  if (held) {
    statements.push({ kind: 'held-fixed', by: held.by, test: 'cmh', pValue: held.pValue, passes: verdict.passes, evidence: verdict.evidence, pooledPasses, commonOddsRatio: held.commonOddsRatio });
  }
  statements.push({
    kind: 'association',
    scope: held ? 'pooled' : 'table',
    test: lead.test,
    pValue: lead.pValue,
    decidingPValue: pooledDeciding,
    adjusted: Boolean(decision.adjustment) && !held,
    passes: pooledPasses,
    evidence: evidenceOf(pooledDeciding, alpha),
    strength: record.findings.strength,
    biasCorrectedV: record.measures.biasCorrectedV,
  });
  // Claims about where the association sits are earned only when the test
  // that decides rejects independence (and, with a layer, the pooled one too).
  const earned = verdict.passes && pooledPasses;
  const q = record.measures.yulesQ;
  const { findings, rows, cols } = record;
  if ((findings.diagonal === 'main' || findings.diagonal === 'off') && q !== null && Math.abs(q) >= 0.1) {
    const [r1, r2] = rows.levels;
    const [c1, c2] = cols.levels;
    statements.push({
      kind: 'diagonal',
      which: findings.diagonal,
      first: findings.diagonal === 'main' ? [r1, c1] : [r1, c2],
      second: findings.diagonal === 'main' ? [r2, c2] : [r2, c1],
      yulesQ: q,
      earned,
      corrected: record.measures.zeroCellCorrection,
    });
  }
  const twoByTwo = rows.levels.length === 2 && cols.levels.length === 2;
  if (!twoByTwo) {
    if (!earned) statements.push({ kind: 'no-cell-stands-out', because: 'not-significant', critical: findings.cellThreshold.adjusted });
    else {
      const beyond = findings.notableCells.filter((cell) => cell.level === 3);
      // With two rows, the cells of a column mirror each other: say it once, for the cell above expectation.
      const mirror = rows.levels.length === 2 || cols.levels.length === 2;
      const mention = mirror ? beyond.filter((cell) => cell.direction === 'more') : beyond;
      if (mention.length === 0) statements.push({ kind: 'no-cell-stands-out', because: 'none-beyond-threshold', critical: findings.cellThreshold.adjusted });
      for (const cell of mention.slice(0, 6)) statements.push({ kind: 'cell', row: cell.row, col: cell.col, direction: cell.direction, adjustedResidual: cell.adjustedResidual });
      if (mention.length > 6) statements.push({ kind: 'more-cells', count: mention.length - 6 });
      if (mirror && beyond.length > mention.length) statements.push({ kind: 'mirror-cells', removed: beyond.length - mention.length });
    }
  }
  record.findings.statements = statements;

  record.warnings = record.warnings.filter((w) => w.code !== 'large-sample');
  const v = record.measures.biasCorrectedV;
  if (decision.large && pooledPasses && v !== null && v < 0.1) {
    record.warnings.push({
      code: 'large-sample',
      message: `with ${formatNumber(Math.round(record.effectiveN))} observations even a negligible association is statistically significant; judge it by its strength (bias-corrected V ${formatMeasure(v)})`,
    });
  }
}

/** The large-sample caution applies from this effective size on. */
export function isLargeSample(record: Pick<AnalysisRecord, 'effectiveN'>): boolean {
  return largeSampleLimit(record.effectiveN);
}
