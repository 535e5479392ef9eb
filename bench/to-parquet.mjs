#!/usr/bin/env node
// Writes the rows of a benchmark CSV file as Parquet (text columns), with the
// embedded engine: node bench/to-parquet.mjs in.csv out.parquet
import { DuckDBInstance } from '@duckdb/node-api';

const [input, output] = process.argv.slice(2);
const quote = (s) => `'${s.replace(/'/g, "''")}'`;
const db = await DuckDBInstance.create(':memory:');
const connection = await db.connect();
await connection.run(`COPY (SELECT * FROM read_csv(${quote(input)}, all_varchar = true)) TO ${quote(output)} (FORMAT parquet)`);
