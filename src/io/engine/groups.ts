/**
 * Grouped counts for a table (pair, compare, count): the engine returns one
 * line per distinct combination of the selected columns' values as read,
 * with its number of rows and the exact sums of its weights; the tool's
 * rules (trim, missing values, recodes, filters, the weight rule, layers)
 * then run on each group in io/countTable.ts, as on the reader's rows.
 */
import type { ReaderOptions } from '../readRecords.js';
import type { ReadSummary } from '../readRecords.js';
import type { WeightKind } from '../rowRules.js';
import type { EngineInput } from './files.js';
import type { Engine } from './module.js';
import { queryInput } from './query.js';
import { settleQuotes } from './quotes.js';
import { relation } from './relation.js';
import { resolve } from 'node:path';
import { literalFileName, weightedRowsSql } from './sql.js';

export interface EngineWeightRule {
  /** Index (in the selection) of the weight column. */
  slot: number;
  kind: WeightKind;
  decimalComma: boolean;
}

/** One distinct combination of the selected columns' values, as the engine counted it. */
export interface EngineGroup {
  /** Per selected column: its text as read (untrimmed), or null; the weight slot is null. */
  values: (string | null)[];
  rows: number;
  /** Σw and Σw² of the group as exact sums (see pairFromBuckets), or null without weights. */
  weightBuckets: [number, bigint][] | null;
  squareBuckets: [number, bigint][] | null;
  /** The weight's text when the engine found it unusable (the reader's rule decides). */
  badWeight: string | null;
  /** With `byFile`: the position in `input.files` of the file the group's rows came from; else 0. */
  file: number;
}

/** What the engine read of each file of the input (with `byFile`). */
export interface FileSummary {
  records: number;
  blankLines: number;
}

/**
 * Counts the distinct combinations of the selected columns in the engine.
 * `select` resolves the columns against the header (and throws the tool's
 * own message for an unknown one), as for the built-in reader.
 */
export async function engineGroups(
  engine: Engine,
  input: EngineInput,
  reader: ReaderOptions,
  select: (header: string[]) => number[],
  weight: EngineWeightRule | null,
  onGroup: (group: EngineGroup) => void,
  byFile = false,
): Promise<ReadSummary & { byFile: FileSummary[] | null }> {
  const rel = await relation(input, reader, engine, byFile);
  const selected = select(rel.header);
  const isKey = (slot: number) => !(weight && slot === weight.slot);
  const keys = selected.map((column, slot) => (isKey(slot) ? `CAST(${rel.names[column]} AS VARCHAR) AS v${slot}` : null)).filter((k): k is string => k !== null);
  const keyNames = selected.map((_c, slot) => `v${slot}`).filter((_k, slot) => isKey(slot));
  const values = keyNames.length;
  // With byFile, the file of each row is one more key, last.
  if (rel.fileColumn !== null) {
    keys.push(`CAST(${rel.fileColumn} AS VARCHAR) AS wave_file`);
    keyNames.push('wave_file');
  }
  const sql =
    weight === null
      ? `SELECT ${keyNames.join(', ')}, COUNT(*) AS n FROM (SELECT ${keys.join(', ')} FROM ${rel.sql}) GROUP BY ALL`
      : `SELECT ${keyNames.join(', ')}, bad, b, bq, COUNT(*) AS n, SUM(m) AS sm, SUM(mq) AS smq FROM (${weightedRowsSql(rel.sql, keys, { text: `CAST(${rel.names[selected[weight.slot]]} AS VARCHAR)`, kind: weight.kind, decimalComma: weight.decimalComma })}) GROUP BY ALL`;
  // Empty lines are counted while the engine works (per file with byFile); awaited below, so a failed query must not leave them unhandled.
  const blanks = rel.fileColumn !== null ? input.files.map((file) => rel.blankLinesOf(file)) : [rel.blankLines()];
  for (const b of blanks) b.catch(() => undefined);
  const rows = await queryInput(engine, input, sql);
  await rel.settle();
  await settleQuotes(input, reader, rows.flatMap((row) => row.slice(0, values) as (string | null)[]));
  const k = keyNames.length;
  const fileIndex = fileIndexer(input.files);
  const fileOf = (row: unknown[]) => (rel.fileColumn === null ? 0 : fileIndex(String(row[k - 1])));
  const valuesOf = (row: unknown[]) => {
    const out: (string | null)[] = selected.map(() => null);
    let at = 0;
    selected.forEach((_c, slot) => {
      if (isKey(slot)) out[slot] = row[at++] as string | null;
    });
    return out;
  };
  // Buckets of one combination arrive as separate lines; they are joined here.
  const joined = new Map<string, EngineGroup>();
  let records = 0;
  const perFile = input.files.map(() => 0);
  for (const row of rows) {
    const n = Number(row[weight ? k + 3 : k]);
    records += n;
    const file = fileOf(row);
    perFile[file] += n;
    const groupValues = valuesOf(row);
    const bad = weight ? (row[k] as string | null) : null;
    if (weight === null || bad !== null) {
      onGroup({ values: groupValues, rows: n, weightBuckets: null, squareBuckets: null, badWeight: bad, file });
      continue;
    }
    const key = JSON.stringify([file, groupValues]);
    let group = joined.get(key);
    if (group === undefined) {
      group = { values: groupValues, rows: 0, weightBuckets: [], squareBuckets: [], badWeight: null, file };
      joined.set(key, group);
    }
    group.rows += n;
    const b = row[k + 1];
    const bq = row[k + 2];
    if (b !== null) group.weightBuckets!.push([Number(b), BigInt(row[k + 4] as bigint)]);
    if (bq !== null) group.squareBuckets!.push([Number(bq), BigInt(row[k + 5] as bigint)]);
  }
  for (const group of joined.values()) onGroup(group);
  const blankLines = await Promise.all(blanks);
  const files: FileSummary[] | null = rel.fileColumn === null ? null : perFile.map((n, f) => ({ records: n, blankLines: blankLines[f] }));
  return { header: rel.header, delimiter: rel.delimiter, records, blankLines: blankLines.reduce((sum, b) => sum + b, 0), badRows: 0, engine: 'duckdb', format: input.format, files: input.files.length, byFile: files };
}

/** The position of a file in the input from the name the engine gives it (as given, as the literal name written for it, or resolved). */
function fileIndexer(files: readonly string[]): (name: string) => number {
  const index = new Map<string, number>();
  files.forEach((f, k) => {
    index.set(f, k);
    index.set(literalFileName(f), k);
    index.set(resolve(f), k);
  });
  return (name) => {
    const k = index.get(name) ?? index.get(resolve(name));
    if (k === undefined) throw new Error(`the engine named a file it was not given: ${name}`);
    return k;
  };
}
