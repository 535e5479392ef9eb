/**
 * The pair report (the analysis record with its input, settings and layers)
 * and the warnings about level orders and layers held fixed.
 */
import { AnalysisOptions, AnalysisRecord, analyzeTable, decide, isLargeSample, Warning } from './analyzeTable.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import { TwoWayTable } from '../table/twoWayTable.js';
import type { Weighting } from '../table/weighting.js';
import { analyzeStrata, StratifiedSummary, StratumInput, StratumRecord } from './stratify.js';
import type { DesignInput } from './design.js';
import { UnmatchedValue, unmatchedValueWords } from '../io/rowRules.js';

import { TOOL_VERSION } from '../version.js';

export interface InputSummary {
  file: string;
  /** The field separator; null for Parquet. */
  delimiter: string | null;
  /** Which engine counted: the built-in reader or the embedded one. */
  engine: 'builtin' | 'duckdb';
  format: 'csv' | 'parquet';
  /** Files read (more than one for a pattern). */
  files: number;
  /** Data records read (after the header). */
  rowsRead: number;
  blankLines: number;
  /** Records skipped for a wrong number of fields (--skip-bad-rows). */
  badRowsSkipped: number;
  /** Rows left out by --where filters. */
  filtered: number;
  /** Rows skipped for an unusable weight or frequency (--skip-bad-rows). */
  badWeightsSkipped: number;
  /** Rows skipped for a missing or unusable stratum, cluster, fpc or replicate weight (--skip-bad-rows). */
  badDesignSkipped: number;
}

export interface PairReport extends AnalysisRecord {
  tool: { name: 'tabsight'; version: string };
  command: 'pair';
  input: InputSummary;
  settings: { ordinal: boolean; confidence: number; alpha: number; exact: string; simulations: number; seed: number };
  strata?: StratumRecord[];
  stratified?: StratifiedSummary;
  /** Rows left out for a missing value, by column and reason (a row missing in two columns counts in both). */
  excludedBy?: { column: string; reason: string; rows: number }[];
}

export function pairReport(
  table: TwoWayTable,
  excluded: number,
  input: InputSummary,
  options: AnalysisOptions,
  extraWarnings: Warning[] = [],
  weighting?: Weighting,
  layers?: { by: string; strata: StratumInput[] },
  order: LevelOrder = { rows: 'given', cols: 'given' },
  design: DesignInput | null = null,
): PairReport {
  const record = analyzeTable(table, excluded, options, weighting, design);
  const layered = layers ? analyzeStrata(layers.by, record, layers.strata, options) : null;
  if (layered) decideHeldFixed(record, layered.stratified);
  if (options.ordinal) record.warnings.push(...orderWarnings(record, order));
  const { rows, cols, n, ...rest } = record;
  return {
    tool: { name: 'tabsight', version: TOOL_VERSION },
    command: 'pair',
    input,
    rows,
    cols,
    n,
    ...rest,
    warnings: [...extraWarnings, ...record.warnings, ...(layered?.warnings ?? [])],
    settings: { ordinal: options.ordinal, confidence: options.confidence, alpha: options.alpha, exact: options.exact, simulations: options.simulations, seed: options.seed },
    ...(layered ? { strata: layered.strata, stratified: layered.stratified } : {}),
  };
}

/**
 * A --where value or --recode rule that no row of its column holds, one
 * warning each (a typo filters everything or nothing); a value unmatched in
 * several inputs (compare's periods, the waves) is said once.
 */
export function unmatchedValueWarnings(unmatched: readonly UnmatchedValue[]): Warning[] {
  const messages = [...new Set(unmatched.map(unmatchedValueWords))];
  return messages.map((message) => ({ code: 'unmatched-value', message }));
}

export function unknownOrderWarnings(option: string, unknown: readonly string[]): Warning[] {
  if (unknown.length === 0) return [];
  return [{ code: 'unknown-level', message: `${option} names ${unknown.map((l) => `"${l}"`).join(', ')}, which never occur${unknown.length === 1 ? 's' : ''} in the counted rows; left out of the order` }];
}

/** How the levels of each side came to be in their order. */
export interface LevelOrder {
  /** 'given': by --row-order/--col-order (or bins, lowest first); 'natural': sorted by the tool. */
  rows: 'given' | 'natural';
  cols: 'given' | 'natural';
}

/**
 * With --ordinal the measures read the levels in the order shown. Levels the
 * tool sorted itself are in natural (alphabetical, numbers by value) order,
 * which is the real order only when the levels are numbers or start with one
 * (ranges such as 16-24, 25-34): otherwise say so.
 */
export function orderWarnings(record: Pick<AnalysisRecord, 'rows' | 'cols'>, order: LevelOrder): Warning[] {
  const out: Warning[] = [];
  const sides = [
    [record.rows, order.rows, '--row-order'],
    [record.cols, order.cols, '--col-order'],
  ] as const;
  for (const [variable, how, option] of sides) {
    if (how === 'natural' && !variable.levels.every((l) => isNumericLabel(l) || /^[<>≤≥]?\s*[−+-]?\d/.test(l))) {
      out.push({
        code: 'alphabetical-order',
        message: `--ordinal reads ${variable.name} in the order ${variable.levels.slice(0, 6).map((l) => `"${l}"`).join(', ')}${variable.levels.length > 6 ? ', …' : ''}, which is alphabetical, not necessarily its real order; give the real order with ${option}`,
      });
    }
  }
  return out;
}

/** --by: the layered test decides, and "In words" leads with it. */
export function decideHeldFixed(record: AnalysisRecord, stratified: StratifiedSummary, adjustment?: AnalysisRecord['verdict']['adjustment']): void {
  const held = stratified.cmh ? { by: stratified.by, pValue: stratified.cmh.pValue, commonOddsRatio: stratified.commonOddsRatio?.estimate ?? null } : null;
  decide(record, { heldFixed: held, adjustment: adjustment ?? undefined, large: isLargeSample(record) });
}
