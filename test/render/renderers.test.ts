// One renderer table per report kind (src/render/renderers.ts): every
// format a command offers has a renderer, and each writes the record of a
// published table (party identification by gender, Agresti; GSS, from the
// reference fixture) in its own form: JSON that reads back as the record,
// CSV/TSV under the stable columns of docs/json.md, Markdown tables, one
// HTML page, plain text within the page width.
import { Chalk } from 'chalk';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { DEFAULT_ANALYSIS_OPTIONS } from '../../src/analysis/analyzeTable.js';
import { pairReport } from '../../src/analysis/report.js';
import { buildProgram } from '../../src/cli/program.js';
import type { CliIo } from '../../src/cli/output.js';
import { displayWidth } from '../../src/render/layout.js';
import { PAIR_COLUMNS } from '../../src/render/pairDelimited.js';
import { COMPARE_RENDERERS, PAIR_RENDERERS, RenderContext, SCAN_RENDERERS } from '../../src/render/renderers.js';
import { reference } from '../helpers.js';

const party = reference.tables.find((t) => t.name.startsWith('party identification'))!;
const report = pairReport(
  { rowName: 'gender', colName: 'party', rowLevels: ['female', 'male'], colLevels: ['democrat', 'independent', 'republican'], counts: party.counts },
  0,
  { file: 'party.csv', engine: 'builtin', format: 'csv', files: 1, delimiter: ',', rowsRead: 2757, blankLines: 0, badRowsSkipped: 0, filtered: 0, badWeightsSkipped: 0 },
  DEFAULT_ANALYSIS_OPTIONS,
);
const context: RenderContext = { paint: new Chalk({ level: 0 }), width: 80, cells: 'compact' };

describe('renderer tables', () => {
  it('each command offers exactly the formats its table renders', () => {
    const silent = { write: () => true, once: () => undefined };
    const io: CliIo = { stdin: process.stdin, stdout: silent, stderr: silent, env: {} };
    const program = buildProgram(io, () => undefined);
    const choices = (name: string) => program.commands.find((c) => c.name() === name)!.options.find((o) => o.long === '--format')!.argChoices;
    expect(choices('pair')).toEqual(Object.keys(PAIR_RENDERERS));
    expect(choices('scan')).toEqual(Object.keys(SCAN_RENDERERS));
    expect(choices('compare')).toEqual(Object.keys(COMPARE_RENDERERS));
  });

  it('pair: JSON reads back as the record', () => {
    expect(JSON.parse(PAIR_RENDERERS.json(report, context))).toEqual(JSON.parse(JSON.stringify(report)));
  });

  it('pair: CSV and TSV parse back under the stable columns, with the counts of the table', () => {
    for (const [format, delimiter] of [['csv', ','], ['tsv', '\t']] as const) {
      const lines = parse(PAIR_RENDERERS[format](report, context), { columns: true, delimiter }) as Record<string, string>[];
      expect(Object.keys(lines[0])).toEqual([...PAIR_COLUMNS]);
      const count = (row: string, col: string) => Number(lines.find((l) => l.section === 'count' && l.row === row && l.col === col)!.value);
      expect(count('female', 'democrat')).toBe(762);
      expect(count('male', 'republican')).toBe(477);
    }
  });

  it('pair: Markdown tables, one HTML page, and text within the page width', () => {
    expect(PAIR_RENDERERS.markdown(report, context)).toMatch(/^\|.*\|$/m);
    const html = PAIR_RENDERERS.html(report, context);
    expect(html.startsWith('<!doctype html>')).toBe(true);
    expect(html.match(/<html/g)).toHaveLength(1);
    const text = PAIR_RENDERERS.text(report, context);
    expect(text).toContain('democrat');
    expect(text).not.toMatch(/\x1b\[/);
    for (const line of text.split('\n')) expect(displayWidth(line), line).toBeLessThanOrEqual(80);
  });
});
