/**
 * The SQL the tool writes, built in one place: quoting of literals and
 * identifiers, the reading of CSV and Parquet files as text columns, the
 * weight block (each row's weight judged by the tool's rule and split into
 * exact integers, so that sums do not depend on the engine's order), and
 * the portable counting SQL that `tabsight sql` prints for any engine.
 */
import type { WeightKind } from '../rowRules.js';
import { RECORD_BYTE_LIMIT } from '../csvTokenizer.js';
import { TOOL_VERSION } from '../../version.js';

/** Quoting by the SQL standard, and comments that data cannot end: src/escape/sql.ts. */
export { sqlIdentifier, sqlLiteral } from '../../escape/sql.js';
import { sqlCommentText, sqlIdentifier, sqlLiteral } from '../../escape/sql.js';
import { shellWord } from '../../escape/shell.js';

/** The pattern of parseWeightValue in rowRules.ts, for the engine's regular expressions. */
export const NUMBER_PATTERN = '[+-]?([0-9]+[.]?[0-9]*|[.][0-9]+)([eE][+-]?[0-9]+)?';

/**
 * A file name as the engine's readers take it literally: they expand every
 * name as a pattern, so *, ? and [ are each written as a one-character
 * class ([*], [?], [[]), and week[1].csv is read, not week1.csv.
 */
export function literalFileName(file: string): string {
  return file.replace(/[*?[]/g, (c) => `[${c}]`);
}

/** A list of file names (each read as named, never as a pattern) as a SQL list literal. */
function fileList(files: readonly string[]): string {
  return `[${files.map((f) => sqlLiteral(literalFileName(f))).join(', ')}]`;
}

/** Parquet files, columns matched by name across files. */
export function readParquetSql(files: readonly string[], withFile = false): string {
  return `read_parquet(${fileList(files)}, union_by_name = true${withFile ? ', filename = true' : ''})`;
}

/** The CSV dialect of one group of files, as the built-in reader found it. */
export interface CsvDialect {
  /** Lines before the header (blank lines the reader skips). */
  skip: number;
  delimiter: string;
  gzip: boolean;
}

/**
 * CSV files read strictly (RFC 4180 quotes, no type guessing): every column
 * as text under the names c0, c1, … (and, `withFile`, the file each row
 * came from, as the engine names it, under `filename`).
 */
export function readCsvSql(files: readonly string[], dialect: CsvDialect, columnCount: number, hasHeader: boolean, withFile = false): string {
  const columns = `{${Array.from({ length: columnCount }, (_v, k) => `'c${k}': 'VARCHAR'`).join(', ')}}`;
  const options = [
    `header = ${hasHeader}`,
    `skip = ${dialect.skip}`,
    `delim = ${sqlLiteral(dialect.delimiter)}`,
    `quote = '"'`,
    `escape = '"'`,
    `auto_detect = false`,
    `columns = ${columns}`,
    `compression = ${dialect.gzip ? "'gzip'" : "'none'"}`,
    `strict_mode = true`,
    // The built-in reader's limit for one record, so that both read the same lines (the engine's default is 2 MB).
    `max_line_size = ${RECORD_BYTE_LIMIT}`,
    `null_padding = false`,
    ...(withFile ? ['filename = true'] : []),
  ];
  return `SELECT * FROM read_csv(${fileList(files)}, ${options.join(', ')})`;
}

/** x · 2^k in SQL, in two steps where 2^k alone would overflow. */
function scaled(x: string, k: string): string {
  return `CASE WHEN ${k} > 900 THEN (${x} * pow(2.0, 600)) * pow(2.0, ${k} - 600) ELSE ${x} * pow(2.0, ${k}) END`;
}

export interface WeightSql {
  /** SQL giving the weight's text of a row. */
  text: string;
  kind: WeightKind;
  decimalComma: boolean;
}

/**
 * The rows of `from` with `columns` and each row's weight judged by the
 * tool's rule (a number, finite, at least 0, whole for frequencies): `ok`,
 * `bad` (the trimmed text of an unusable weight, else NULL), and the weight
 * w and its square as exact integers m = w·2^(52−b), mq = w²·2^(52−bq) in
 * binary exponent buckets b, bq (NULL for 0), which sum exactly in HUGEINT
 * and are rounded once by the reader (numerics: pairFromBuckets); and wd,
 * the weight as a double (the scan fetches it per row).
 */
export function weightedRowsSql(from: string, columns: readonly string[], weight: WeightSql): string {
  const normalised = weight.decimalComma ? `regexp_replace(wt, ',', '.')` : 'wt';
  // A frequency is whole, and past 2^53 only when the double is exactly the text's value (the tool's rule, parseWeightValue).
  const exact = `TRY_CAST(${normalised} AS DECIMAL(38,0))`;
  const whole = weight.kind === 'freq' ? ` AND wd = floor(wd) AND (wd <= 9007199254740991 OR (${exact} IS NOT NULL AND ${exact} = TRY_CAST(wd AS DECIMAL(38,0))))` : '';
  return `
    WITH src AS (SELECT ${columns.join(', ')}, trim(${weight.text}) AS wt FROM ${from}),
    parsed AS (SELECT *, CASE WHEN regexp_full_match(${normalised}, '${NUMBER_PATTERN}') THEN TRY_CAST(${normalised} AS DOUBLE) END AS wd FROM src),
    judged AS (SELECT *, COALESCE(isfinite(wd) AND wd >= 0${whole}, false) AS ok FROM parsed),
    bucketed AS (SELECT *, CASE WHEN ok AND wd > 0 THEN CAST(floor(log2(wd)) AS INTEGER) - 3 END AS b,
      CASE WHEN ok AND wd * wd > 0 AND isfinite(wd * wd) THEN CAST(floor(log2(wd * wd)) AS INTEGER) - 3 END AS bq FROM judged)
    SELECT * EXCLUDE (wt), CASE WHEN ok THEN NULL ELSE COALESCE(wt, '') END AS bad,
      CASE WHEN b IS NULL THEN 0 ELSE CAST(${scaled('wd', '(52 - b)')} AS HUGEINT) END AS m,
      CASE WHEN bq IS NULL THEN 0 ELSE CAST(${scaled('(wd * wd)', '(52 - bq)')} AS HUGEINT) END AS mq
    FROM bucketed`;
}

/**
 * A level as the tool reads it, in standard SQL: trimmed, and NULL when
 * empty or a missing token, so that any engine groups exactly the values
 * the tool would count.
 */
function portableLevel(name: string, missing: readonly string[]): string {
  const trimmed = `TRIM(CAST(${sqlIdentifier(name)} AS VARCHAR(4000)))`;
  const tokens = ["''", ...missing.map(sqlLiteral)].join(', ');
  return `CASE WHEN ${trimmed} IN (${tokens}) THEN NULL ELSE ${trimmed} END`;
}

export interface CountingSqlRequest {
  rows: string;
  cols: string;
  by?: string;
  weight?: string;
  /** The table (or view) as the engine names it. */
  table: string;
  missing: readonly string[];
}

/**
 * Standard SQL (GROUP BY, COUNT(*), SUM) that counts a two-way table (and
 * its layers) in any SQL engine; its result, saved as CSV, is what
 * `--freq count` (and `--summed-weights` for sampling weights) reads.
 */
export function portableCountingSql(request: CountingSqlRequest): string {
  const keys = [...(request.by !== undefined ? [request.by] : []), request.rows, request.cols];
  const select = keys.map((k) => `  ${portableLevel(k, request.missing)} AS ${sqlIdentifier(k)}`);
  const measures = ['  COUNT(*) AS "count"'];
  const where: string[] = [];
  // Names as shell words, so that the read-back command can be pasted.
  let readBack = `tabsight pair cells.csv --rows ${shellWord(request.rows)} --cols ${shellWord(request.cols)}${request.by !== undefined ? ` --by ${shellWord(request.by)}` : ''} --freq count`;
  if (request.weight !== undefined) {
    const w = `CAST(${sqlIdentifier(request.weight)} AS DOUBLE PRECISION)`;
    measures.push(`  SUM(${w}) AS "weight_sum"`, `  SUM(${w} * ${w}) AS "weight_square_sum"`);
    where.push(`${sqlIdentifier(request.weight)} IS NOT NULL`);
    readBack += ' --summed-weights weight_sum,weight_square_sum';
  }
  const positions = keys.map((_k, i) => String(i + 1)).join(', ');
  // Comments echo column names and tokens: a line break in them must not end the comment (escape/sql.ts).
  const comment = (text: string) => `-- ${sqlCommentText(text)}`;
  return [
    comment(`tabsight ${TOOL_VERSION}: counts of ${request.rows} by ${request.cols}${request.by !== undefined ? ` in each ${request.by}` : ''}.`),
    comment(`Values are trimmed; empty values${request.missing.length > 0 ? ` and ${request.missing.join(', ')}` : ''} are NULL, which the tool reads as missing.`),
    ...(request.weight !== undefined ? [comment('Rows without a weight are left out here (the tool would refuse them); weights must be numbers, at least 0.')] : []),
    comment('Standard SQL: identifiers in double quotes, a quote inside written twice (an engine that reads "…" as a string or \\ as an escape needs its standard mode).'),
    comment(`Save the result as CSV with a header, then: ${readBack}`),
    'SELECT',
    [...select, ...measures].join(',\n'),
    `FROM ${request.table}`,
    ...(where.length > 0 ? [`WHERE ${where.join(' AND ')}`] : []),
    `GROUP BY ${positions}`,
    `ORDER BY ${positions};`,
    '',
  ].join('\n');
}
