import { adjustPValues, Adjustment } from '../stats/multipleTesting.js';
import { equalFrequencyBins, naturalRanks } from '../table/bins.js';
import { CodedColumn, crossCount, CrossCounted } from '../table/crossCount.js';
import { rareLevelMerge, relabelTable } from '../table/twoWayTable.js';
import { analyzeStrata, StratifiedSummary, StratumRecord } from './stratify.js';
import type { EncodedColumn } from '../table/encodedColumn.js';
import { AnalysisOptions, AnalysisRecord, analyzeTable } from './analyzeTable.js';
import type { InputSummary } from './report.js';
import { TOOL_VERSION } from '../version.js';

export interface ScanOptions {
  maxLevels: number;
  bins: number | null;
  /** Recodes by column (applied to the codes before screening). */
  recodes: Map<string, Map<string, string>>;
  keepMissing: boolean;
  other: { k: number; label: string } | null;
  weights: { values: Float64Array; kind: 'weight' | 'freq' } | null;
  layer: EncodedColumn | null;
  adjustment: Adjustment;
  alpha: number;
  top: number | null;
  full: boolean;
  analysis: AnalysisOptions;
}

export interface SkippedColumn {
  column: string;
  reason: string;
  code: 'no-values' | 'single-level' | 'identifier' | 'numeric' | 'too-many-levels';
}

export interface ScanPair extends Omit<AnalysisRecord, 'counts' | 'rowTotals' | 'colTotals' | 'expected' | 'residuals' | 'contributions' | 'percentages'> {
  rank: number;
  pAdjusted: number;
  passes: boolean;
  stratified?: StratifiedSummary;
  strata?: StratumRecord[];
  counts?: number[][];
  rowTotals?: number[];
  colTotals?: number[];
  expected?: number[][];
  residuals?: AnalysisRecord['residuals'];
  contributions?: number[][];
  percentages?: AnalysisRecord['percentages'];
}

export interface UntestablePair {
  rows: string;
  cols: string;
  reason: string;
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
  /** The layer held fixed, when --by was given. */
  by: string | null;
}

const IDENTIFIER_SHARE = 0.9;

/** Screening: decides which candidates take part, with the reason for each one left out. */
export function screenColumn(column: EncodedColumn, rows: number, options: Pick<ScanOptions, 'maxLevels' | 'bins'>): SkippedColumn | null {
  const present = rows - column.missing;
  const distinct = column.distinctCapped ? `more than ${column.distinct.toLocaleString('en-US')}` : column.distinct.toLocaleString('en-US');
  if (present === 0) return { column: column.name, code: 'no-values', reason: 'every value is missing' };
  if (column.distinct === 1) return { column: column.name, code: 'single-level', reason: `a single level ("${column.labels[0]}")` };
  const looksLikeIdentifier = column.distinct >= IDENTIFIER_SHARE * present && column.distinct > 10 && (!column.numeric || column.integer);
  if (looksLikeIdentifier) {
    return { column: column.name, code: 'identifier', reason: `an identifier: ${distinct} distinct values in ${present.toLocaleString('en-US')} rows` };
  }
  if (column.codes === null) {
    if (column.numeric && options.bins !== null) return null; // binned below
    if (column.numeric) {
      return { column: column.name, code: 'numeric', reason: `numeric with ${distinct} distinct values; --bins 5 cuts it into 5 equal-frequency groups` };
    }
    return { column: column.name, code: 'too-many-levels', reason: `${distinct} distinct values, more than --max-levels ${options.maxLevels}` };
  }
  return null;
}

/** The label a missing value gets with --keep-missing. */
export const MISSING_LEVEL = '(missing)';

/**
 * Applies a column's recode (levels recoded alike are merged) and, with
 * --keep-missing, makes missing a level of its own. Returns the column with
 * its new labels and codes; untouched columns come back as they are.
 */
export function reshapeColumn(column: EncodedColumn, mapping: ReadonlyMap<string, string> | undefined, keepMissing: boolean): EncodedColumn {
  if (column.codes === null || (!mapping && !(keepMissing && column.missing > 0))) return column;
  const labels: string[] = [];
  const index = new Map<string, number>();
  const remap = new Uint32Array(column.labels.length + 1);
  const codeOf = (label: string) => {
    let code = index.get(label);
    if (code === undefined) {
      labels.push(label);
      code = labels.length;
      index.set(label, code);
    }
    return code;
  };
  column.labels.forEach((raw, k) => (remap[k + 1] = codeOf(mapping?.get(raw) ?? raw)));
  if (keepMissing && column.missing > 0) remap[0] = codeOf(MISSING_LEVEL);
  const codes = labels.length >= 65535 ? new Uint32Array(column.codes.length) : new Uint16Array(column.codes.length);
  for (let k = 0; k < codes.length; k++) codes[k] = remap[column.codes[k]];
  return { ...column, labels, codes, distinct: labels.length, missing: keepMissing ? 0 : column.missing };
}

/** Turns a screened column into codes in report order (natural order, or bins lowest first). */
export function codedColumn(column: EncodedColumn, bins: number | null): CodedColumn {
  if (column.codes === null) {
    const binning = equalFrequencyBins(column.values as Float64Array, bins as number);
    return { name: column.name, labels: binning.labels, codes: binning.codes };
  }
  const rank = naturalRanks(column.labels);
  const labels = new Array<string>(column.labels.length);
  column.labels.forEach((l, code) => (labels[rank[code]] = l));
  const remap = new Uint32Array(column.labels.length + 1);
  for (let code = 1; code <= column.labels.length; code++) remap[code] = rank[code - 1] + 1;
  const codes = column.codes instanceof Uint32Array ? new Uint32Array(column.codes.length) : new Uint16Array(column.codes.length);
  for (let k = 0; k < codes.length; k++) codes[k] = remap[column.codes[k]];
  return { name: column.name, labels, codes };
}

/** A scan of columns encoded in memory: screening, then every pair counted from the codes. */
export function scanColumns(columns: EncodedColumn[], rows: number, input: InputSummary, options: ScanOptions): ScanReport {
  const prepared = prepareColumns(columns, rows, options);
  return scorePairs(prepared, rows, input, options, (a, b, layer) => crossCount(a, b, { weights: options.weights ?? undefined, strata: layer ?? undefined }));
}

export interface PreparedColumns {
  coded: CodedColumn[];
  skipped: SkippedColumn[];
  layer: CodedColumn | null;
}

/** Screening, recodes and binning: the columns that take part, coded in report order. */
export function prepareColumns(columns: EncodedColumn[], rows: number, options: ScanOptions): PreparedColumns {
  const skipped: SkippedColumn[] = [];
  const coded: CodedColumn[] = [];
  for (const original of columns) {
    let column = reshapeColumn(original, options.recodes.get(original.name), options.keepMissing);
    if (column.codes !== null && column.labels.length > options.maxLevels) column = { ...column, codes: null };
    const reason = screenColumn(column, rows, options);
    if (reason) skipped.push(reason);
    else coded.push(codedColumn(column, options.bins));
  }
  const layer = options.layer ? codedColumn(reshapeColumn(options.layer, options.recodes.get(options.layer.name), options.keepMissing), null) : null;
  return { coded, skipped, layer };
}

/** Counts one pair's table (and its layers): from the codes in memory, or from an engine's grouped counts. */
export type PairCounter = (a: CodedColumn, b: CodedColumn, layer: CodedColumn | null) => CrossCounted;

/**
 * Scores every pair of the prepared columns with the same analysis as a
 * single pair, adjusts the Pearson p-values for the number of pairs tested,
 * and ranks the pairs by bias-corrected V (ties by p-value).
 */
export function scorePairs(prepared: PreparedColumns, rows: number, input: InputSummary, options: ScanOptions, count: PairCounter): ScanReport {
  const { coded, skipped, layer } = prepared;
  const untestable: UntestablePair[] = [];
  const records: (AnalysisRecord & { layered?: ReturnType<typeof analyzeStrata> })[] = [];
  for (let a = 0; a < coded.length; a++) {
    for (let b = a + 1; b < coded.length; b++) {
      const counted = count(coded[a], coded[b], layer);
      let table = counted.table;
      let strata = counted.strata;
      if (options.other) {
        const merge = rareLevelMerge(table, options.other.k, options.other.label);
        table = relabelTable(table, merge.rowLevels, merge.colLevels, merge.rowMap, merge.colMap);
        strata = strata?.map((s) => ({ ...s, table: relabelTable(s.table, merge.rowLevels, merge.colLevels, merge.rowMap, merge.colMap) })) ?? null;
      }
      const excluded = counted.excluded;
      if (table.rowLevels.length < 2 || table.colLevels.length < 2) {
        const side = table.rowLevels.length < 2 ? table.rowName : table.colName;
        untestable.push({ rows: table.rowName, cols: table.colName, reason: `"${side}" has fewer than two levels where "${side === table.rowName ? table.colName : table.rowName}" has a value` });
        continue;
      }
      const record = analyzeTable(table, excluded, options.analysis, counted.weighting);
      if (strata && layer) {
        const aligned = strata.map((s) => ({ ...s, table: relabelTable(s.table, table.rowLevels, table.colLevels) }));
        const layered = analyzeStrata(layer.name, record, aligned, options.analysis);
        records.push({ ...record, warnings: [...record.warnings, ...layered.warnings], layered });
      } else records.push(record);
    }
  }
  const adjusted = adjustPValues(records.map((r) => r.tests.pearson.pValue), options.adjustment);
  let pairs: ScanPair[] = records.map((record, k) => {
    const { counts, rowTotals, colTotals, expected, residuals, contributions, percentages, layered, ...rest } = record;
    const pair: ScanPair = { ...rest, rank: 0, pAdjusted: adjusted[k], passes: adjusted[k] <= options.alpha };
    if (layered) pair.stratified = layered.stratified;
    if (options.full) Object.assign(pair, { counts, rowTotals, colTotals, expected, residuals, contributions, percentages }, layered ? { strata: layered.strata } : {});
    return pair;
  });
  pairs.sort((x, y) => (y.measures.biasCorrectedV ?? -1) - (x.measures.biasCorrectedV ?? -1) || x.tests.pearson.pValue - y.tests.pearson.pValue);
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
    columnsScored: coded.map((c) => c.name),
    pairsTested: records.length,
    pairsPassing,
    pairs,
    skipped,
    untestable,
    by: layer ? layer.name : null,
  };
}
