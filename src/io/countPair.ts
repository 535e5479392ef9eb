import { dataError, usageError } from '../errors.js';
import { TableCounter, TwoWayTable } from '../table/twoWayTable.js';
import { resolveColumn } from './columns.js';
import { readRecords, ReaderOptions, ReadSummary } from './readRecords.js';
import { InputSource } from './source.js';
import { MISSING_ID } from './fieldInterner.js';

export interface PairRequest {
  rows: string;
  cols: string;
  maxLevels: number;
  rowOrder?: string[];
  colOrder?: string[];
}

export interface CountedPair {
  table: TwoWayTable;
  /** Rows left out because a selected value was missing. */
  excluded: number;
  summary: ReadSummary;
  unknownRowLevels: string[];
  unknownColLevels: string[];
}

/**
 * Reads the source once, keeping only the two selected columns, and counts
 * their complete pairs. Memory holds the level dictionaries and the counts.
 */
export async function countPair(source: InputSource, reader: ReaderOptions, request: PairRequest): Promise<CountedPair> {
  if (request.rows === request.cols) {
    throw usageError(`--rows and --cols both name "${request.rows}"; choose two different columns`);
  }
  const counter = new TableCounter(request.rows, request.cols, request.maxLevels);
  let excluded = 0;
  const summary = await readRecords(
    source,
    reader,
    (header) => [resolveColumn(request.rows, header, '--rows', source.label), resolveColumn(request.cols, header, '--cols', source.label)],
    (ids) => {
      const rowId = ids[0];
      const colId = ids[1];
      if (rowId === MISSING_ID || colId === MISSING_ID) {
        excluded++;
        return;
      }
      counter.add(rowId, colId);
    },
  );
  if (summary.records === 0) throw dataError(`${source.label}: the header has no data rows under it`);
  const { table, unknownRowLevels, unknownColLevels } = counter.finish(summary.interners[0].labels, summary.interners[1].labels, request.rowOrder, request.colOrder);
  for (const [name, levels] of [
    [request.rows, table.rowLevels],
    [request.cols, table.colLevels],
  ] as const) {
    if (levels.length === 0) {
      throw dataError(`column "${name}" has no value in any row where the other column has one (${excluded.toLocaleString('en-US')} rows left out for missing values)`);
    }
    if (levels.length === 1) {
      throw dataError(`column "${name}" has a single level ("${levels[0]}") in the counted rows; an association needs at least two`);
    }
  }
  return { table, excluded, summary, unknownRowLevels, unknownColLevels };
}
