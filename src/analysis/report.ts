import { AnalysisOptions, AnalysisRecord, analyzeTable, Warning } from './analyzeTable.js';
import { TwoWayTable } from '../table/twoWayTable.js';
import type { Weighting } from '../table/weighting.js';
import { analyzeStrata, StratifiedSummary, StratumInput, StratumRecord } from './stratify.js';

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
}

export interface PairReport extends AnalysisRecord {
  tool: { name: 'tabsight'; version: string };
  command: 'pair';
  input: InputSummary;
  settings: { ordinal: boolean; confidence: number; exact: string; simulations: number; seed: number };
  strata?: StratumRecord[];
  stratified?: StratifiedSummary;
}

export function pairReport(
  table: TwoWayTable,
  excluded: number,
  input: InputSummary,
  options: AnalysisOptions,
  extraWarnings: Warning[] = [],
  weighting?: Weighting,
  layers?: { by: string; strata: StratumInput[] },
): PairReport {
  const record = analyzeTable(table, excluded, options, weighting);
  const layered = layers ? analyzeStrata(layers.by, record, layers.strata, options) : null;
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
    settings: { ordinal: options.ordinal, confidence: options.confidence, exact: options.exact, simulations: options.simulations, seed: options.seed },
    ...(layered ? { strata: layered.strata, stratified: layered.stratified } : {}),
  };
}

export function unknownOrderWarnings(option: string, unknown: readonly string[]): Warning[] {
  if (unknown.length === 0) return [];
  return [{ code: 'unknown-level', message: `${option} names ${unknown.map((l) => `"${l}"`).join(', ')}, which never occur${unknown.length === 1 ? 's' : ''} in the counted rows; left out of the order` }];
}
