// The banner renderers (src/render/bannerText.ts, bannerTables.ts): the
// formats banner offers are the formats rendered; CSV/TSV parse back under
// the stable columns with the record's numbers; text stays within the page
// width with wide (CJK) labels; data is escaped for HTML and Markdown. The
// data are a small hand-made banner: 40 respondents in two regions.
import { Chalk } from 'chalk';
import { parse } from 'csv-parse/sync';
import { describe, expect, it } from 'vitest';
import { DEFAULT_ANALYSIS_OPTIONS } from '../../src/analysis/analyzeTable.js';
import { bannerReport } from '../../src/analysis/banner.js';
import { BANNER_FORMATS } from '../../src/cli/banner.js';
import { buildProgram } from '../../src/cli/program.js';
import type { CliIo } from '../../src/cli/output.js';
import { BANNER_COLUMNS } from '../../src/render/bannerTables.js';
import { displayWidth } from '../../src/render/layout.js';
import { BANNER_RENDERERS, RenderContext } from '../../src/render/renderers.js';

// 20 respondents in each region; the answer "東京都の図書館 <b>|</b>" given by 15 of the first region and 5 of the second.
const region = new Uint16Array(40).map((_v, r) => (r < 20 ? 1 : 2));
const answer = new Uint16Array(40).map((_v, r) => ((r < 20 ? r < 15 : r < 25) ? 1 : 2));
const report = bannerReport(
  {
    input: { file: 'hand.csv', engine: 'builtin', format: 'csv', files: 1, delimiter: ',', rowsRead: 40, blankLines: 0, badRowsSkipped: 0, filtered: 0, badWeightsSkipped: 0 },
    respondents: 40,
    breaks: [{ name: 'region', title: null, labels: ['北海道 north', 'south <script>'], codes: region }],
    questions: [{ kind: 'single', name: 'library', title: 'Which library?', labels: ['東京都の図書館 <b>|</b>', 'other'], codes: answer, nets: [], scores: null, showLevels: true }],
    skipped: [],
    warnings: [],
  },
  { cells: ['col', 'count'], confidenceLevels: [0.95], adjustment: 'none', minimumBase: 10, alpha: 0.05, multipleResponseReferral: 'second-order', analysis: DEFAULT_ANALYSIS_OPTIONS },
);
const context: RenderContext = { paint: new Chalk({ level: 0 }), width: 60, cells: 'compact' };

describe('banner renderers', () => {
  it('banner offers exactly the formats it renders, and the spreadsheet', () => {
    const silent = { write: () => true, once: () => undefined };
    const io: CliIo = { stdin: process.stdin, stdout: silent, stderr: silent, env: {} };
    const program = buildProgram(io, () => undefined);
    const choices = program.commands.find((c) => c.name() === 'banner')!.options.find((o) => o.long === '--format')!.argChoices;
    expect(choices).toEqual([...Object.keys(BANNER_RENDERERS), 'xlsx']);
    expect([...BANNER_FORMATS]).toEqual(choices);
  });

  it('the hand count: 15 of 20 (75%) against 5 of 20 (25%), the first column marked higher than the second', () => {
    const row = report.questions[0].rows[0];
    expect(row.cells.map((c) => c.count)).toEqual([20, 15, 5]);
    expect(row.cells.map((c) => c.columnPercent)).toEqual([50, 75, 25]);
    expect(row.cells[1].marks).toBe('B');
  });

  it('CSV and TSV parse back under the stable columns with the numbers of the record', () => {
    for (const [format, delimiter] of [['csv', ','], ['tsv', '\t']] as const) {
      const lines = parse(BANNER_RENDERERS[format](report, context), { columns: true, delimiter }) as Record<string, string>[];
      expect(Object.keys(lines[0])).toEqual([...BANNER_COLUMNS]);
      const cell = lines.find((l) => l.row_kind === 'level' && l.row === '東京都の図書館 <b>|</b>' && l.key === 'A')!;
      expect(Number(cell.column_percent)).toBe(75);
      expect(cell.marks).toBe('B');
      expect(lines.filter((l) => l.row_kind === 'test')).toHaveLength(1);
    }
  });

  it('text: every line within the page width, wide labels measured by display width', () => {
    const text = BANNER_RENDERERS.text(report, context);
    for (const line of text.split('\n')) expect(displayWidth(line)).toBeLessThanOrEqual(60);
    expect(text).toContain('75% B');
  });

  it('escaped at the edge (OWASP CSV injection; ECMA-48 control sequences): a formula-like label gets an apostrophe in CSV unless raw, a control character is shown visibly in text', () => {
    const hostile = bannerReport(
      {
        input: { file: 'hostile.csv', engine: 'builtin', format: 'csv', files: 1, delimiter: ',', rowsRead: 40, blankLines: 0, badRowsSkipped: 0, filtered: 0, badWeightsSkipped: 0 },
        respondents: 40,
        breaks: [{ name: 'region', title: null, labels: ['=cmd|x', 'south\u001b[31m'], codes: new Uint16Array(region) }],
        questions: [{ kind: 'single', name: 'library', title: null, labels: ['@SUM(1)', 'other'], codes: new Uint16Array(answer), nets: [], scores: null, showLevels: true }],
        skipped: [],
        warnings: [],
      },
      { cells: ['col'], confidenceLevels: [0.95], adjustment: 'none', minimumBase: 10, alpha: 0.05, multipleResponseReferral: 'second-order', analysis: DEFAULT_ANALYSIS_OPTIONS },
    );
    const lines = parse(BANNER_RENDERERS.csv(hostile, context), { columns: true }) as Record<string, string>[];
    expect(lines.some((l) => l.level === "'=cmd|x")).toBe(true);
    expect(lines.some((l) => l.row === "'@SUM(1)")).toBe(true);
    const raw = parse(BANNER_RENDERERS.csv(hostile, { ...context, rawCells: true }), { columns: true }) as Record<string, string>[];
    expect(raw.some((l) => l.level === '=cmd|x')).toBe(true);
    const text = BANNER_RENDERERS.text(hostile, context);
    expect(text).not.toContain('\u001b');
    expect(text).toContain('\\u{1b}');
  });

  it('HTML escapes the data and has a table of contents; Markdown escapes pipes', () => {
    const html = BANNER_RENDERERS.html(report, context);
    expect(html).not.toContain('<script>');
    expect(html).toContain('south &lt;script&gt;');
    expect(html).toContain('<a href="#q1">');
    const markdown = BANNER_RENDERERS.markdown(report, context);
    expect(markdown).toContain('\\<b>\\|\\</b>');
    expect(JSON.parse(BANNER_RENDERERS.json(report, context))).toEqual(JSON.parse(JSON.stringify(report)));
  });
});
