// Hostile corpus, class 2: the data's bytes are escaped for every format.
// Labels and column names carry terminal control sequences (screen clear,
// window title, C1 CSI, a bidirectional override), markup and script, Markdown
// table breakers, spreadsheet formulas and SQL comment breakers; file names and
// option values carry them too. Text, Markdown, CSV/TSV, HTML, SVG, SQL and
// error messages each show them escaped for their format.
import { readFileSync, mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';

const expect = (condition, message) => {
  if (!condition) throw new Error(message);
};

/** No control character (other than line feed) and no bidirectional control anywhere in a text meant for a terminal. */
// eslint-disable-next-line no-control-regex
const RAW_CONTROL = /[\u0000-\u0009\u000b-\u001f\u007f-\u009f\u202a-\u202e\u2066-\u2069]/;
const terminalClean = (text) => {
  const m = RAW_CONTROL.exec(text);
  expect(m === null, `a raw control character U+${m?.[0].charCodeAt(0).toString(16)} reached the terminal near ${JSON.stringify(text.slice(Math.max(0, (m?.index ?? 0) - 20), (m?.index ?? 0) + 20))}`);
};

/** Not a character XML 1.0 allows (W3C XML 1.0 §2.2). */
// eslint-disable-next-line no-control-regex
const NOT_XML = /[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/;

/** Each field of a CSV/TSV report, parsed; none may start like a formula unless it is a plain number. */
const spreadsheetClean = (text, delimiter) => {
  const rows = parse(text, { delimiter, relax_column_count: true });
  for (const row of rows) {
    for (const field of row) {
      const formula = /^[=+\-@\t\r]/.test(field) && !/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(field);
      expect(!formula, `a cell a spreadsheet would run: ${JSON.stringify(field)}`);
    }
  }
  return rows;
};

export function addEscapingCases({ dir, add }) {
  const folder = join(dir, 'escaping');
  mkdirSync(folder, { recursive: true });
  const file = (name, content) => {
    const path = join(folder, name);
    writeFileSync(path, content);
    return path;
  };
  const labels = [
    '\x1b[2J\x1b[Hcleared',
    '\x1b]0;owned\x07title',
    '\x1b]8;;https://example.invalid\x1b\\link\x1b]8;;\x1b\\',
    '\u009b31mred',
    'abc\u202eevil',
    '<script>window.__pwned=1</script>',
    'a|b',
    'line\rbreak',
    '=HYPERLINK("http://example.invalid","x")',
    '@SUM(1)',
    '-2+3',
    '-2',
  ];
  const quoted = (s) => `"${s.replace(/"/g, '""')}"`;
  const rows = ['label,=cmd|/c calc'];
  labels.forEach((label, i) => {
    for (let k = 0; k < 4; k++) rows.push(`${quoted(label)},${(i + k) % 2 === 0 ? 'g1' : '=g2()'}`);
  });
  const data = file('labels.csv', rows.join('\n') + '\n');
  const pair = (...rest) => ['pair', data, '--rows', 'label', '--cols', '=cmd|/c calc', ...rest];

  add({ name: 'escaping: text report shows control sequences visibly, warnings too', args: pair('--row-order', '\x1b[5mblink'), status: 0, stdout: /\\u\{1b\}\[2J.*[\s\S]*\\u\{1b\}\[5mblink/, stdoutCheck: terminalClean });
  add({ name: 'escaping: pair text has no raw control character', args: pair('--cells', 'counts'), status: 0, stdoutCheck: terminalClean });
  add({ name: 'escaping: scan text has no raw control character', args: ['scan', data], status: 0, stdoutCheck: terminalClean });
  add({ name: 'escaping: compare text has no raw control character', args: ['compare', data, data, '--rows', 'label', '--cols', '=cmd|/c calc'], status: 0, stdoutCheck: terminalClean });
  const waveFiles = ['=1+1 2026-01-05.csv', '=1+1 2026-01-12.csv'].map((name) => file(name, rows.join('\n') + '\n'));
  const waves = (...rest) => ['waves', ...waveFiles, '--rows', 'label', '--cols', '=cmd|/c calc', ...rest];
  add({ name: 'escaping: waves text has no raw control character', args: waves(), status: 0, stdoutCheck: terminalClean, engine: false });
  add({ name: 'escaping: waves csv neutralises formulas', args: waves('--format', 'csv'), status: 0, stdoutCheck: (text) => spreadsheetClean(text, ','), engine: false });
  add({
    name: 'escaping: Markdown keeps raw HTML as text and every row one row',
    args: pair('--format', 'markdown'),
    status: 0,
    stdoutCheck: (text) => {
      expect(!/(?<!\\)<script/i.test(text), 'raw <script> in Markdown');
      expect(!text.includes('\r'), 'a carriage return in Markdown');
      // In each table, every row has as many cell separators (pipes not escaped) as its header.
      let width = null;
      for (const line of text.split('\n')) {
        if (!line.startsWith('|')) {
          width = null;
          continue;
        }
        const pipes = line.replace(/\\\\/g, '').replace(/\\\|/g, '').split('|').length;
        if (width === null) width = pipes;
        else expect(pipes === width, `a row of ${pipes - 2} cells under a header of ${width - 2}: ${line}`);
      }
    },
  });
  add({ name: 'escaping: scan Markdown keeps raw HTML as text', args: ['scan', data, '--format', 'markdown'], status: 0, stdoutCheck: (text) => expect(!/(?<!\\)<script/i.test(text) && !text.includes('\r'), 'raw markup or CR in Markdown') });
  for (const [format, delimiter] of [['csv', ','], ['tsv', '\t']]) {
    add({
      name: `escaping: pair ${format} neutralises formulas for spreadsheets`,
      args: pair('--format', format),
      status: 0,
      stdoutCheck: (text) => {
        const cells = spreadsheetClean(text, delimiter).flat();
        expect(cells.includes(`'=HYPERLINK("http://example.invalid","x")`), 'the formula label is missing or not neutralised');
        expect(cells.includes('-2'), 'the plain number -2 was changed');
      },
    });
    add({ name: `escaping: scan ${format} neutralises formulas in column names`, args: ['scan', data, '--format', format], status: 0, stdoutCheck: (text) => expect(spreadsheetClean(text, delimiter).flat().includes(`'=cmd|/c calc`), 'the column name is missing or not neutralised') });
  }
  add({ name: 'escaping: --raw-cells keeps cells exactly as in the data, for machine use', args: pair('--format', 'csv', '--raw-cells'), status: 0, stdoutCheck: (text) => expect(parse(text, { relax_column_count: true }).flat().includes('=HYPERLINK("http://example.invalid","x")'), 'the raw label is missing') });
  const plot = join(folder, 'labels.svg');
  add({
    name: 'escaping: HTML and the standalone SVG are well-formed and carry no markup from the data',
    args: pair('--format', 'html', '--plot', plot),
    status: 0,
    stdoutCheck: (html) => {
      for (const [what, text] of [['HTML', html], ['SVG', readFileSync(plot, 'utf8')]]) {
        expect(!/<script/i.test(text), `raw <script> in the ${what}`);
        expect(!NOT_XML.test(text), `a character XML forbids in the ${what}`);
        expect(text.includes('&lt;script&gt;'), `the label is not shown as text in the ${what}`);
      }
    },
  });
  add({ name: 'escaping: scan HTML carries no markup from the data', args: ['scan', data, '--format', 'html'], status: 0, stdoutCheck: (text) => expect(!/<script/i.test(text) && !NOT_XML.test(text), 'raw markup or a forbidden character in scan HTML') });
  add({ name: 'escaping: an option value with control characters is escaped in the error', args: ['pair', data, '--rows', '\x1b]0;owned\x07', '--cols', 'label'], status: 2, stderr: /^tabsight: --rows "\\u\{1b\}\]0;owned\\u\{7\}": no such column/ });
  add({ name: 'escaping: a file name with control characters is escaped in the error', args: ['pair', join(folder, 'missing\x1b]0;t\x07\r\nname.csv'), '--rows', 'a', '--cols', 'b'], status: 1, stderr: /missing\\u\{1b\}\]0;t\\u\{7\}\\u\{d\}\\u\{a\}name\.csv: no such file/ });
  add({ name: 'escaping: an unknown option with control characters is escaped', args: ['pair', data, '--rows', 'label', '--cols', 'label', '--\x1b[2Jx'], status: 2, stderr: /unknown option '--\\u\{1b\}\[2Jx'/, engine: false });
  const huge = 'h'.repeat(1_000_000);
  add({ name: 'escaping: a 1 MB column name is clipped in the error it appears in', args: ['pair', file('huge-name.csv', `a,${huge}\nx,1\n`), '--rows', 'a', '--cols', 'b'], status: 2, stderr: /^tabsight: .{0,1000}$/ });
  add({ name: 'escaping: a 1 MB column name twice is clipped in the error', args: ['pair', file('huge-twice.csv', `a,${huge},${huge}\nx,1,2\n`), '--rows', 'a', '--cols', 'b'], status: 1, stderr: /^tabsight: .{0,1000}$/ });
  add({
    name: 'escaping: tabsight sql keeps a newline in a column name inside its comment',
    args: ['sql', '--rows', 'a\nDROP TABLE t; --', '--cols', 'b', '--table', 't'],
    status: 0,
    stdoutCheck: (text) => {
      const lines = text.split('\n');
      const select = lines.indexOf('SELECT');
      expect(select > 0 && lines.slice(0, select).every((l) => l.startsWith('-- ')), 'a comment line was broken by the data');
      expect(text.includes(`"a\nDROP TABLE t; --"`), 'the identifier is not quoted as the standard asks');
    },
  });
  add({ name: 'escaping: count writes formula-like labels raw for tabsight and says so once', args: ['count', data, '--rows', 'label', '--cols', '=cmd|/c calc'], status: 0, stderr: /^tabsight: note: \d+ labels \(such as .*\) start like a spreadsheet formula; count files keep labels exactly/m, stdout: /\n"=HYPERLINK\(""http/ });
}
