/**
 * The layered view (--by): each layer's record, and the tests that pool the
 * layers while holding the layer variable fixed.
 */
import { TestResult } from '../stats/chiSquareTests.js';
import { formatP, formatRatio } from '../readableNumbers.js';
import { breslowDay, CommonOddsRatio, cochranMantelHaenszel, mantelHaenszelOddsRatio } from '../stats/stratified.js';
import { dropEmptyLevels, TwoWayTable } from '../table/twoWayTable.js';
import { rescaleToEffectiveSize, Weighting } from '../table/weighting.js';
import { AnalysisOptions, AnalysisRecord, analyzeTable, Warning } from './analyzeTable.js';
import { simulateSequentially } from './simulate.js';

export interface StratumInput {
  level: string;
  table: TwoWayTable;
  weighting: Weighting;
}

export type StratumRecord = ({ level: string; testable: true } & AnalysisRecord) | { level: string; testable: false; n: number; reason: string };

export interface StratifiedSummary {
  by: string;
  levels: number;
  cmh: TestResult | null;
  commonOddsRatio: CommonOddsRatio | null;
  breslowDay: TestResult | null;
  /** The pooled (marginal) table's odds ratio, for comparison (2×2 only). */
  pooledOddsRatio: number | null;
}

/**
 * The layered view: each stratum analysed on its own, and the tests that
 * pool the strata while holding the layer fixed. Sampling-weighted strata
 * enter the pooled tests rescaled to their effective sample size, like the
 * single-table tests.
 */
export function analyzeStrata(
  by: string,
  pooled: AnalysisRecord,
  strata: readonly StratumInput[],
  options: AnalysisOptions,
): { strata: StratumRecord[]; stratified: StratifiedSummary; warnings: Warning[] } {
  const records: StratumRecord[] = strata.map((s) => {
    const own = dropEmptyLevels(s.table);
    const n = s.table.counts.flat().reduce((t, v) => t + v, 0);
    if (own.rowLevels.length < 2 || own.colLevels.length < 2) {
      const side = own.rowLevels.length < 2 ? own.rowName : own.colName;
      return { level: s.level, testable: false, n, reason: `"${side}" has fewer than two levels in this layer` };
    }
    return { level: s.level, testable: true, ...analyzeTable(own, 0, options, s.weighting) };
  });
  // Deferred (scan): each layer's simulated p-value is drawn until it is clearly on one side of alpha.
  if (options.simulation === 'deferred') {
    for (const record of records) if (record.testable) simulateSequentially([record], 'none', options.alpha, options.simulations, options.seed);
  }
  const scaled = strata.map((s) => rescaleToEffectiveSize(s.table.counts, s.weighting));
  const cmh = cochranMantelHaenszel(scaled);
  const twoByTwo = pooled.rows.levels.length === 2 && pooled.cols.levels.length === 2;
  const commonOddsRatio = twoByTwo ? mantelHaenszelOddsRatio(scaled, options.confidence) : null;
  const bd = twoByTwo && commonOddsRatio ? breslowDay(scaled, commonOddsRatio.estimate) : null;
  const pooledOddsRatio = twoByTwo ? sampleOddsRatio(pooled.counts) : null;

  const warnings: Warning[] = [];
  const [r1, r2] = pooled.rows.levels;
  const [c1] = pooled.cols.levels;
  if (pooledOddsRatio !== null && commonOddsRatio !== null && pooledOddsRatio > 0 && Number.isFinite(pooledOddsRatio)) {
    const a = Math.log(pooledOddsRatio);
    const b = Math.log(commonOddsRatio.estimate);
    if (a * b < 0 && Math.abs(a) > Math.log(1.05) && Math.abs(b) > Math.log(1.05)) {
      warnings.push({
        code: 'reversal',
        message:
          `holding ${by} fixed reverses the association: pooled over ${by}, "${r1}" has ${a > 0 ? 'higher' : 'lower'} odds of "${c1}" than "${r2}" (odds ratio ${formatRatio(pooledOddsRatio)}), ` +
          `but within levels of ${by} the odds run the other way (common odds ratio ${formatRatio(commonOddsRatio.estimate)}); the pooled table misleads here`,
      });
    }
  }
  const alpha = options.alpha;
  if (cmh !== null) {
    const pooledSignificant = pooled.findings.primaryTest.pValue <= alpha;
    const layeredSignificant = cmh.pValue <= alpha;
    if (pooledSignificant && !layeredSignificant) {
      warnings.push({ code: 'layer-explains', message: `the association of the table pooled over ${by} is not there within its levels (Cochran–Mantel–Haenszel p ${formatP(cmh.pValue)}, above α ${alpha}); ${by} may account for it` });
    } else if (!pooledSignificant && layeredSignificant) {
      warnings.push({ code: 'layer-reveals', message: `within levels of ${by} there is an association that the pooled table hides (Cochran–Mantel–Haenszel p ${formatP(cmh.pValue)}, at most α ${alpha})` });
    }
  }
  if (bd !== null && bd.pValue <= alpha) {
    warnings.push({ code: 'heterogeneous-odds', message: `the odds ratio differs between levels of ${by} (Breslow–Day p ${formatP(bd.pValue)}, at most α ${alpha}), so one common odds ratio summarises unlike groups` });
  }
  return { strata: records, stratified: { by, levels: strata.length, cmh, commonOddsRatio, breslowDay: bd, pooledOddsRatio }, warnings };
}

function sampleOddsRatio(counts: number[][]): number | null {
  const [[a, b], [c, d]] = counts;
  if (b * c === 0) return null;
  return (a * d) / (b * c);
}
