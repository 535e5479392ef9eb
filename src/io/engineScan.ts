import { dataError, TabsightError } from '../errors.js';
import type { PairCounter, PreparedColumns } from '../analysis/scan.js';
import { crossCount, CodedColumn } from '../table/crossCount.js';
import { isNumericLabel } from '../table/naturalOrder.js';
import { pairFromBuckets } from '../table/compensatedSum.js';
import type { EncodedColumn } from '../table/encodedColumn.js';
import { DISTINCT_TRACKING_LIMIT, EncodeRequest, RECODED_READING_CAP, scanSelection } from './encodeColumns.js';
import { EngineFallback, EngineInput, engineMessage, settleQuotes, NUMBER_PATTERN, relation, run, scaled, sqlString } from './engine.js';
import { FieldInterner } from './fieldInterner.js';
import type { ReaderOptions } from './readRecords.js';
import { parseWeightValue } from './rowRules.js';

/**
 * A scan counted by the embedded engine. The selected columns of the kept
 * rows are put in one temporary table; the engine then profiles each column
 * (its distinct values, or only how many there are when that is past every
 * cap) and counts every pair's table in one GROUPING SETS query. The
 * columns come back as the scan's EncodedColumn with one code per distinct
 * value (an "entry") instead of one per row, so that screening, recodes,
 * binning and the analysis are the scan's own.
 */

export interface EngineScanSummary {
  header: string[];
  delimiter: string | null;
  records: number;
  blankLines: number;
  badRows: number;
  engine: 'duckdb';
  format: 'csv' | 'parquet';
  files: number;
}

export interface EngineEncoded {
  columns: EncodedColumn[];
  layer: EncodedColumn | null;
  /** Rows kept (after filters and unusable weights). */
  rows: number;
  filtered: number;
  badWeights: number;
  summary: EngineScanSummary;
  /** Counts every pair of the prepared columns in the engine; returns the scan's counter. */
  countPairs(prepared: PreparedColumns): Promise<PairCounter>;
}

const TABLE = 'tabsight_scan_rows';
/** Grouping sets per query: beyond it, pairs are counted in batches. */
const SETS_PER_QUERY = 1000;

interface Entries {
  /** The engine's value (as read, untrimmed) of each entry; null for SQL NULL. */
  raws: (string | null)[];
  counts: number[];
  /** Where each entry's code sits in the coded column (its index, or its first row when binned). */
  position: Map<string | null, number>;
}

async function query(input: EngineInput, sql: string): Promise<unknown[][]> {
  try {
    return await run(sql);
  } catch (error) {
    if (error instanceof TabsightError) throw error;
    if (input.format === 'csv' && !input.glob) throw new EngineFallback(engineMessage(error));
    throw dataError(`${input.label}: the engine could not read the input (${engineMessage(error)}); --engine builtin reads one CSV file at a time and names the line`);
  }
}

export async function engineEncode(input: EngineInput, reader: ReaderOptions, request: EncodeRequest): Promise<EngineEncoded> {
  const rel = await relation(input, reader);
  const selection = scanSelection(rel.header, request, input.label);
  const missingTokens = new Set(reader.missing.map((m) => m.trim()));
  const text = (index: number) => `CAST(${rel.names[index]} AS VARCHAR)`;

  // Filters: the engine lists each filter column's values, the tool's rule decides which pass.
  const filters: string[] = [];
  for (const [k, index] of selection.where.entries()) {
    const clause = request.where![k];
    const mapping = request.recodes?.get(rel.header[index]);
    const values = await query(input, `SELECT DISTINCT ${text(index)} FROM ${rel.sql}`);
    const interner = new FieldInterner(missingTokens, Number.MAX_SAFE_INTEGER);
    const passing = values
      .map((r) => r[0] as string | null)
      .filter((raw) => {
        const id = interner.internString(raw ?? '');
        if (id <= 0) return false;
        const label = interner.labels[id - 1];
        return clause.values.has(mapping?.get(label) ?? label) !== clause.negate;
      });
    filters.push(passing.length === 0 ? 'false' : `(${text(index)} IN (${passing.map((p) => sqlString(p as string)).join(', ')}))`);
  }
  const pass = filters.length === 0 ? 'true' : filters.join(' AND ');
  const candidates = selection.candidates;
  const keys = candidates.map((index, k) => `${text(index)} AS v${k}`);
  if (selection.layer !== null) keys.push(`${text(selection.layer)} AS vl`);
  const weight = request.weight;
  if (weight && selection.weight !== null) {
    const normalised = weight.decimalComma ? `regexp_replace(wt, ',', '.')` : 'wt';
    const whole = weight.kind === 'freq' ? ' AND wd = floor(wd)' : '';
    await query(
      input,
      `CREATE OR REPLACE TEMP TABLE ${TABLE} AS
       WITH src AS (SELECT ${keys.join(', ')}, trim(${text(selection.weight)}) AS wt, ${pass} AS pass FROM ${rel.sql}),
       parsed AS (SELECT *, CASE WHEN regexp_full_match(${normalised}, '${NUMBER_PATTERN}') THEN TRY_CAST(${normalised} AS DOUBLE) END AS wd FROM src),
       judged AS (SELECT *, COALESCE(isfinite(wd) AND wd >= 0${whole}, false) AS ok FROM parsed),
       bucketed AS (SELECT *, CASE WHEN ok AND wd > 0 THEN CAST(floor(log2(wd)) AS INTEGER) - 3 END AS b,
         CASE WHEN ok AND wd * wd > 0 AND isfinite(wd * wd) THEN CAST(floor(log2(wd * wd)) AS INTEGER) - 3 END AS bq FROM judged)
       SELECT * EXCLUDE (wt, wd), CASE WHEN ok THEN NULL ELSE COALESCE(wt, '') END AS bad,
         CASE WHEN b IS NULL THEN 0 ELSE CAST(${scaled('wd', '(52 - b)')} AS HUGEINT) END AS m,
         CASE WHEN bq IS NULL THEN 0 ELSE CAST(${scaled('(wd * wd)', '(52 - bq)')} AS HUGEINT) END AS mq
       FROM bucketed`,
    );
  } else {
    await query(input, `CREATE OR REPLACE TEMP TABLE ${TABLE} AS SELECT ${keys.join(', ')}, ${pass} AS pass, true AS ok, NULL::VARCHAR AS bad FROM ${rel.sql}`);
  }
  const blank = rel.blankLines();

  // Census: rows read, filtered out, and unusable weights (judged by the tool's own rule).
  let records = 0;
  let filtered = 0;
  let badWeights = 0;
  for (const [passed, bad, n] of await query(input, `SELECT pass, CASE WHEN pass THEN bad END, COUNT(*) FROM ${TABLE} GROUP BY ALL`)) {
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
  const kept = `pass AND ok`;

  // Profile: how many distinct values each column holds, then the values of those within reach.
  const all = [...candidates.map((_c, k) => `v${k}`), ...(selection.layer !== null ? ['vl'] : [])];
  const missingList = [...missingTokens].map(sqlString);
  // Only for columns whose values are not fetched: the engine's count of distinct trimmed values.
  const trimmed = (v: string) => `trim(${v}, ' \t')`;
  const isMissing = (v: string) => `(${v} IS NULL OR ${trimmed(v)} = ''${missingList.length > 0 ? ` OR ${trimmed(v)} IN (${missingList.join(', ')})` : ''})`;
  const profile = (
    await query(
      input,
      `SELECT COUNT(*), ${all
        .map((v) => `COUNT(DISTINCT ${trimmed(v)}) FILTER (WHERE NOT ${isMissing(v)}), COUNT(*) FILTER (WHERE ${isMissing(v)}), bool_and(regexp_full_match(${trimmed(v)}, '${NUMBER_PATTERN}')) FILTER (WHERE NOT ${isMissing(v)}), bool_and(regexp_full_match(${trimmed(v)}, '[+-]?[0-9]+')) FILTER (WHERE NOT ${isMissing(v)})`)
        .join(', ')} FROM ${TABLE} WHERE ${kept}`,
    )
  )[0];
  const rows = Number(profile[0]);
  const stat = (k: number) => ({ distinct: Number(profile[1 + 4 * k]), missing: Number(profile[2 + 4 * k]), numeric: profile[3 + 4 * k] === true, integer: profile[4 + 4 * k] === true });
  const capOf = (k: number) => {
    if (k === candidates.length) return RECODED_READING_CAP; // the layer
    const name = rel.header[candidates[k]];
    const cap = request.recodes?.has(name) ? Math.max(RECODED_READING_CAP, request.maxLevels) : request.maxLevels;
    return request.keepNumeric && stat(k).numeric ? DISTINCT_TRACKING_LIMIT : cap;
  };
  const fetch = all.map((_v, k) => stat(k).distinct <= capOf(k));
  const entries: (Entries | null)[] = all.map(() => null);
  const wanted = all.map((v, k) => (fetch[k] ? `SELECT ${k} AS c, ${v} AS v, COUNT(*) AS n FROM ${TABLE} WHERE ${kept} GROUP BY ${v}` : null)).filter((q): q is string => q !== null);
  if (wanted.length > 0) {
    for (const [c, v, n] of await query(input, wanted.join(' UNION ALL '))) {
      const k = Number(c);
      const e = (entries[k] ??= { raws: [] as (string | null)[], counts: [] as number[], position: new Map<string | null, number>() });
      e.raws.push(v as string | null);
      e.counts.push(Number(n));
    }
  }
  await settleQuotes(input, reader, entries.flatMap((e) => e?.raws ?? []));
  const encoded = all.map<EncodedColumn>((_v, k) => {
    const name = k === candidates.length ? rel.header[selection.layer as number] : rel.header[candidates[k]];
    const e = entries[k];
    if (e === null) {
      const s = stat(k);
      const capped = s.distinct > DISTINCT_TRACKING_LIMIT;
      return { name, labels: [], codes: null, missing: s.missing, distinct: capped ? DISTINCT_TRACKING_LIMIT : s.distinct, distinctCapped: capped, numeric: s.numeric && s.distinct > 0, integer: s.integer && s.distinct > 0, values: null };
    }
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
    const cap = k === candidates.length ? RECODED_READING_CAP : request.recodes?.has(name) ? Math.max(RECODED_READING_CAP, request.maxLevels) : request.maxLevels;
    const withinCap = labels.length <= cap;
    let values: Float64Array | null = null;
    if (!withinCap && numeric && request.keepNumeric) {
      // Binned: one value per row, entries laid end to end; each entry's code is read at its first row.
      values = new Float64Array(rows);
      let at = 0;
      e.raws.forEach((raw, i) => {
        e.position.set(raw, at);
        values!.fill(codes[i] === 0 ? Number.NaN : Number(labels[codes[i] - 1]), at, at + e.counts[i]);
        at += e.counts[i];
      });
    } else e.raws.forEach((raw, i) => e.position.set(raw, i));
    return { name, labels: withinCap ? labels : [], codes: withinCap ? codes : null, missing, distinct: labels.length, distinctCapped: false, numeric, integer, values };
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
    countPairs: async (prepared) => {
      const slotOf = new Map(encoded.map((c, k) => [c.name, k]));
      const coded = prepared.coded;
      const keyOf = coded.map((c) => `v${slotOf.get(c.name)}`);
      const layerKey = prepared.layer ? 'vl' : null;
      const layerEntries = prepared.layer ? entries[candidates.length] : null;
      const buckets = weight ? ['b', 'bq'] : [];
      const pairs: [number, number][] = [];
      for (let a = 0; a < coded.length; a++) for (let b = a + 1; b < coded.length; b++) pairs.push([a, b]);
      interface Grouped {
        a: number[];
        b: number[];
        layer: number[];
        rows: number[];
        w: number[];
        wLow: number[];
        q: number[];
        qLow: number[];
      }
      const grouped = new Map<string, Grouped>();
      const codeAt = (column: CodedColumn, e: Entries | null, raw: string | null) => {
        const position = e?.position.get(raw);
        return position === undefined ? 0 : column.codes[position];
      };
      for (let start = 0; start < pairs.length; start += SETS_PER_QUERY) {
        const batch = pairs.slice(start, start + SETS_PER_QUERY);
        const used = [...new Set(batch.flat())];
        const sets = batch.map(([a, b]) => `(${[keyOf[a], keyOf[b], ...(layerKey ? [layerKey] : []), ...buckets].join(', ')})`);
        const flags = used.map((c) => `GROUPING(${keyOf[c]})`);
        const sums = weight ? ', SUM(m), SUM(mq)' : '';
        const sql = `SELECT ${used.map((c) => keyOf[c]).join(', ')}${layerKey ? `, ${layerKey}` : ''}${weight ? ', b, bq' : ''}, ${flags.join(', ')}, COUNT(*)${sums} FROM ${TABLE} WHERE ${kept} GROUP BY GROUPING SETS (${sets.join(', ')})`;
        const u = used.length;
        const base = u + (layerKey ? 1 : 0) + buckets.length;
        for (const row of await query(input, sql)) {
          const inSet = used.filter((_c, i) => Number(row[base + i]) === 0);
          const [a, b] = inSet;
          const key = `${a},${b}`;
          let g = grouped.get(key);
          if (g === undefined) {
            g = { a: [], b: [], layer: [], rows: [], w: [], wLow: [], q: [], qLow: [] };
            grouped.set(key, g);
          }
          const rawA = row[used.indexOf(a)] as string | null;
          const rawB = row[used.indexOf(b)] as string | null;
          g.a.push(codeAt(coded[a], entries[slotOf.get(coded[a].name)!], rawA));
          g.b.push(codeAt(coded[b], entries[slotOf.get(coded[b].name)!], rawB));
          if (layerKey) g.layer.push(codeAt(prepared.layer!, layerEntries, row[u] as string | null));
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
      return (columnA, columnB, layerColumn) => {
        const a = coded.indexOf(columnA);
        const b = coded.indexOf(columnB);
        const g = grouped.get(`${a},${b}`) ?? { a: [], b: [], layer: [], rows: [], w: [], wLow: [], q: [], qLow: [] };
        const synthetic = (column: CodedColumn, codes: number[]): CodedColumn => ({ name: column.name, labels: column.labels, codes: Uint32Array.from(codes) });
        return crossCount(synthetic(columnA, g.a), synthetic(columnB, g.b), {
          rowsPerEntry: Float64Array.from(g.rows),
          weights: weight ? { values: Float64Array.from(g.w), kind: weight.kind, grouped: { low: Float64Array.from(g.wLow), squares: Float64Array.from(g.q), squaresLow: Float64Array.from(g.qLow) } } : undefined,
          strata: layerColumn ? synthetic(layerColumn, g.layer) : undefined,
        });
      };
    },
  };
}
