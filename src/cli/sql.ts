/** `tabsight sql`: portable SQL that counts a table where the data lives, for the small result to be read back with --freq. */
import { Command } from 'commander';
import { usageError } from '../errors.js';
import { portableCountingSql } from '../io/engine/sql.js';
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
  await emit(io, portableCountingSql(plan), plan.output);
  return DONE;
}
