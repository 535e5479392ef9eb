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
import { weightedRowsSql } from './sql.js';

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
): Promise<ReadSummary> {
  const rel = await relation(input, reader, engine);
  const selected = select(rel.header);
  const isKey = (slot: number) => !(weight && slot === weight.slot);
  const keys = selected.map((column, slot) => (isKey(slot) ? `CAST(${rel.names[column]} AS VARCHAR) AS v${slot}` : null)).filter((k): k is string => k !== null);
  const keyNames = selected.map((_c, slot) => `v${slot}`).filter((_k, slot) => isKey(slot));
  const sql =
    weight === null
      ? `SELECT ${keyNames.join(', ')}, COUNT(*) AS n FROM (SELECT ${keys.join(', ')} FROM ${rel.sql}) GROUP BY ALL`
      : `SELECT ${keyNames.join(', ')}, bad, b, bq, COUNT(*) AS n, SUM(m) AS sm, SUM(mq) AS smq FROM (${weightedRowsSql(rel.sql, keys, { text: `CAST(${rel.names[selected[weight.slot]]} AS VARCHAR)`, kind: weight.kind, decimalComma: weight.decimalComma })}) GROUP BY ALL`;
  const blank = rel.blankLines();
  blank.catch(() => undefined); // awaited below; a failed query must not leave it unhandled
  const rows = await queryInput(engine, input, sql);
  await rel.settle();
  await settleQuotes(input, reader, rows.flatMap((row) => row.slice(0, keyNames.length) as (string | null)[]));
  const k = keyNames.length;
  const valuesOf = (row: unknown[]) => {
    const values: (string | null)[] = selected.map(() => null);
    let at = 0;
    selected.forEach((_c, slot) => {
      if (isKey(slot)) values[slot] = row[at++] as string | null;
    });
    return values;
  };
  // Buckets of one combination arrive as separate lines; they are joined here.
  const joined = new Map<string, EngineGroup>();
  let records = 0;
  for (const row of rows) {
    const n = Number(row[weight ? k + 3 : k]);
    records += n;
    const values = valuesOf(row);
    const bad = weight ? (row[k] as string | null) : null;
    if (weight === null || bad !== null) {
      onGroup({ values, rows: n, weightBuckets: null, squareBuckets: null, badWeight: bad });
      continue;
    }
    const key = JSON.stringify(values);
    let group = joined.get(key);
    if (group === undefined) {
      group = { values, rows: 0, weightBuckets: [], squareBuckets: [], badWeight: null };
      joined.set(key, group);
    }
    group.rows += n;
    const b = row[k + 1];
    const bq = row[k + 2];
    if (b !== null) group.weightBuckets!.push([Number(b), BigInt(row[k + 4] as bigint)]);
    if (bq !== null) group.squareBuckets!.push([Number(bq), BigInt(row[k + 5] as bigint)]);
  }
  for (const group of joined.values()) onGroup(group);
  return { header: rel.header, delimiter: rel.delimiter, records, blankLines: await blank, badRows: 0, engine: 'duckdb', format: input.format, files: input.files.length };
}
