// The scan's analysis without reading a file (src/analysis/scan.ts):
// screening with its stated reasons (README, "tabsight scan": a single
// level, an identifier, a numeric column with many values, more than
// --max-levels levels), and every pair scored by the same analysis as a
// single pair, adjusted for the number of pairs (Bonferroni 1936 / Dunn
// 1961: min(1, m·p)) and ranked by bias-corrected V.
import { describe, expect, it } from 'vitest';
import { analyzeTable, DEFAULT_ANALYSIS_OPTIONS } from '../../src/analysis/analyzeTable.js';
import type { InputSummary } from '../../src/analysis/report.js';
import { prepareColumns, scorePairs, ScanOptions, screenColumn } from '../../src/analysis/scan.js';
import { countPair } from '../../src/table/countPair.js';
import type { EncodedColumn } from '../../src/table/encodedColumn.js';
import { reference } from '../helpers.js';

const options: ScanOptions = { maxLevels: 50, bins: null, recodes: new Map(), keepMissing: false, other: null, adjustment: 'bonferroni', alpha: 0.05, top: null, full: true, analysis: DEFAULT_ANALYSIS_OPTIONS };
const input: InputSummary = { file: 'test', engine: 'builtin', format: 'csv', files: 1, delimiter: ',', rowsRead: 0, blankLines: 0, badRowsSkipped: 0, filtered: 0, badWeightsSkipped: 0 };

function column(name: string, labels: string[], codes: number[], facts: Partial<EncodedColumn> = {}): EncodedColumn {
  const missing = codes.filter((c) => c === 0).length;
  return { name, labels, codes: Uint16Array.from(codes), missing, distinct: labels.length, distinctCapped: false, numeric: false, integer: false, missingLooking: [], ...facts };
}

describe('screening the candidate columns', () => {
  it('gives each column left out its reason', () => {
    const rows = 40;
    const ids = Array.from({ length: rows }, (_v, i) => i + 1);
    expect(screenColumn(column('id', ids.map(String), ids, { numeric: true, integer: true }), rows, options)?.code).toBe('identifier');
    expect(screenColumn(column('constant', ['same'], ids.map(() => 1)), rows, options)?.code).toBe('single-level');
    expect(screenColumn(column('blank', [], ids.map(() => 0)), rows, options)?.code).toBe('no-values');
    const amount = { ...column('amount', [], []), codes: null, distinct: 300, numeric: true };
    expect(screenColumn(amount, rows, options)?.reason).toMatch(/numeric with 300 distinct values; --bins 5/);
    const wide = { ...column('city', [], []), codes: null, distinct: 80 };
    expect(screenColumn(wide, 1000, options)?.reason).toBe('80 distinct values, more than --max-levels 50');
    expect(screenColumn(column('colour', ['red', 'blue'], ids.map((i) => 1 + (i % 2))), rows, options)).toBeNull();
  });
});

describe('scoring every pair', () => {
  // Party identification by gender (Agresti, GSS; the reference fixture)
  // expanded to one row per respondent, beside a column that cycles a, b, c.
  const party = reference.tables.find((t) => t.name.startsWith('party identification'))!;
  const gender: number[] = [];
  const vote: number[] = [];
  party.counts.forEach((row, i) => row.forEach((n, j) => {
    for (let k = 0; k < n; k++) {
      gender.push(i + 1);
      vote.push(j + 1);
    }
  }));
  const rows = gender.length;
  const noise = gender.map((_g, k) => 1 + (k % 3));
  const columns = [column('gender', ['female', 'male'], gender), column('party', ['democrat', 'independent', 'republican'], vote), column('noise', ['a', 'b', 'c'], noise)];

  it('each pair gets the record a single pair gets, adjusted for the number of pairs and ranked by bias-corrected V', () => {
    const prepared = prepareColumns(columns, null, rows, options);
    const report = scorePairs(prepared, rows, input, options, (a, b, layer) => countPair(a, b, { strata: layer ?? undefined }));
    expect(report.pairsTested).toBe(3);
    const byNames = (a: string, b: string) => report.pairs.find((p) => p.rows.name === a && p.cols.name === b)!;
    const genderParty = byNames('gender', 'party');
    expect(genderParty.counts).toEqual(party.counts);
    const single = analyzeTable({ rowName: 'gender', colName: 'party', rowLevels: ['female', 'male'], colLevels: ['democrat', 'independent', 'republican'], counts: party.counts }, 0, DEFAULT_ANALYSIS_OPTIONS);
    expect(genderParty.tests).toEqual(single.tests);
    expect(genderParty.measures).toEqual(single.measures);
    for (const pair of report.pairs) expect(pair.pAdjusted).toBe(Math.min(1, 3 * pair.tests.pearson.pValue));
    const vs = report.pairs.map((p) => p.measures.biasCorrectedV ?? -1);
    expect([...vs].sort((x, y) => y - x)).toEqual(vs);
    expect(report.pairs.map((p) => p.rank)).toEqual([1, 2, 3]);
  });
});
