/**
 * The comparison of two periods of the same pair: each period's record, and
 * whether the association or either margin changed.
 */
import { pearsonChiSquare, TestResult } from '../stats/chiSquareTests.js';
import { breslowDay, mantelHaenszelOddsRatio } from '../stats/stratified.js';
import { noThreeWayInteraction } from '../stats/threeWay.js';
import { compareNatural } from '../table/naturalOrder.js';
import type { ExcludedBy } from '../table/countedTable.js';
import { dropEmptyLevels, relabelTable, TwoWayTable } from '../table/twoWayTable.js';
import { rescaleToEffectiveSize, Weighting } from '../table/weighting.js';
import { AnalysisOptions, AnalysisRecord, analyzeTable, Evidence, evidenceOf, NamedVariable, Warning } from './analyzeTable.js';
import { formatP } from '../readableNumbers.js';
import { InputSummary, unknownOrderWarnings } from './report.js';
import { TOOL_VERSION } from '../version.js';
import { TabsightError } from '../errors.js';
import { designEstimate, type DesignInput } from './design.js';
import { independentWaldTest, logOddsRatios, marginShares, type DesignWaldTest } from '../stats/designWald.js';
import type { DesignEstimate } from '../stats/designCovariance.js';

export interface PeriodInput {
  label: string;
  table: TwoWayTable;
  weighting: Weighting;
  excluded: number;
  /** The same rows by column and reason, where they were counted. */
  excludedBy?: ExcludedBy[];
  input: InputSummary;
  /** With a survey design: this period's design totals (each period its own sample). */
  design?: DesignInput | null;
}

/** A period's record; `excludedBy` (the rows left out by column and reason) where the period's rows were counted so. */
export type PeriodRecord = (({ label: string; testable: true; input: InputSummary } & AnalysisRecord) | { label: string; testable: false; input: InputSummary; n: number; reason: string }) & { excludedBy?: ExcludedBy[] };

export interface ChangeTest extends TestResult {
  method: 'breslow-day' | 'no-three-way-interaction' | 'design-wald';
  /** design-wald: the denominator df of the F form (null when it is referred to χ² instead), W and its χ² p-value. */
  denDf?: number | null;
  wald?: number;
  waldPValue?: number;
}

/** A margin's shift: Pearson's test of homogeneity, or with a survey design the design-based Wald test. */
export type ShiftTest = TestResult & { method?: 'design-wald'; denDf?: number | null; wald?: number; waldPValue?: number };

export interface CompareReport {
  tool: { name: 'tabsight'; version: string };
  command: 'compare';
  /** With --codebook describing the column: its question, ordered flag and the codes of each level, as in pair. */
  rows: NamedVariable;
  cols: NamedVariable;
  before: PeriodRecord;
  after: PeriodRecord;
  /** Did the association itself change? Breslow–Day for 2×2, the no-three-way-interaction G² otherwise. */
  change: ChangeTest | null;
  /** The no-three-way-interaction likelihood-ratio test, for every shape. */
  interaction: (TestResult & { iterations: number }) | null;
  /** Did the row distribution shift? Pearson's test of homogeneity on the period × row table. */
  rowShift: ShiftTest | null;
  colShift: ShiftTest | null;
  deltaBiasCorrectedV: number | null;
  /** The decision: did the association change at alpha? null when the change test cannot be computed. */
  verdict: { alpha: number; test: ChangeTest['method']; pValue: number; changed: boolean; evidence: Evidence } | null;
  /** Margins judged at alpha: did the row (column) distribution shift? */
  rowShifted: boolean | null;
  colShifted: boolean | null;
  /** With --weight: the tests use each period's table rescaled to its effective sample size. */
  weighted: boolean;
  /** With a survey design: each period is its own sample, and the change and shift tests are design-based Wald tests. */
  designed: boolean;
  /**
   * The columns of the pair whose levels the two periods do not share at
   * all: then no comparison is possible (no change test, no shift test of
   * that side, no verdict), and every format says so rather than "no
   * change". Empty when the periods can be compared.
   */
  noSharedLevel: string[];
  /** Levels seen in one period only. */
  onlyBefore: { rows: string[]; cols: string[] };
  onlyAfter: { rows: string[]; cols: string[] };
  warnings: Warning[];
}

/** The fact that two periods share no level of some columns, in words (every format, and the line of --exit-status). */
export function noSharedLevelWords(before: string, after: string, columns: readonly string[]): string {
  return `${before} and ${after} share no level of ${columns.join(' or of ')}, so no comparison of the periods is possible`;
}

/**
 * What --exit-status cannot answer from a comparison: the periods share no
 * level of a column, or the change test is not defined for the tables; null
 * when the verdict decides.
 */
export function undecidedComparison(report: Pick<CompareReport, 'verdict' | 'noSharedLevel' | 'before' | 'after'>): string | null {
  if (report.noSharedLevel.length > 0) return noSharedLevelWords(report.before.label, report.after.label, report.noSharedLevel);
  if (report.verdict === null) return 'whether the association changed cannot be tested for these tables';
  return null;
}

/** The levels of several periods together: those named by `requested` first, the rest in natural order. */
export function unionOfLevels(lists: readonly (readonly string[])[], requested?: readonly string[]): string[] {
  const all = [...new Set(lists.flat())];
  if (!requested) return all.sort(compareNatural);
  const named = requested.filter((l) => all.includes(l));
  return [...named, ...all.filter((l) => !named.includes(l)).sort(compareNatural)];
}

/** One period analysed on its own, on the levels it has (the same analysis as `pair`). */
export function periodRecord(p: PeriodInput, options: AnalysisOptions): PeriodRecord {
  const own = dropEmptyLevels(p.table);
  const n = own.counts.flat().reduce((s, v) => s + v, 0);
  const leftOut = p.excludedBy ? { excludedBy: p.excludedBy } : {};
  if (own.rowLevels.length < 2 || own.colLevels.length < 2) {
    const side = own.rowLevels.length < 2 ? own.rowName : own.colName;
    return { label: p.label, testable: false, input: p.input, n, reason: `"${side}" has fewer than two levels in this period`, ...leftOut };
  }
  try {
    return { label: p.label, testable: true, input: p.input, ...analyzeTable(own, p.excluded, options, p.weighting, p.design ?? null), ...leftOut };
  } catch (error) {
    // A design that gives this period no variance or no degrees of freedom: the period is reported as untestable.
    if (!(p.design && error instanceof TabsightError)) throw error;
    return { label: p.label, testable: false, input: p.input, n, reason: error.message, ...leftOut };
  }
}

/** A design-based Wald test as a change or shift test: its F form, or W on χ² when the design df are too few for F. */
function waldResult(test: DesignWaldTest): { statistic: number; df: number; pValue: number; method: 'design-wald'; denDf: number | null; wald: number; waldPValue: number } {
  return {
    statistic: test.statistic ?? test.wald,
    df: test.numDf,
    pValue: test.pValue ?? test.waldPValue,
    method: 'design-wald',
    denDf: test.denDf,
    wald: test.wald,
    waldPValue: test.waldPValue,
  };
}

/**
 * With a survey design, the two periods as independent samples: design-based
 * Wald tests that the log odds ratios (the association) and each margin are
 * the same in both, from each period's design covariance on the shared levels.
 */
function designChange(before: PeriodInput, after: PeriodInput, rowLevels: string[], colLevels: string[], warnings: Warning[]): { change: ChangeTest | null; rowShift: ShiftTest | null; colShift: ShiftTest | null } {
  const layout = { rowLevels, colLevels };
  let estimates: [DesignEstimate, DesignEstimate];
  try {
    estimates = [designEstimate(before.design as DesignInput, layout), designEstimate(after.design as DesignInput, layout)];
  } catch (error) {
    if (!(error instanceof TabsightError)) throw error;
    warnings.push({ code: 'design-change-untestable', message: `no design-based comparison of the periods: ${error.message}` });
    return { change: null, rowShift: null, colShift: null };
  }
  const r = rowLevels.length;
  const c = colLevels.length;
  const [a, b] = estimates;
  const oddsA = logOddsRatios(a.proportions, r, c);
  const oddsB = logOddsRatios(b.proportions, r, c);
  let change: ChangeTest | null = null;
  if (oddsA === null || oddsB === null) {
    warnings.push({ code: 'design-change-untestable', message: 'a cell of the table is empty in one period, so its log odds ratios, and the design-based test of a change in the association, are not defined; merge sparse levels (--recode, --other)' });
  } else {
    const test = independentWaldTest({ ...oddsA, estimate: a }, { ...oddsB, estimate: b });
    if (test) change = waldResult(test);
    else warnings.push({ code: 'design-change-untestable', message: 'the design covariance of the log odds ratios is singular, so the design-based test of a change in the association is not defined' });
  }
  const shift = (by: 'row' | 'col'): ShiftTest | null => {
    const test = independentWaldTest({ ...marginShares(a.proportions, r, c, by), estimate: a }, { ...marginShares(b.proportions, r, c, by), estimate: b });
    return test ? waldResult(test) : null;
  };
  if (change !== null && change.denDf === null) {
    warnings.push({ code: 'few-design-df', message: `the two periods' designs have ${a.degreesOfFreedom + b.degreesOfFreedom} degrees of freedom together, too few for the F form of the Wald test with ${change.df} log odds ratios; the χ² form is given, and is optimistic` });
  }
  return { change, rowShift: shift('row'), colShift: shift('col') };
}

function homogeneity(rows: number[][]): TestResult | null {
  const kept = rows[0].map((_v, j) => j).filter((j) => rows[0][j] + rows[1][j] > 0);
  if (kept.length < 2) return null;
  return pearsonChiSquare(rows.map((r) => kept.map((j) => r[j])));
}

/**
 * Two periods of the same pair of questions: each analysed on its own, and
 * the tests of whether the association changed (Breslow–Day across the two
 * periods for 2×2 tables; otherwise the likelihood-ratio test of no
 * three-way interaction period × rows × cols, fitted by IPF) and whether
 * each margin shifted (chi-square tests of homogeneity).
 */
export function comparePeriods(before: PeriodInput, after: PeriodInput, options: AnalysisOptions, order: { rows?: string[]; cols?: string[] } = {}): CompareReport {
  // Levels each period really has (a table laid out on shared levels may carry empty ones).
  const present = [dropEmptyLevels(before.table), dropEmptyLevels(after.table)];
  const rowLevels = unionOfLevels([present[0].rowLevels, present[1].rowLevels], order.rows);
  const colLevels = unionOfLevels([present[0].colLevels, present[1].colLevels], order.cols);
  const aligned = [before, after].map((p) => rescaleToEffectiveSize(relabelTable(p.table, rowLevels, colLevels).counts, p.weighting));
  const warnings: Warning[] = [];
  const only = (a: readonly string[], b: readonly string[]) => a.filter((l) => !b.includes(l));
  const onlyBefore = { rows: only(present[0].rowLevels, present[1].rowLevels), cols: only(present[0].colLevels, present[1].colLevels) };
  const onlyAfter = { rows: only(present[1].rowLevels, present[0].rowLevels), cols: only(present[1].colLevels, present[0].colLevels) };
  const describe = (side: { rows: string[]; cols: string[] }, period: string) => {
    const parts = [...side.rows.map((l) => `${before.table.rowName} "${l}"`), ...side.cols.map((l) => `${before.table.colName} "${l}"`)];
    if (parts.length > 0) warnings.push({ code: 'level-in-one-period', message: `${parts.join(', ')} occur${parts.length === 1 ? 's' : ''} only in ${period}; counted as zero in the other period` });
  };
  describe(onlyBefore, before.label);
  describe(onlyAfter, after.label);
  // A side whose levels the periods do not share at all leaves nothing to compare: no test of a change, none of that side's shift.
  const shares = (a: readonly string[], b: readonly string[]) => a.some((l) => b.includes(l));
  const rowsShared = shares(present[0].rowLevels, present[1].rowLevels);
  const colsShared = shares(present[0].colLevels, present[1].colLevels);
  const noSharedLevel = [...(rowsShared ? [] : [before.table.rowName]), ...(colsShared ? [] : [before.table.colName])];
  if (noSharedLevel.length > 0) {
    warnings.unshift({ code: 'no-shared-level', message: `${noSharedLevelWords(before.label, after.label, noSharedLevel)}; check that both hold the same question with the same labels, or map the levels onto each other with --recode` });
  }
  const comparable = noSharedLevel.length === 0;

  const beforeRecord = periodRecord(before, options);
  const afterRecord = periodRecord(after, options);
  const designed = Boolean(before.design && after.design);
  const interactionFit = designed || !comparable ? null : noThreeWayInteraction(aligned);
  const interaction = interactionFit ? { statistic: interactionFit.statistic, df: interactionFit.df, pValue: interactionFit.pValue, iterations: interactionFit.iterations } : null;
  let change: ChangeTest | null = null;
  const designTests = designed && comparable ? designChange(before, after, rowLevels, colLevels, warnings) : null;
  if (!comparable) change = null;
  else if (designTests) change = designTests.change;
  else if (rowLevels.length === 2 && colLevels.length === 2) {
    const common = mantelHaenszelOddsRatio(aligned, options.confidence);
    const bd = common ? breslowDay(aligned, common.estimate) : null;
    if (bd) change = { ...bd, method: 'breslow-day' };
  } else if (interaction) {
    change = { statistic: interaction.statistic, df: interaction.df, pValue: interaction.pValue, method: 'no-three-way-interaction' };
  }
  if (!change && !designTests) {
    warnings.push({
      code: 'change-untestable',
      message: `whether the association changed cannot be tested: with the empty cells of these tables ${rowLevels.length === 2 && colLevels.length === 2 ? 'the common odds ratio and the Breslow–Day test are' : 'the model of one association in both periods is'} not defined; merge sparse levels (--recode, --other) or compare each period's own result with care`,
    });
  }
  const rowMargins = aligned.map((t) => t.map((row) => row.reduce((s, v) => s + v, 0)));
  const colMargins = aligned.map((t) => t[0].map((_v, j) => t.reduce((s, row) => s + row[j], 0)));
  const v = (r: PeriodRecord) => (r.testable ? r.measures.biasCorrectedV : null);
  const vb = v(beforeRecord);
  const va = v(afterRecord);
  const alpha = options.alpha;
  const verdict = change ? { alpha, test: change.method, pValue: change.pValue, changed: change.pValue <= alpha, evidence: evidenceOf(change.pValue, alpha) } : null;
  if (verdict?.changed) {
    warnings.push({ code: 'association-changed', message: `the association between ${before.table.rowName} and ${before.table.colName} changed between ${before.label} and ${after.label} (p ${formatP(verdict.pValue)}, at most α ${alpha})` });
  }
  const rowShift = !rowsShared ? null : designed ? (designTests?.rowShift ?? null) : homogeneity(rowMargins);
  const colShift = !colsShared ? null : designed ? (designTests?.colShift ?? null) : homogeneity(colMargins);
  return {
    tool: { name: 'tabsight', version: TOOL_VERSION },
    command: 'compare',
    rows: { name: before.table.rowName, levels: rowLevels },
    cols: { name: before.table.colName, levels: colLevels },
    before: beforeRecord,
    after: afterRecord,
    change,
    interaction,
    rowShift,
    colShift,
    deltaBiasCorrectedV: vb !== null && va !== null ? va - vb : null,
    verdict,
    rowShifted: rowShift ? rowShift.pValue <= alpha : null,
    colShifted: colShift ? colShift.pValue <= alpha : null,
    weighted: before.weighting.kind === 'weight' || after.weighting.kind === 'weight',
    designed,
    noSharedLevel,
    onlyBefore,
    onlyAfter,
    warnings,
  };
}

/** The comparison of two periods as `compare` reports it, with the note on --row-order levels that never occur (and the reading's own warnings first: filter values no row holds). */
export function compareReport(before: PeriodInput, after: PeriodInput, options: AnalysisOptions, order: { rows?: string[]; cols?: string[] } = {}, extraWarnings: Warning[] = []): CompareReport {
  const report = comparePeriods(before, after, options, order);
  report.warnings.unshift(...extraWarnings, ...unknownOrderWarnings('--row-order', (order.rows ?? []).filter((l) => !report.rows.levels.includes(l))));
  return report;
}
