// Hostile corpus, class 4: the engine stays inside the machine, and the two
// engines agree. A URL or remote scheme as the input is refused in one line
// before anything is opened (so no engine installs extension code from the
// network); the engine writes nothing under $HOME and removes its temporary
// folder, even when stopped by a signal; and where the engine would read a
// file differently from the built-in reader (a space after a closing quote,
// a NUL byte past the first megabyte, whitespace-only lines before the
// header), both give the built-in reader's answer.
import { existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';

const expect = (condition, message) => {
  if (!condition) throw new Error(message);
};

export function addEngineReachCases({ dir, add, demo }) {
  const folder = join(dir, 'engine');
  mkdirSync(folder, { recursive: true });
  const file = (name, content) => {
    const path = join(folder, name);
    writeFileSync(path, content);
    return path;
  };
  const pair = (input, ...rest) => ['pair', input, '--rows', 'a', '--cols', 'b', ...rest];
  const remote = /: a remote address \([a-z0-9]+:\); tabsight reads local files and standard input only/;

  for (const url of ['https://example.invalid/export.csv', 'http://example.invalid/week-*.csv', 's3://bucket/exports/*.parquet', 'hf://datasets/owner/name/data.csv', 'file:///etc/hostname', 'md:my_database']) {
    add({ name: `engine: ${url.split(':')[0]}: input refused in one line (pair)`, args: pair(url), status: 2, stderr: remote });
  }
  add({ name: 'engine: a URL refused in one line (scan)', args: ['scan', 'https://example.invalid/export.parquet'], status: 2, stderr: remote });
  add({ name: 'engine: a URL refused in one line (compare)', args: ['compare', demo, 'https://example.invalid/b.csv', '--rows', 'a', '--cols', 'b'], status: 2, stderr: remote });
  add({ name: 'engine: a URL refused in one line (waves)', args: ['waves', 'https://example.invalid/a.csv', 'https://example.invalid/b.csv', '--rows', 'a', '--cols', 'b'], status: 2, stderr: remote, engine: false });
  add({ name: 'engine: a URL refused in one line (merge)', args: ['merge', 'https://example.invalid/counts.csv'], status: 2, stderr: remote });

  // Nothing under $HOME, and the engine's temporary folder removed: as its own process with a fresh HOME and TMPDIR.
  const home = join(folder, 'home');
  const tmp = join(folder, 'tmp');
  mkdirSync(home, { recursive: true });
  mkdirSync(tmp, { recursive: true });
  mkdirSync(join(folder, 'parts'), { recursive: true });
  writeFileSync(join(folder, 'parts', 'p1.csv'), 'a,b\nx,1\ny,2\nx,2\ny,1\n');
  writeFileSync(join(folder, 'parts', 'p2.csv'), 'a,b\nx,1\ny,2\n');
  const leftBehind = () => [...readdirSync(home), ...readdirSync(tmp)];
  add({
    name: 'engine: writes nothing under $HOME and removes its temporary folder',
    args: pair(join(folder, 'parts', 'p*.csv'), '--format', 'json'),
    mode: 'process',
    env: { HOME: home, TMPDIR: tmp },
    status: 0,
    json: (out) => expect(out.n === 6, `n ${out.n}`),
    after: () => expect(leftBehind().length === 0, `left behind: ${leftBehind().join(', ')}`),
    engine: 'only',
  });
  const target = file('stopped.json', 'old\n');
  add({
    name: 'engine: stopped by SIGTERM, it removes its temporary folder',
    args: ['scan', join(folder, 'parts', 'p*.csv'), '--format', 'json', '--output', target],
    mode: 'signal',
    signal: 'SIGTERM',
    env: { HOME: home, TMPDIR: tmp, TABSIGHT_PAUSE_WRITE_AFTER: '0' },
    status: 0,
    after: () => expect(leftBehind().length === 0 && existsSync(target), `left behind: ${leftBehind().join(', ')}`),
    engine: 'only',
  });

  // Where the engine would read differently, both engines give the built-in reader's answer.
  const afterQuote = /line 2: unexpected character after the closing quote of field 1/;
  add({ name: 'engine: a space after a closing quote', args: pair(file('space-after-quote.csv', 'a,b\n"x" ,1\ny,2\nx,2\ny,1\n')), status: 1, stderr: afterQuote });
  add({ name: 'engine: a tab after a closing quote, scanned', args: ['scan', file('tab-after-quote.csv', 'a,b\n"x"\t,1\ny,2\nx,2\ny,1\n')], status: 1, stderr: afterQuote });
  add({ name: 'engine: doubled quotes and spaces inside a quoted field are fine', args: pair(file('quotes-inside.csv', 'a,b\n"say ""hi"" now",1\ny,2\n"say ""hi"" now",2\ny,1\n'), '--format', 'json'), status: 0, json: (out) => expect(out.rows.levels.includes('say "hi" now'), `levels ${JSON.stringify(out.rows.levels)}`) });
  let big = 'a,b\n';
  while (big.length < 1_500_000) big += 'x,1\ny,2\n';
  const nulAt = big.length + 1;
  add({ name: 'engine: a NUL byte past the first megabyte', args: pair(file('late-nul.csv', `${big}x\0,1\n`)), status: 1, stderr: new RegExp(`late-nul\\.csv: NUL byte at byte offset ${nulAt} \\(line 375002\\)`) });
  mkdirSync(join(folder, 'late'), { recursive: true });
  writeFileSync(join(folder, 'late', 'w1.csv'), 'a,b\nx,1\ny,2\n');
  writeFileSync(join(folder, 'late', 'w2.csv'), `${big}x\0,1\n`);
  writeFileSync(join(folder, 'late', 'w3.csv'), 'a,b\n"x" ,1\ny,2\n');
  add({ name: 'engine: a NUL byte past the first megabyte in a file of a pattern', args: pair(join(folder, 'late', 'w[12].csv')), status: 1, stderr: /w2\.csv: NUL byte at byte offset/, engine: 'only' });
  add({ name: 'engine: a space after a closing quote in a file of a pattern', args: ['scan', join(folder, 'late', 'w[13].csv')], status: 1, stderr: /w3\.csv, line 2: unexpected character after the closing quote/, engine: 'only' });
  for (const [name, content] of [
    ['blank lines and whitespace-only lines before the header', '\n\n  \n\t\na,b\nx,1\ny,2\nx,2\ny,1\n'],
    ['CRLF blank lines before the header', '\r\n\r\n \r\na,b\r\nx,1\r\ny,2\r\nx,2\r\ny,1\r\n'],
    ['CR-only blank lines before the header', '\r\r\t\ra,b\rx,1\ry,2\rx,2\ry,1\r'],
  ]) {
    add({ name: `engine: ${name}`, args: pair(file(`${name.replace(/\W+/g, '-')}.csv`, content), '--format', 'json'), status: 0, json: (out) => expect(out.input.blankLines === 3 + (name.startsWith('blank') ? 1 : 0) && out.n === 4, `blank lines ${out.input.blankLines}, n ${out.n}`) });
  }
}
