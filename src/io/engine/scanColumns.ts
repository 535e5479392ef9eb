/**
 * A scan counted by the embedded engine. The selected columns of the rows
 * are put in one temporary table; the engine then profiles each column (its
 * distinct values, or only how many there are when that is past every cap)
 * and counts every pair's table in GROUPING SETS queries. The columns come
 * back as the scan's EncodedColumn with one code per distinct value (an
 * "entry") instead of one per row, so that screening, recodes, binning and
 * the analysis are the scan's own.
 */
import { dataError } from '../../errors.js';
import { pairFromBuckets } from '../../numerics/compensatedSum.js';
import type { CountedTable, CountPair } from '../../table/countedTable.js';
import { countPair } from '../../table/countPair.js';
import type { EncodedColumn } from '../../table/encodedColumn.js';
import { isNumericLabel } from '../../table/naturalOrder.js';
import type { OrderedColumn } from '../../table/orderedColumn.js';
import { ColumnsRequest, DISTINCT_TRACKING_LIMIT, RECODED_READING_CAP, scanSelection } from '../columns.js';
import type { EncodedInput } from '../counting.js';
import { FieldInterner } from '../fieldInterner.js';
import type { ReaderOptions } from '../readRecords.js';
import { parseWeightValue } from '../rowRules.js';
import type { EngineInput } from './files.js';
import type { Engine } from './module.js';
import { EngineFallback, queryInput } from './query.js';
import { settleQuotes } from './quotes.js';
import { EngineRelation, relation } from './relation.js';
import { NUMBER_PATTERN, sqlLiteral, weightedRowsSql } from './sql.js';

const TABLE = 'tabsight_scan_rows';
/** Grouping sets per query by default: beyond it, pairs are counted in batches. */
const PAIRS_PER_QUERY = 1000;
/** The rows that count: past the filters, with a usable weight. */
const KEPT = 'pass AND ok';

/** The distinct values of one column among the kept rows. */
interface Entries {
  /** The engine's value (as read, untrimmed) of each entry; null for SQL NULL. */
  raws: (string | null)[];
  counts: number[];
  /** Where each entry's code sits in the encoded column (its index, or its first row when binned). */
  position: Map<string | null, number>;
}

/** What one column of the temporary table is: a candidate (v0, v1, …) or the layer (vl), and its level cap while reading. */
interface ScanKey {
  name: string;
  sql: string;
  cap: number;
}

/** Filters: the engine lists each filter column's values, the tool's rule decides which pass; the SQL of the rows that pass. */
async function filterPredicate(engine: Engine, input: EngineInput, rel: EngineRelation, request: ColumnsRequest, where: number[], missing: ReadonlySet<string>): Promise<string> {
  const text = (index: number) => `CAST(${rel.names[index]} AS VARCHAR)`;
  const filters: string[] = [];
  for (const [k, index] of where.entries()) {
    const clause = request.where![k];
    const mapping = request.recodes?.get(rel.header[index]);
    const values = await queryInput(engine, input, `SELECT DISTINCT ${text(index)} FROM ${rel.sql}`);
    const interner = new FieldInterner(missing, Number.MAX_SAFE_INTEGER);
    const passing = values
      .map((r) => r[0] as string | null)
      .filter((raw) => {
        const id = interner.internString(raw ?? '');
        if (id <= 0) return false;
        const label = interner.labels[id - 1];
        return clause.values.has(mapping?.get(label) ?? label) !== clause.negate;
      });
    filters.push(passing.length === 0 ? 'false' : `(${text(index)} IN (${passing.map((p) => sqlLiteral(p as string)).join(', ')}))`);
  }
  return filters.length === 0 ? 'true' : filters.join(' AND ');
}

/** Rows read, filtered out, and with an unusable weight (judged by the tool's own rule). */
async function census(engine: Engine, input: EngineInput, reader: ReaderOptions, request: ColumnsRequest): Promise<{ records: number; filtered: number; badWeights: number }> {
  const weight = request.weight;
  let records = 0;
  let filtered = 0;
  let badWeights = 0;
  for (const [passed, bad, n] of await queryInput(engine, input, `SELECT pass, CASE WHEN pass THEN bad END, COUNT(*) FROM ${TABLE} GROUP BY ALL`)) {
    const rows = Number(n);
    records += rows;
    if (!passed) filtered += rows;
    else if (bad !== null && weight) {
      const parsed = parseWeightValue(bad as string, weight.kind, weight.decimalComma);
      if (typeof parsed !== 'string') throw new EngineFallback(`a weight the engine does not read as the tool does ("${bad}")`);
      if (!reader.skipBadRows) {
        if (input.format === 'csv' && !input.glob) throw new EngineFallback('a weight to be named by its line');
        const option = weight.kind === 'freq' ? '--freq' : '--weight';
        throw dataError(`${input.label}: ${option} column "${weight.column}" ${parsed} in ${rows.toLocaleString('en-US')} row${rows === 1 ? '' : 's'}; fix them or pass --skip-bad-rows to count and skip such rows`);
      }
      badWeights += rows;
    }
  }
  if (records === 0) throw dataError(`${input.label}: the header has no data rows under it`);
  return { records, filtered, badWeights };
}

interface ColumnProfile {
  distinct: number;
  missing: number;
  numeric: boolean;
  integer: boolean;
}

/** How many distinct trimmed values each column holds among the kept rows, how many are missing, whether all are numbers. */
async function profileColumns(engine: Engine, input: EngineInput, keys: readonly ScanKey[], missing: ReadonlySet<string>): Promise<{ rows: number; profiles: ColumnProfile[] }> {
  const missingList = [...missing].map(sqlLiteral);
  const trimmed = (v: string) => `trim(${v}, ' \t')`;
  const isMissing = (v: string) => `(${v} IS NULL OR ${trimmed(v)} = ''${missingList.length > 0 ? ` OR ${trimmed(v)} IN (${missingList.join(', ')})` : ''})`;
  const measures = keys.map(({ sql: v }) =>
    [
      `COUNT(DISTINCT ${trimmed(v)}) FILTER (WHERE NOT ${isMissing(v)})`,
      `COUNT(*) FILTER (WHERE ${isMissing(v)})`,
      `bool_and(regexp_full_match(${trimmed(v)}, '${NUMBER_PATTERN}')) FILTER (WHERE NOT ${isMissing(v)})`,
      `bool_and(regexp_full_match(${trimmed(v)}, '[+-]?[0-9]+')) FILTER (WHERE NOT ${isMissing(v)})`,
    ].join(', '),
  );
  const [row] = await queryInput(engine, input, `SELECT COUNT(*), ${measures.join(', ')} FROM ${TABLE} WHERE ${KEPT}`);
  const profiles = keys.map((_key, k) => ({ distinct: Number(row[1 + 4 * k]), missing: Number(row[2 + 4 * k]), numeric: row[3 + 4 * k] === true, integer: row[4 + 4 * k] === true }));
  return { rows: Number(row[0]), profiles };
}

/** The distinct values (with their row counts) of the columns whose values are wanted. */
async function fetchEntries(engine: Engine, input: EngineInput, keys: readonly ScanKey[], wanted: readonly boolean[]): Promise<(Entries | null)[]> {
  const entries: (Entries | null)[] = keys.map(() => null);
  const queries = keys.map((key, k) => (wanted[k] ? `SELECT ${k} AS c, ${key.sql} AS v, COUNT(*) AS n FROM ${TABLE} WHERE ${KEPT} GROUP BY ${key.sql}` : null)).filter((q): q is string => q !== null);
  if (queries.length === 0) return entries;
  for (const [c, v, n] of await queryInput(engine, input, queries.join(' UNION ALL '))) {
    const e = (entries[Number(c)] ??= { raws: [] as (string | null)[], counts: [] as number[], position: new Map<string | null, number>() });
    e.raws.push(v as string | null);
    e.counts.push(Number(n));
  }
  return entries;
}

/**
 * A column from its entries: one code per entry, the reader's trim and
 * missing rule applied; past the cap, a numeric column to be binned keeps
 * one value per row (entries laid end to end) instead.
 */
function encodeEntries(key: ScanKey, e: Entries, rows: number, missingTokens: ReadonlySet<string>, keepNumeric: boolean): EncodedColumn {
  const interner = new FieldInterner(missingTokens, Number.MAX_SAFE_INTEGER);
  const codes = new Uint32Array(e.raws.length);
  let missing = 0;
  e.raws.forEach((raw, i) => {
    codes[i] = interner.internString(raw ?? '');
    if (codes[i] === 0) missing += e.counts[i];
  });
  const labels = interner.labels;
  const numeric = labels.length > 0 && labels.every(isNumericLabel);
  const integer = numeric && labels.every((l) => /^[+-]?\d+$/.test(l));
  const withinCap = labels.length <= key.cap;
  let values: Float64Array | null = null;
  if (!withinCap && numeric && keepNumeric) {
    // Binned: entries laid end to end; each entry's code is read at its first row.
    values = new Float64Array(rows);
    let at = 0;
    e.raws.forEach((raw, i) => {
      e.position.set(raw, at);
      values!.fill(codes[i] === 0 ? Number.NaN : Number(labels[codes[i] - 1]), at, at + e.counts[i]);
      at += e.counts[i];
    });
  } else e.raws.forEach((raw, i) => e.position.set(raw, i));
  return { name: key.name, labels: withinCap ? labels : [], codes: withinCap ? codes : null, missing, distinct: labels.length, distinctCapped: false, numeric, integer, values };
}

/** A column whose values were not fetched (past every cap): only its profile. */
function profiledColumn(name: string, p: ColumnProfile): EncodedColumn {
  const capped = p.distinct > DISTINCT_TRACKING_LIMIT;
  return { name, labels: [], codes: null, missing: p.missing, distinct: capped ? DISTINCT_TRACKING_LIMIT : p.distinct, distinctCapped: capped, numeric: p.numeric && p.distinct > 0, integer: p.integer && p.distinct > 0, values: null };
}

/** One pair's grouped counts, entry by entry, as the engine returned them. */
interface PairGroups {
  a: number[];
  b: number[];
  layer: number[];
  rows: number[];
  w: number[];
  wLow: number[];
  q: number[];
  qLow: number[];
}

const noGroups = (): PairGroups => ({ a: [], b: [], layer: [], rows: [], w: [], wLow: [], q: [], qLow: [] });

/**
 * Counts every pair of the ordered columns in the engine, in batches of
 * `pairsPerQuery` grouping sets, and returns the function that gives one
 * pair's counted table (from the groups, by the scan's own countPair).
 */
async function countPairsInEngine(
  engine: Engine,
  input: EngineInput,
  scanKeys: readonly ScanKey[],
  entries: readonly (Entries | null)[],
  columns: OrderedColumn[],
  layer: OrderedColumn | null,
  weight: ColumnsRequest['weight'],
  pairsPerQuery: number,
): Promise<CountPair> {
  const slotOf = new Map(scanKeys.map((key, k) => [key.name, k]));
  const keyOf = columns.map((c) => scanKeys[slotOf.get(c.name)!].sql);
  const entriesOf = columns.map((c) => entries[slotOf.get(c.name)!]);
  const layerKey = layer ? 'vl' : null;
  const layerEntries = layer ? entries[scanKeys.length - 1] : null;
  const buckets = weight ? ['b', 'bq'] : [];
  const codeAt = (column: OrderedColumn, e: Entries | null, raw: string | null) => {
    const position = e?.position.get(raw);
    return position === undefined ? 0 : column.codes[position];
  };
  const pairs: [number, number][] = [];
  for (let a = 0; a < columns.length; a++) for (let b = a + 1; b < columns.length; b++) pairs.push([a, b]);
  const grouped = new Map<string, PairGroups>();
  for (let start = 0; start < pairs.length; start += pairsPerQuery) {
    const batch = pairs.slice(start, start + pairsPerQuery);
    const used = [...new Set(batch.flat())];
    const sets = batch.map(([a, b]) => `(${[keyOf[a], keyOf[b], ...(layerKey ? [layerKey] : []), ...buckets].join(', ')})`);
    const flags = used.map((c) => `GROUPING(${keyOf[c]})`);
    const sums = weight ? ', SUM(m), SUM(mq)' : '';
    const sql = `SELECT ${used.map((c) => keyOf[c]).join(', ')}${layerKey ? `, ${layerKey}` : ''}${weight ? ', b, bq' : ''}, ${flags.join(', ')}, COUNT(*)${sums} FROM ${TABLE} WHERE ${KEPT} GROUP BY GROUPING SETS (${sets.join(', ')})`;
    const u = used.length;
    const base = u + (layerKey ? 1 : 0) + buckets.length;
    for (const row of await queryInput(engine, input, sql)) {
      // The pair of this line: the two columns grouped on, smaller index first
      // (`used` lists columns in the order the batch first names them).
      const [a, b] = used.filter((_c, i) => Number(row[base + i]) === 0).sort((x, y) => x - y);
      const key = `${a},${b}`;
      let g = grouped.get(key);
      if (g === undefined) grouped.set(key, (g = noGroups()));
      g.a.push(codeAt(columns[a], entriesOf[a], row[used.indexOf(a)] as string | null));
      g.b.push(codeAt(columns[b], entriesOf[b], row[used.indexOf(b)] as string | null));
      if (layer) g.layer.push(codeAt(layer, layerEntries, row[u] as string | null));
      const n = Number(row[base + u]);
      g.rows.push(n);
      if (weight) {
        const bw = row[u + (layerKey ? 1 : 0)];
        const bq = row[u + (layerKey ? 1 : 0) + 1];
        const [w, wLow] = pairFromBuckets(bw === null ? [] : [[Number(bw), BigInt(row[base + u + 1] as bigint)]]);
        const [q, qLow] = pairFromBuckets(bq === null ? [] : [[Number(bq), BigInt(row[base + u + 2] as bigint)]]);
        g.w.push(w);
        g.wLow.push(wLow);
        g.q.push(q);
        g.qLow.push(qLow);
      } else g.w.push(n);
    }
  }
  return (columnA, columnB, layerColumn): CountedTable => {
    const g = grouped.get(`${columns.indexOf(columnA)},${columns.indexOf(columnB)}`) ?? noGroups();
    const entryCodes = (column: OrderedColumn, codes: number[]): OrderedColumn => ({ name: column.name, labels: column.labels, codes: Uint32Array.from(codes) });
    return countPair(entryCodes(columnA, g.a), entryCodes(columnB, g.b), {
      rowsPerEntry: Float64Array.from(g.rows),
      weights: weight ? { values: Float64Array.from(g.w), kind: weight.kind, grouped: { low: Float64Array.from(g.wLow), squares: Float64Array.from(g.q), squaresLow: Float64Array.from(g.qLow) } } : undefined,
      strata: layerColumn ? entryCodes(layerColumn, g.layer) : undefined,
    });
  };
}

/** The scan's columns from the engine: the same EncodedInput as the built-in reader's, with pair counts done in the engine. */
export async function encodeWithEngine(engine: Engine, input: EngineInput, reader: ReaderOptions, request: ColumnsRequest): Promise<EncodedInput> {
  const rel = await relation(input, reader, engine);
  const selection = scanSelection(rel.header, request, input.label);
  const missingTokens = new Set(reader.missing.map((m) => m.trim()));
  const text = (index: number) => `CAST(${rel.names[index]} AS VARCHAR)`;
  const capOf = (name: string) => (request.recodes?.has(name) ? Math.max(RECODED_READING_CAP, request.maxLevels) : request.maxLevels);
  const scanKeys: ScanKey[] = selection.candidates.map((index, k) => ({ name: rel.header[index], sql: `v${k}`, cap: capOf(rel.header[index]) }));
  if (selection.layer !== null) scanKeys.push({ name: rel.header[selection.layer], sql: 'vl', cap: RECODED_READING_CAP });
  const columnsSql = scanKeys.map((key, k) => `${text(k < selection.candidates.length ? selection.candidates[k] : (selection.layer as number))} AS ${key.sql}`);

  const pass = await filterPredicate(engine, input, rel, request, selection.where, missingTokens);
  const weight = request.weight;
  const rowsSql =
    weight && selection.weight !== null
      ? weightedRowsSql(rel.sql, [...columnsSql, `${pass} AS pass`], { text: text(selection.weight), kind: weight.kind, decimalComma: weight.decimalComma })
      : `SELECT ${columnsSql.join(', ')}, ${pass} AS pass, true AS ok, NULL::VARCHAR AS bad FROM ${rel.sql}`;
  await queryInput(engine, input, `CREATE OR REPLACE TEMP TABLE ${TABLE} AS ${rowsSql}`);
  const blank = rel.blankLines();
  blank.catch(() => undefined); // awaited below; a failed query must not leave it unhandled
  const { records, filtered, badWeights } = await census(engine, input, reader, request);

  const { rows, profiles } = await profileColumns(engine, input, scanKeys, missingTokens);
  const isLayer = (k: number) => k >= selection.candidates.length;
  const readingCap = (k: number) => (!isLayer(k) && request.keepNumeric && profiles[k].numeric ? DISTINCT_TRACKING_LIMIT : scanKeys[k].cap);
  const entries = await fetchEntries(engine, input, scanKeys, scanKeys.map((_key, k) => profiles[k].distinct <= readingCap(k)));
  await settleQuotes(input, reader, entries.flatMap((e) => e?.raws ?? []));
  const encoded = scanKeys.map((key, k) => {
    const e = entries[k];
    return e === null ? profiledColumn(key.name, profiles[k]) : encodeEntries(key, e, rows, missingTokens, request.keepNumeric);
  });
  const layer = selection.layer !== null ? encoded.pop()! : null;
  if (layer && layer.codes === null) throw dataError(`--by "${layer.name}" has more than ${RECODED_READING_CAP.toLocaleString('en-US')} distinct values; a layer needs few levels`);
  return {
    columns: encoded,
    layer,
    rows,
    filtered,
    badWeights,
    summary: { header: rel.header, delimiter: rel.delimiter, records, blankLines: await blank, badRows: 0, engine: 'duckdb', format: input.format, files: input.files.length },
    countPairs: (columns, layerColumn) => countPairsInEngine(engine, input, scanKeys, entries, columns, layerColumn, weight, request.pairsPerQuery ?? PAIRS_PER_QUERY),
  };
}
