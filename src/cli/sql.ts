/** `tabsight sql`: portable SQL that counts a table where the data lives, for the small result to be read back with --freq. */
import { Command } from 'commander';
import { usageError } from '../errors.js';
import { TOOL_VERSION } from '../version.js';
import { splitList } from './options.js';
import { CliIo, emit } from './output.js';
import { DONE, Outcome } from './outcome.js';

interface RawSqlOptions {
  rows: string;
  cols: string;
  by?: string;
  weight?: string;
  table: string;
  missing?: string;
  output?: string;
}

/** A column name as a standard SQL delimited identifier. */
function identifier(name: string): string {
  return `"${name.replace(/"/g, '""')}"`;
}

function literal(text: string): string {
  return `'${text.replace(/'/g, "''")}'`;
}

/**
 * A level as the tool reads it: trimmed, and NULL when empty or a missing
 * token, so that the engine groups exactly the values the tool would count.
 */
function level(name: string, missing: readonly string[]): string {
  const trimmed = `TRIM(CAST(${identifier(name)} AS VARCHAR(4000)))`;
  const tokens = ["''", ...missing.map(literal)].join(', ');
  return `CASE WHEN ${trimmed} IN (${tokens}) THEN NULL ELSE ${trimmed} END`;
}

/**
 * Standard SQL (GROUP BY, COUNT(*), SUM) that counts a two-way table (and
 * its layers) in any SQL engine; its result, saved as CSV, is what
 * `--freq count` (and `--summed-weights` for sampling weights) reads.
 */
export function countingSql(options: { rows: string; cols: string; by?: string; weight?: string; table: string; missing: readonly string[] }): string {
  const keys = [...(options.by !== undefined ? [options.by] : []), options.rows, options.cols];
  const select = keys.map((k) => `  ${level(k, options.missing)} AS ${identifier(k)}`);
  const measures = ['  COUNT(*) AS "count"'];
  const where: string[] = [];
  let readBack = `tabsight pair cells.csv --rows ${options.rows} --cols ${options.cols}${options.by !== undefined ? ` --by ${options.by}` : ''} --freq count`;
  if (options.weight !== undefined) {
    const w = `CAST(${identifier(options.weight)} AS DOUBLE PRECISION)`;
    measures.push(`  SUM(${w}) AS "weight_sum"`, `  SUM(${w} * ${w}) AS "weight_square_sum"`);
    where.push(`${identifier(options.weight)} IS NOT NULL`);
    readBack += ' --summed-weights weight_sum,weight_square_sum';
  }
  const positions = keys.map((_k, i) => String(i + 1)).join(', ');
  return [
    `-- tabsight ${TOOL_VERSION}: counts of ${options.rows} by ${options.cols}${options.by !== undefined ? ` in each ${options.by}` : ''}.`,
    `-- Values are trimmed; empty values${options.missing.length > 0 ? ` and ${options.missing.join(', ')}` : ''} are NULL, which the tool reads as missing.`,
    ...(options.weight !== undefined ? [`-- Rows without a weight are left out here (the tool would refuse them); weights must be numbers, at least 0.`] : []),
    `-- Save the result as CSV with a header, then: ${readBack}`,
    'SELECT',
    [...select, ...measures].join(',\n'),
    `FROM ${options.table}`,
    ...(where.length > 0 ? [`WHERE ${where.join(' AND ')}`] : []),
    `GROUP BY ${positions}`,
    `ORDER BY ${positions};`,
    '',
  ].join('\n');
}

export interface SqlPlan {
  rows: string;
  cols: string;
  by?: string;
  weight?: string;
  /** The table (or view) as the engine names it. */
  table: string;
  missing: string[];
  output?: string;
}

export function sqlPlan(raw: RawSqlOptions): SqlPlan {
  if (!/^[A-Za-z_][A-Za-z0-9_$]*(\.[A-Za-z_][A-Za-z0-9_$]*)*$|^("[^"]+"\.)*"[^"]+"$/.test(raw.table)) {
    throw usageError(`--table "${raw.table}": give a table name (letters, digits, _; schema.table; or "quoted")`);
  }
  const names = [raw.rows, raw.cols, raw.by, raw.weight].filter((n): n is string => n !== undefined);
  if (new Set(names).size !== names.length) throw usageError('--rows, --cols, --by and --weight must name different columns');
  if (names.some((n) => ['count', 'weight_sum', 'weight_square_sum'].includes(n))) throw usageError('a column named count, weight_sum or weight_square_sum would clash with the result columns; rename it in a view');
  return { rows: raw.rows, cols: raw.cols, by: raw.by, weight: raw.weight, table: raw.table, missing: splitList(raw.missing) ?? [], output: raw.output };
}

export function sqlCommand(accept: (plan: SqlPlan) => void): Command {
  const command = new Command('sql')
    .description('print portable SQL that counts a table in any SQL engine, for the small result to be analysed here with --freq')
    .requiredOption('--rows <column>', 'first column of the table')
    .requiredOption('--cols <column>', 'second column of the table')
    .option('--by <column>', 'a layer: count one table per level')
    .option('--weight <column>', 'sampling weights: also sum the weights and their squares (read back with --summed-weights)')
    .requiredOption('--table <name>', 'the table (or view) in the engine, as the engine names it (schema.table)')
    .option('--missing <tokens>', 'comma-separated values that count as missing, besides empty ones')
    .option('--output <file>', 'write the SQL to this file (atomically)');
  command.addHelpText(
    'after',
    `
Examples:
  tabsight sql --rows branch --cols membership --table survey.patrons > count.sql
  tabsight sql --rows branch --cols membership --weight survey_weight --table patrons

Run the SQL where the data lives, save its result as CSV, and analyse it:
  tabsight pair cells.csv --rows branch --cols membership --freq count`,
  );
  command.action((raw: RawSqlOptions) => accept(sqlPlan(raw)));
  return command;
}

export async function runSql(plan: SqlPlan, io: CliIo): Promise<Outcome> {
  await emit(io, countingSql(plan), plan.output);
  return DONE;
}
