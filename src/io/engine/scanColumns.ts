/**
 * A scan read and encoded by the embedded engine. The selected columns of
 * the rows are put in one temporary table; the engine profiles each column
 * (its distinct values, or only how many there are when that is past every
 * cap), numbers each column's distinct values ("entries"), and hands back
 * every kept row as the entry numbers of its values (and its weight), chunk
 * by chunk as typed arrays. The tool turns entries into codes by its own
 * rules (trim, missing values), so the columns come back as the scan's
 * EncodedColumn with one code per row, and every pair is counted from them
 * in memory as the built-in reader's are (table/countPair.ts). (Counting the
 * pairs in the engine, in GROUPING SETS queries, took 7-16 times the
 * built-in reader's time and gigabytes of memory on 200,000 x 30.)
 */
import { dataError } from '../../errors.js';
import { countPair } from '../../table/countPair.js';
import { codesFor, EncodedColumn } from '../../table/encodedColumn.js';
import { isMissingLooking, MISSING_LOOKING_TOKENS, numericIgnoringTokens } from '../../table/missingLooking.js';
import { ColumnsRequest, DISTINCT_TRACKING_LIMIT, RECODED_READING_CAP, scanSelection } from '../columns.js';
import type { EncodedInput } from '../counting.js';
import { FieldInterner } from '../fieldInterner.js';
import type { ReaderOptions } from '../readRecords.js';
import { parseWeightValue } from '../rowRules.js';
import type { EngineInput } from './files.js';
import type { Engine } from './module.js';
import { chunksOfInput, EngineFallback, queryInput } from './query.js';
import { settleQuotes } from './quotes.js';
import { EngineRelation, relation } from './relation.js';
import { NUMBER_PATTERN, sqlLiteral, weightedRowsSql } from './sql.js';

const TABLE = 'tabsight_scan_rows';
/** The temporary table of a column's entries: its distinct values among the kept rows, numbered 0, 1, … (i). */
const entryTable = (k: number) => `tabsight_scan_entries_${k}`;
/** The rows that count: past the filters, with a usable weight. */
const KEPT = 'pass AND ok';

/** The distinct values of one column among the kept rows, in the order of their entry numbers. */
interface Entries {
  /** The engine's value (as read, untrimmed) of each entry; null for SQL NULL. */
  raws: (string | null)[];
  counts: number[];
}

/** What one column of the temporary table is: a candidate (v0, v1, …) or the layer (vl), and its level cap while reading. */
interface ScanKey {
  name: string;
  sql: string;
  cap: number;
}

/** Filters: the engine lists each filter column's values, the tool's rule decides which pass; the SQL of the rows that pass, and each filter column's values (as the built-in reader reads them). */
async function filterPredicate(engine: Engine, input: EngineInput, rel: EngineRelation, request: ColumnsRequest, where: number[], missing: ReadonlySet<string>): Promise<{ sql: string; values: string[][] }> {
  const text = (index: number) => `CAST(${rel.names[index]} AS VARCHAR)`;
  const filters: string[] = [];
  const read: string[][] = [];
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
    read.push(interner.labels);
  }
  return { sql: filters.length === 0 ? 'true' : filters.join(' AND '), values: read };
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
  /** The missing-looking values the column holds. */
  missingLooking: string[];
}

/**
 * How many distinct trimmed values each column holds among the kept rows,
 * how many are missing, and whether all are numbers apart from
 * missing-looking tokens (table/missingLooking.ts), at least one being a number.
 */
async function profileColumns(engine: Engine, input: EngineInput, keys: readonly ScanKey[], missing: ReadonlySet<string>): Promise<{ rows: number; profiles: ColumnProfile[] }> {
  const missingList = [...missing].map(sqlLiteral);
  const tokenList = MISSING_LOOKING_TOKENS.filter((t) => !missing.has(t)).map(sqlLiteral);
  const trimmed = (v: string) => `trim(${v}, ' \t')`;
  const isMissing = (v: string) => `(${v} IS NULL OR ${trimmed(v)} = ''${missingList.length > 0 ? ` OR ${trimmed(v)} IN (${missingList.join(', ')})` : ''})`;
  const isNumber = (v: string) => `NOT ${isMissing(v)} AND ${trimmed(v)} NOT IN (${tokenList.join(', ')})`;
  const measures = keys.map(({ sql: v }) =>
    [
      `COUNT(DISTINCT ${trimmed(v)}) FILTER (WHERE NOT ${isMissing(v)})`,
      `COUNT(*) FILTER (WHERE ${isMissing(v)})`,
      `bool_and(regexp_full_match(${trimmed(v)}, '${NUMBER_PATTERN}')) FILTER (WHERE ${isNumber(v)})`,
      `bool_and(regexp_full_match(${trimmed(v)}, '[+-]?[0-9]+')) FILTER (WHERE ${isNumber(v)})`,
      // The tokens hold no line break (table/missingLooking.ts), so one joins them.
      `string_agg(DISTINCT ${trimmed(v)}, chr(10)) FILTER (WHERE NOT ${isMissing(v)} AND ${trimmed(v)} IN (${tokenList.join(', ')}))`,
    ].join(', '),
  );
  const [row] = await queryInput(engine, input, `SELECT COUNT(*), ${measures.join(', ')} FROM ${TABLE} WHERE ${KEPT}`);
  const profiles = keys.map((_key, k) => ({ distinct: Number(row[1 + 5 * k]), missing: Number(row[2 + 5 * k]), numeric: row[3 + 5 * k] === true, integer: row[4 + 5 * k] === true, missingLooking: row[5 + 5 * k] === null ? [] : String(row[5 + 5 * k]).split('\n') }));
  return { rows: Number(row[0]), profiles };
}

/** The distinct values (with their row counts) of the columns whose values are wanted, numbered in the engine (entryTable). */
async function fetchEntries(engine: Engine, input: EngineInput, keys: readonly ScanKey[], wanted: readonly boolean[]): Promise<(Entries | null)[]> {
  const entries: (Entries | null)[] = keys.map(() => null);
  const queries: string[] = [];
  for (const [k, key] of keys.entries()) {
    if (!wanted[k]) continue;
    await queryInput(
      engine,
      input,
      `CREATE OR REPLACE TEMP TABLE ${entryTable(k)} AS SELECT v, CAST(row_number() OVER () - 1 AS UINTEGER) AS i, n FROM (SELECT ${key.sql} AS v, COUNT(*) AS n FROM ${TABLE} WHERE ${KEPT} GROUP BY ${key.sql})`,
    );
    queries.push(`SELECT ${k} AS c, i, v, n FROM ${entryTable(k)}`);
  }
  if (queries.length === 0) return entries;
  for (const [c, _i, v, n] of await queryInput(engine, input, `${queries.join(' UNION ALL ')} ORDER BY c, i`)) {
    const e = (entries[Number(c)] ??= { raws: [] as (string | null)[], counts: [] as number[] });
    e.raws.push(v as string | null);
    e.counts.push(Number(n));
  }
  return entries;
}

/** A column's entries turned into the tool's codes: what each entry number stands for. */
interface EntryMeaning {
  column: EncodedColumn;
  /** The code of each entry (when the column is within its cap, or numeric and to be binned). */
  codes: Uint32Array | null;
}

/**
 * A column from its entries: one code per entry, the reader's trim and
 * missing rule applied; past the cap, only a numeric column to be binned
 * keeps its codes (as the built-in reader's does). The per-row codes are
 * filled in from the rows' entry numbers (encodeRows).
 */
function encodeEntries(key: ScanKey, e: Entries, missingTokens: ReadonlySet<string>, keepNumeric: boolean): EntryMeaning {
  const interner = new FieldInterner(missingTokens, Number.MAX_SAFE_INTEGER);
  const codes = new Uint32Array(e.raws.length);
  let missing = 0;
  e.raws.forEach((raw, i) => {
    codes[i] = interner.internString(raw ?? '');
    if (codes[i] === 0) missing += e.counts[i];
  });
  const labels = interner.labels;
  const { numeric, integer } = numericIgnoringTokens(labels);
  const kept = labels.length <= key.cap || (numeric && keepNumeric);
  const column: EncodedColumn = { name: key.name, labels: kept ? labels : [], codes: null, missing, distinct: labels.length, distinctCapped: false, numeric, integer, missingLooking: labels.filter(isMissingLooking) };
  return { column, codes: kept ? codes : null };
}

/**
 * Every kept row as its columns' entry numbers (and its weight), streamed
 * from the engine chunk by chunk, turned into per-row codes (one byte a
 * cell while a column has at most 255 levels).
 */
async function encodeRows(engine: Engine, input: EngineInput, keys: readonly ScanKey[], meanings: readonly (EntryMeaning | null)[], rows: number, weighted: boolean): Promise<Float64Array | null> {
  const fetched = meanings.map((m, k) => (m !== null && m.codes !== null ? k : -1)).filter((k) => k >= 0);
  const weights = weighted ? new Float64Array(rows) : null;
  const outputs = fetched.map((k) => {
    const m = meanings[k] as EntryMeaning;
    return (m.column.codes = codesFor(m.column.labels.length, rows));
  });
  if (fetched.length === 0 && !weighted) return weights;
  const select = [...fetched.map((k) => `e${k}.i`), ...(weighted ? ['r.wd'] : [])];
  const joins = fetched.map((k) => `JOIN ${entryTable(k)} e${k} ON r.${keys[k].sql} IS NOT DISTINCT FROM e${k}.v`);
  let at = 0;
  await chunksOfInput(engine, input, `SELECT ${select.join(', ')} FROM ${TABLE} r ${joins.join(' ')} WHERE r.pass AND r.ok`, (columns, count) => {
    if (at + count > rows) throw new Error(`the engine returned more rows than it counted (${at + count} > ${rows})`);
    fetched.forEach((k, f) => {
      const entryNumbers = columns[f];
      const m = meanings[k] as EntryMeaning;
      const out = outputs[f];
      const map = m.codes as Uint32Array;
      for (let i = 0; i < count; i++) out[at + i] = map[entryNumbers[i]];
    });
    if (weights) weights.set(columns[fetched.length].length === count ? columns[fetched.length] : Array.prototype.slice.call(columns[fetched.length], 0, count), at);
    at += count;
  });
  if (at !== rows) throw new Error(`the engine returned ${at} rows where it counted ${rows}`);
  return weights;
}

/** A column whose values were not fetched (past every cap): only its profile. */
function profiledColumn(name: string, p: ColumnProfile): EncodedColumn {
  const capped = p.distinct > DISTINCT_TRACKING_LIMIT;
  return { name, labels: [], codes: null, missing: p.missing, distinct: capped ? DISTINCT_TRACKING_LIMIT : p.distinct, distinctCapped: capped, numeric: p.numeric && p.distinct > 0, integer: p.integer && p.distinct > 0, missingLooking: p.missingLooking };
}

/** The scan's columns from the engine: the same EncodedInput as the built-in reader's, with pair counts done in the engine. */
export async function encodeWithEngine(engine: Engine, input: EngineInput, reader: ReaderOptions, request: ColumnsRequest): Promise<EncodedInput> {
  const rel = await relation(input, reader, engine);
  const selection = scanSelection(rel.header, request, input.label);
  const missingTokens = new Set(reader.missing.map((m) => m.trim()));
  const text = (index: number) => `CAST(${rel.names[index]} AS VARCHAR)`;
  const capOf = (name: string) => (request.recodes?.has(name) ? Math.max(RECODED_READING_CAP, request.maxLevels) : (request.readingCap ?? request.maxLevels));
  const scanKeys: ScanKey[] = selection.candidates.map((index, k) => ({ name: rel.header[index], sql: `v${k}`, cap: capOf(rel.header[index]) }));
  if (selection.layer !== null) scanKeys.push({ name: rel.header[selection.layer], sql: 'vl', cap: RECODED_READING_CAP });
  const columnsSql = scanKeys.map((key, k) => `${text(k < selection.candidates.length ? selection.candidates[k] : (selection.layer as number))} AS ${key.sql}`);

  const { sql: pass, values: whereValues } = await filterPredicate(engine, input, rel, request, selection.where, missingTokens);
  const weight = request.weight;
  const rowsSql =
    weight && selection.weight !== null
      ? weightedRowsSql(rel.sql, [...columnsSql, `${pass} AS pass`], { text: text(selection.weight), kind: weight.kind, decimalComma: weight.decimalComma })
      : `SELECT ${columnsSql.join(', ')}, ${pass} AS pass, true AS ok, NULL::VARCHAR AS bad FROM ${rel.sql}`;
  await queryInput(engine, input, `CREATE OR REPLACE TEMP TABLE ${TABLE} AS ${rowsSql}`);
  const blank = rel.blankLines();
  blank.catch(() => undefined); // awaited below; a failed query must not leave it unhandled
  await rel.settle();
  const { records, filtered, badWeights } = await census(engine, input, reader, request);

  const { rows, profiles } = await profileColumns(engine, input, scanKeys, missingTokens);
  const isLayer = (k: number) => k >= selection.candidates.length;
  const readingCap = (k: number) => (!isLayer(k) && request.keepNumeric && profiles[k].numeric ? DISTINCT_TRACKING_LIMIT : scanKeys[k].cap);
  const entries = await fetchEntries(engine, input, scanKeys, scanKeys.map((_key, k) => profiles[k].distinct <= readingCap(k)));
  await settleQuotes(input, reader, entries.flatMap((e) => e?.raws ?? []));
  const meanings = scanKeys.map((key, k) => {
    const e = entries[k];
    return e === null ? null : encodeEntries(key, e, missingTokens, request.keepNumeric);
  });
  const rowWeights = await encodeRows(engine, input, scanKeys, meanings, rows, weight !== undefined && selection.weight !== null);
  const encoded = scanKeys.map((key, k) => meanings[k]?.column ?? profiledColumn(key.name, profiles[k]));
  const layer = selection.layer !== null ? encoded.pop()! : null;
  if (layer && layer.codes === null) throw dataError(`--by "${layer.name}" has more than ${RECODED_READING_CAP.toLocaleString('en-US')} distinct values; a layer needs few levels`);
  const weights = rowWeights && weight ? { values: rowWeights, kind: weight.kind } : undefined;
  return {
    columns: encoded,
    layer,
    rows,
    filtered,
    badWeights,
    badDesign: 0,
    design: null,
    summary: { header: rel.header, delimiter: rel.delimiter, records, blankLines: await blank, badRows: 0, engine: 'duckdb', format: input.format, files: input.files.length },
    whereValues,
    weights,
    countPairs: async () => (a, b, layerColumn) => countPair(a, b, { weights, strata: layerColumn ?? undefined }),
  };
}
