/**
 * The input as one relation of text columns: each CSV file's layout is
 * sniffed (layout.ts), the files of a pattern must share their header,
 * and files of one layout are read together (read_csv; read_parquet for
 * Parquet, columns matched by name).
 */
import { dataError } from '../../errors.js';
import type { ReaderOptions } from '../readRecords.js';
import type { EngineInput } from './files.js';
import { byteFacts, ByteFacts, CsvFileLayout, csvLayouts } from './layout.js';
import { readRecords } from '../readRecords.js';
import { EngineFallback } from './query.js';
import type { Engine } from './module.js';
import { querySql } from './query.js';
import { readCsvSql, readParquetSql, sqlIdentifier } from './sql.js';

export interface EngineRelation {
  /** SQL of all rows, to be used after FROM. */
  sql: string;
  header: string[];
  /** The SQL name of each header column. */
  names: string[];
  /** The field separator; null for Parquet. */
  delimiter: string | null;
  /** Empty lines the built-in reader would have counted (0 for Parquet). */
  blankLines(): Promise<number>;
  /**
   * Settles, before the engine's counts are used, whether the built-in
   * reader would read every file as the engine did: where a file holds a
   * NUL byte or a character after a closing quote, one file goes back to
   * the built-in reader (EngineFallback), and a file of a pattern is read
   * by it, whose one-line error (if any) is the answer.
   */
  settle(): Promise<void>;
  /** Empty lines (as blankLines) of one file of the input. */
  blankLinesOf(file: string): Promise<number>;
  /** With `withFile`: the SQL of the column naming the file each row came from (as the engine names it), else null. */
  fileColumn: string | null;
}

async function parquetRelation(input: EngineInput, engine: Engine, withFile: boolean): Promise<EngineRelation> {
  const from = readParquetSql(input.files, withFile);
  const described = await querySql(engine, `DESCRIBE SELECT * FROM ${from}`, (message) => dataError(`${input.label}: not a readable Parquet input (${message})`));
  const all = described.map((r) => String(r[0]));
  // The engine appends the file column last.
  const header = withFile ? all.slice(0, -1) : all;
  return {
    sql: from,
    header,
    names: header.map(sqlIdentifier),
    delimiter: null,
    blankLines: async () => 0,
    settle: async () => undefined,
    blankLinesOf: async () => 0,
    fileColumn: withFile ? sqlIdentifier(all[all.length - 1]) : null,
  };
}

async function csvRelation(input: EngineInput, reader: ReaderOptions, withFile: boolean): Promise<EngineRelation> {
  const layouts = await csvLayouts(input.files, reader);
  const first = layouts[0];
  // One pass over each file's bytes, shared by blankLines and settle.
  const facts = new Map<string, Promise<ByteFacts>>();
  const factsOf = (l: CsvFileLayout) => {
    let known = facts.get(l.file);
    if (known === undefined) facts.set(l.file, (known = byteFacts(l.file, l.gzip, l.delimiter)));
    return known;
  };
  for (const layout of layouts.slice(1)) {
    if (layout.header.length !== first.header.length || layout.header.some((h, k) => h !== first.header[k])) {
      // Files named one by one (the waves of a series) can still be read one at a time by the built-in reader.
      if (!input.glob) throw new EngineFallback(`${layout.file} has another header than ${first.file}`);
      throw dataError(`${layout.file}: its header differs from that of ${first.file}; the files of one pattern must have the same columns`);
    }
  }
  // One read_csv per layout (skip, delimiter, compression), joined.
  const byLayout = new Map<string, CsvFileLayout[]>();
  for (const layout of layouts) {
    const key = `${layout.skip}\u0000${layout.delimiter}\u0000${layout.gzip}`;
    byLayout.set(key, [...(byLayout.get(key) ?? []), layout]);
  }
  const parts = [...byLayout.values()].map((group) => readCsvSql(group.map((g) => g.file), group[0], first.header.length, reader.header, withFile));
  return {
    sql: parts.length === 1 ? `(${parts[0]})` : `(${parts.join(' UNION ALL ')})`,
    header: first.header,
    names: first.header.map((_h, k) => `c${k}`),
    delimiter: first.delimiter,
    blankLines: async () => {
      let total = 0;
      for (const l of layouts) total += (await factsOf(l)).emptyLines + l.whitespaceLinesBeforeHeader;
      return total;
    },
    blankLinesOf: async (file) => {
      const l = layouts.find((x) => x.file === file);
      return l === undefined ? 0 : (await factsOf(l)).emptyLines + l.whitespaceLinesBeforeHeader;
    },
    fileColumn: withFile ? 'filename' : null,
    settle: async () => {
      for (const l of layouts) {
        const { suspect } = await factsOf(l);
        if (suspect === null) continue;
        if (!input.glob) throw new EngineFallback(`${suspect}, which the built-in reader judges`);
        await readRecords({ path: l.file, label: l.file }, reader, () => [], () => undefined);
      }
    },
  };
}

/** The relation of all rows of the input, every column as text, and the SQL names of its columns (with `withFile`, also the file of each row). */
export function relation(input: EngineInput, reader: ReaderOptions, engine: Engine, withFile = false): Promise<EngineRelation> {
  return input.format === 'parquet' ? parquetRelation(input, engine, withFile) : csvRelation(input, reader, withFile);
}
