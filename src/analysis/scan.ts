/**
 * The scan report: screening of the candidate columns, every pair analysed
 * as a single pair would be, multiple-testing adjustment and ranking.
 */
import { adjustPValues, Adjustment } from '../stats/multipleTesting.js';
import { CountPair, ExcludedBy, mergeRareLevels } from '../table/countedTable.js';
import { EncodedColumn, missingByReason, recodeColumn, rowsPerCode, shapeColumn } from '../table/encodedColumn.js';
import { binsOf, LevelRules, missingLevelLabels } from '../table/levelRules.js';
import { binNumericLevels } from '../table/bins.js';
import { isMissingLooking } from '../table/missingLooking.js';
import { derivation } from '../table/derived.js';
import { binnedColumn, OrderedColumn, orderColumn } from '../table/orderedColumn.js';
import { relabelTable } from '../table/twoWayTable.js';
import { analyzeStrata, StratifiedSummary, StratumRecord } from './stratify.js';
import { AnalysisOptions, AnalysisRecord, analyzeTable, decide, isLargeSample, Warning } from './analyzeTable.js';
import { simulateSequentially } from './simulate.js';
import { decideHeldFixed } from './report.js';
import type { InputSummary } from './report.js';
import { TOOL_VERSION } from '../version.js';
import { TabsightError } from '../errors.js';
import { formatCount } from '../readableNumbers.js';
import type { DesignSummary } from './design.js';

export interface ScanOptions {
  maxLevels: number;
  /** --bins k: a numeric column with more than k numbers is cut into k equal-frequency bins (a codebook's bins for a column win). */
  bins: number | null;
  /** Recodes by column (applied to the codes before screening). */
  recodes: Map<string, Map<string, string>>;
  /** The level rules of a column (codebook, cuts, recodes, --keep-missing), when any apply. */
  rules?: (name: string) => LevelRules | null;
  /** Score pairs where one column is a recoding of the other, instead of listing them apart. */
  keepDerived?: boolean;
  /** Whether the codebook orders a column (ordered, or cut into bins). */
  ordered?: (name: string) => boolean;
  keepMissing: boolean;
  other: { k: number; label: string } | null;
  adjustment: Adjustment;
  alpha: number;
  top: number | null;
  full: boolean;
  analysis: AnalysisOptions;
}

export interface SkippedColumn {
  column: string;
  reason: string;
  code: 'no-values' | 'single-level' | 'identifier' | 'numeric' | 'too-many-levels' | 'break-variable';
}

export interface ScanPair extends Omit<AnalysisRecord, 'counts' | 'rowTotals' | 'colTotals' | 'expected' | 'residuals' | 'contributions' | 'percentages' | 'designEffects' | 'designPercentages'> {
  rank: number;
  pAdjusted: number;
  passes: boolean;
  /** The rows left out of this pair's table, by column and reason (as pair's excludedBy). */
  excludedBy: ExcludedBy[];
  stratified?: StratifiedSummary;
  strata?: StratumRecord[];
  counts?: number[][];
  rowTotals?: number[];
  colTotals?: number[];
  expected?: number[][];
  residuals?: AnalysisRecord['residuals'];
  contributions?: number[][];
  percentages?: AnalysisRecord['percentages'];
  designEffects?: AnalysisRecord['designEffects'];
  designPercentages?: AnalysisRecord['designPercentages'];
}

/** The design of a scan, the same for every pair (each pair's own design effects are in `pairs[].design`). */
export type ScanDesign = Pick<DesignSummary, 'kind' | 'strata' | 'clusters' | 'degreesOfFreedom' | 'replicates' | 'method' | 'lonelyPsu' | 'columns' | 'rho' | 'centre' | 'lonelyStrata'>;

export interface UntestablePair {
  rows: string;
  cols: string;
  reason: string;
}

/** A pair where one column is a recoding of the other (table/derived.ts): associated by construction, so not scored. */
export interface DerivedPair {
  rows: string;
  cols: string;
  reason: string;
  rowLevels: number;
  colLevels: number;
}

export interface ScanReport {
  tool: { name: 'tabsight'; version: string };
  command: 'scan';
  input: InputSummary;
  n: number;
  adjustment: Adjustment;
  alpha: number;
  columnsScored: string[];
  pairsTested: number;
  pairsPassing: number;
  pairs: ScanPair[];
  skipped: SkippedColumn[];
  untestable: UntestablePair[];
  /** Pairs where one column is a recoding of the other, left out of the ranking and the multiple-testing family (unless --keep-derived). */
  derived: DerivedPair[];
  /** The rows each scored column (and the --by variable) leaves out of its pairs, by reason: a pair leaves out the rows of both its columns. */
  excludedBy: ExcludedBy[];
  /** The variable held fixed, when --by was given. */
  by: string | null;
  /** With --weight or --freq: how rows were weighted ("none" otherwise). */
  weighting: 'none' | 'weight' | 'freq';
  /** The survey design every pair's leading test accounts for, or null. */
  design: ScanDesign | null;
  /** What to check about the whole scan (a --where value or --recode rule no row holds); each pair has its own. */
  warnings: Warning[];
}

const IDENTIFIER_SHARE = 0.9;

/**
 * Screening: decides which candidates take part, with the reason for each
 * one left out. A column past the level cap has no codes by now (a numeric
 * one that could be binned was binned before screening).
 */
export function screenColumn(column: EncodedColumn, rows: number, options: Pick<ScanOptions, 'maxLevels'> & { other?: ScanOptions['other'] }): SkippedColumn | null {
  const present = rows - column.missing;
  const distinct = column.distinctCapped ? `more than ${formatCount(column.distinct)}` : formatCount(column.distinct);
  if (present === 0) return { column: column.name, code: 'no-values', reason: 'every value is missing' };
  if (column.distinct === 1) return { column: column.name, code: 'single-level', reason: `a single level ("${column.labels[0]}")` };
  const looksLikeIdentifier = column.distinct >= IDENTIFIER_SHARE * present && column.distinct > 10 && (!column.numeric || column.integer);
  if (looksLikeIdentifier) {
    return { column: column.name, code: 'identifier', reason: `an identifier: ${distinct} distinct values in ${formatCount(present)} rows` };
  }
  if (column.codes === null) {
    if (column.numeric) {
      const binnable = !column.distinctCapped;
      return { column: column.name, code: 'numeric', reason: `numeric with ${distinct} distinct values; ${binnable ? '--bins 5 cuts it into 5 equal-frequency groups' : 'too many to bin: cut it with --cuts or --recode'}` };
    }
    const other = options.other ? `, and --other ${options.other.k} keeps ${options.other.k + 1}` : '';
    return { column: column.name, code: 'too-many-levels', reason: `${distinct} distinct values, more than --max-levels ${options.maxLevels}${other}` };
  }
  return null;
}

export interface PreparedColumns {
  /** The columns that take part, in report order. */
  ordered: OrderedColumn[];
  skipped: SkippedColumn[];
  layer: OrderedColumn | null;
  /** The rows each column that takes part (and the layer) leaves out of its pairs, by reason (encodedColumn.ts: missingByReason). */
  excludedBy: ExcludedBy[];
  /** Columns cut into equal-frequency bins, with the levels kept beside the bins (missing-looking values, missing values kept as levels). */
  binned: { column: string; bins: number; apart: string[] }[];
}

/**
 * Screening, level rules, binning and order: the columns that take part,
 * in report order, and the layer. In this order, for each column: its level
 * rules (codebook, cuts, recodes, --keep-missing); the screening of columns
 * with no values, one level, or an identifier's values; equal-frequency bins
 * for a numeric column (--bins k, or the codebook's bins) with more than k
 * numbers, however many levels it has; then the level cap, which --other
 * relaxes (it merges levels, pair by pair, before the cap applies).
 */
export function prepareColumns(columns: EncodedColumn[], layer: EncodedColumn | null, rows: number, options: ScanOptions, frequencies?: Float64Array): PreparedColumns {
  const skipped: SkippedColumn[] = [];
  const ordered: OrderedColumn[] = [];
  const binned: PreparedColumns['binned'] = [];
  const missing = new Map<string, ExcludedBy[]>();
  const leftOut = (column: EncodedColumn, rules: LevelRules | null) =>
    missing.set(column.name, missingByReason(column, rules, options.keepMissing, frequencies).map((e) => ({ column: column.name, ...e })));
  const shape = (column: EncodedColumn, rules: LevelRules | null) => {
    if (rules === null || (!rules.codebook && !rules.cuts && !rules.recode)) return { column: recodeColumn(column, options.recodes.get(column.name), options.keepMissing), order: [] as string[] };
    return shapeColumn(column, rules);
  };
  // --other k leaves at most k + 1 levels a side: within the cap, a column with more levels takes part.
  const otherRescues = options.other !== null && options.other.k + 1 <= options.maxLevels;
  for (const original of columns) {
    const rules = options.rules?.(original.name) ?? null;
    leftOut(original, rules);
    let { column, order } = shape(original, rules);
    const early = screenColumn({ ...column, codes: column.codes ?? new Uint8Array(0) }, rows, options);
    if (early) {
      skipped.push(early);
      continue;
    }
    const bins = binsOf(rules, options.bins);
    if (bins !== null && column.codes !== null) {
      const missingLevels = rules ? missingLevelLabels(rules) : new Set<string>();
      const binning = binNumericLevels(column.labels, rowsPerCode(column.codes, column.labels.length).subarray(1), bins, (level) => isMissingLooking(level) || (options.keepMissing && missingLevels.has(level)));
      if (binning) {
        ordered.push(binnedColumn(column, binning));
        binned.push({ column: column.name, bins, apart: binning.apart });
        continue;
      }
    }
    if (column.codes !== null && column.labels.length > options.maxLevels && !otherRescues) column = { ...column, codes: null };
    const reason = screenColumn(column, rows, options);
    if (reason) skipped.push(reason);
    else ordered.push(orderColumn(column, order));
  }
  if (layer) leftOut(layer, options.rules?.(layer.name) ?? null);
  const shapedLayer = layer ? shape(layer, options.rules?.(layer.name) ?? null) : null;
  const orderedLayer = shapedLayer ? orderColumn(shapedLayer.column, shapedLayer.order) : null;
  const taking = [...ordered, ...(orderedLayer ? [orderedLayer] : [])];
  return { ordered, skipped, layer: orderedLayer, binned, excludedBy: taking.flatMap((c) => missing.get(c.name) ?? []) };
}

/**
 * Scores every pair of the prepared columns with the same analysis as a
 * single pair, adjusts the Pearson p-values for the number of pairs tested,
 * and ranks the pairs by bias-corrected V (ties by p-value).
 */
export function scorePairs(prepared: PreparedColumns, rows: number, input: InputSummary, options: ScanOptions, countPair: CountPair, warnings: Warning[] = []): ScanReport {
  const { ordered, skipped, layer } = prepared;
  // A pair's rows left out: those of its two columns and of the layer, in that order.
  const excludedOf = (rowName: string, colName: string) => [rowName, colName, ...(layer ? [layer.name] : [])].flatMap((name) => prepared.excludedBy.filter((e) => e.column === name));
  const untestable: UntestablePair[] = [];
  const derived: DerivedPair[] = [];
  const records: (AnalysisRecord & { layered?: ReturnType<typeof analyzeStrata> })[] = [];
  for (let a = 0; a < ordered.length; a++) {
    for (let b = a + 1; b < ordered.length; b++) {
      const counted = countPair(ordered[a], ordered[b], layer);
      let table = counted.table;
      let strata = counted.strata;
      if (options.other) ({ table, strata } = mergeRareLevels(table, strata, options.other.k, options.other.label));
      const excluded = counted.excluded;
      if (table.rowLevels.length < 2 || table.colLevels.length < 2) {
        const side = table.rowLevels.length < 2 ? table.rowName : table.colName;
        untestable.push({ rows: table.rowName, cols: table.colName, reason: `"${side}" has fewer than two levels where "${side === table.rowName ? table.colName : table.rowName}" has a value` });
        continue;
      }
      // One column a recoding of the other (V = 1 by construction): listed apart, out of the ranking and the family.
      const derivedBy = options.keepDerived ? null : derivation(table.counts);
      if (derivedBy) {
        derived.push({
          rows: table.rowName,
          cols: table.colName,
          reason: derivedBy.colsFromRows && derivedBy.rowsFromCols ? `each level of one matches one level of the other` : derivedBy.colsFromRows ? `each level of "${table.rowName}" occurs with one level of "${table.colName}"` : `each level of "${table.colName}" occurs with one level of "${table.rowName}"`,
          rowLevels: table.rowLevels.length,
          colLevels: table.colLevels.length,
        });
        continue;
      }
      // Two columns the codebook orders (or cuts) get the ordinal measures, as in pair.
      const ordinal = options.ordered?.(table.rowName) === true && options.ordered?.(table.colName) === true;
      const analysis = ordinal && !options.analysis.ordinal ? { ...options.analysis, ordinal: true } : options.analysis;
      let record: AnalysisRecord;
      try {
        record = analyzeTable(table, excluded, analysis, counted.weighting, counted.design ? { cells: counted.design, other: options.other } : null);
      } catch (error) {
        // A design that gives this pair no variance or no degrees of freedom: the pair is reported, not the scan stopped.
        if (!(counted.design && error instanceof TabsightError)) throw error;
        untestable.push({ rows: table.rowName, cols: table.colName, reason: error.message.replace(/^the table of .*? by .*?: /, '') });
        continue;
      }
      if (strata && layer) {
        const aligned = strata.map((s) => ({ ...s, table: relabelTable(s.table, table.rowLevels, table.colLevels) }));
        const layered = analyzeStrata(layer.name, record, aligned, analysis);
        records.push({ ...record, warnings: [...record.warnings, ...layered.warnings], layered });
      } else records.push(record);
    }
  }
  // The p-value that decides each pair: the layered test's with --by (never
  // simulated), else the pair's leading p-value, whose simulated ones are
  // drawn only as far as the family's decision needs.
  const { alpha } = options;
  if (layer) {
    for (const record of records) simulateSequentially([record], 'none', alpha, options.analysis.simulations, options.analysis.seed);
  } else simulateSequentially(records, options.adjustment, alpha, options.analysis.simulations, options.analysis.seed);
  const deciding = records.map((r) => (r.layered?.stratified.cmh ? r.layered.stratified.cmh.pValue : r.findings.primaryTest.pValue));
  const adjusted = adjustPValues(deciding, options.adjustment);
  let pairs: ScanPair[] = records.map((record, k) => {
    const adjustment = { method: options.adjustment, tests: records.length, pValue: adjusted[k] };
    if (record.layered) decideHeldFixed(record, record.layered.stratified, adjustment);
    else decide(record, { adjustment, large: isLargeSample(record) });
    const { counts, rowTotals, colTotals, expected, residuals, contributions, percentages, designEffects, designPercentages, layered, ...rest } = record;
    const pair: ScanPair = { ...rest, rank: 0, pAdjusted: adjusted[k], passes: record.verdict.passes, excludedBy: excludedOf(record.rows.name, record.cols.name) };
    if (layered) pair.stratified = layered.stratified;
    if (options.full) Object.assign(pair, { counts, rowTotals, colTotals, expected, residuals, contributions, percentages, designEffects, designPercentages }, layered ? { strata: layered.strata } : {});
    return pair;
  });
  pairs.sort((x, y) => (y.measures.biasCorrectedV ?? -1) - (x.measures.biasCorrectedV ?? -1) || x.verdict.pValue - y.verdict.pValue);
  pairs.forEach((p, k) => (p.rank = k + 1));
  const pairsPassing = pairs.filter((p) => p.passes).length;
  if (options.top !== null) pairs = pairs.slice(0, options.top);
  return {
    tool: { name: 'tabsight', version: TOOL_VERSION },
    command: 'scan',
    input,
    n: rows,
    adjustment: options.adjustment,
    alpha: options.alpha,
    columnsScored: ordered.map((c) => c.name),
    pairsTested: records.length,
    pairsPassing,
    pairs,
    skipped,
    untestable,
    derived,
    excludedBy: prepared.excludedBy,
    by: layer ? layer.name : null,
    weighting: records[0]?.weighting ?? 'none',
    design: scanDesign(records[0]?.design ?? null),
    warnings,
  };
}

function scanDesign(d: DesignSummary | null): ScanDesign | null {
  if (d === null) return null;
  const { kind, strata, clusters, degreesOfFreedom, replicates, method, lonelyPsu, columns, rho, centre, lonelyStrata } = d;
  return { kind, strata, clusters, degreesOfFreedom, replicates, method, lonelyPsu, columns, rho, centre, lonelyStrata };
}
