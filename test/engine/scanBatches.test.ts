// The engine's scan reads and encodes the rows (each row as its columns'
// entry numbers, streamed in chunks) and the pairs are counted from those
// codes: each pair's table must equal the built-in reader's, pair for pair
// (the engine once counted pairs in batches of GROUPING SETS, and lost the
// pairs whose columns came in reverse order after the first batch).
import { describe, expect, it } from 'vitest';
import { prepareColumns, ScanOptions } from '../../src/analysis/scan.js';
import { DEFAULT_ANALYSIS_OPTIONS } from '../../src/analysis/analyzeTable.js';
import type { ColumnsRequest } from '../../src/io/columns.js';
import { encodeColumns } from '../../src/io/counting.js';
import type { ReaderOptions } from '../../src/io/readRecords.js';
import { recodesByColumn } from '../../src/io/rowRules.js';
import { inputSource } from '../../src/io/source.js';
import type { CountedTable } from '../../src/table/countedTable.js';
import { DEMO } from '../cli/cliHelpers.js';
import { describeEngine } from '../engineHelpers.js';

const options: ScanOptions = { maxLevels: 50, bins: 3, recodes: recodesByColumn([]), keepMissing: false, other: null, adjustment: 'bh', alpha: 0.05, top: null, full: false, analysis: DEFAULT_ANALYSIS_OPTIONS };

/** Every pair's counted table, by "rows × cols", through the given route. */
async function pairTables(engine: 'builtin' | 'duckdb', request: ColumnsRequest): Promise<Map<string, CountedTable>> {
  const reader: ReaderOptions = { missing: [], skipBadRows: false, header: true, engine, onNote: (note) => { throw new Error(`unexpected fallback: ${note}`); } };
  return encodeColumns(inputSource(DEMO), reader, request, async (encoded) => {
    expect(encoded.summary.engine).toBe(engine);
    const prepared = prepareColumns(encoded.columns, encoded.layer, encoded.rows, options);
    const countPair = await encoded.countPairs(prepared.ordered, prepared.layer);
    const tables = new Map<string, CountedTable>();
    const { ordered, layer } = prepared;
    for (let a = 0; a < ordered.length; a++) for (let b = a + 1; b < ordered.length; b++) tables.set(`${ordered[a].name} × ${ordered[b].name}`, countPair(ordered[a], ordered[b], layer));
    return tables;
  });
}

describeEngine('the engine\'s encoded rows give every pair the built-in reader\'s table', () => {
  const base: ColumnsRequest = { maxLevels: 50, keepNumeric: true, maxColumns: 300, exclude: ['respondent_id'] };
  it.each([
    ['counts, a numeric column binned', base],
    ['sampling weights and a layer', { ...base, weight: { column: 'survey_weight', kind: 'weight' as const, decimalComma: false }, by: 'branch' }],
  ])('%s', async (_name, request) => {
    const builtin = await pairTables('builtin', request);
    const engine = await pairTables('duckdb', request);
    expect(builtin.size).toBeGreaterThan(10);
    expect([...engine.keys()]).toEqual([...builtin.keys()]);
    for (const [pair, table] of builtin) {
      expect(table.weighting.unweightedN, pair).toBeGreaterThan(0);
      expect(engine.get(pair), pair).toEqual(table);
    }
  });
});
