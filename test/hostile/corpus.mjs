#!/usr/bin/env node
// Writes the corpus of hostile inputs into a folder and describes what each
// must give: a one-line error with a documented exit status, or, where the
// file is legal, a correct result. Run alone: node test/hostile/corpus.mjs <dir>
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { mulberry32 } from '../../scripts/seeded-random.mjs';
import { addOutputCases } from './outputs.mjs';
import { addStreamCases } from './streams.mjs';
import { addEscapingCases } from './escaping.mjs';
import { addEngineReachCases } from './engineReach.mjs';
import { addLimitCases } from './limits.mjs';
import { addVerdictCases } from './verdicts.mjs';

const DEMO = fileURLToPath(new URL('../../fixtures/demo/patron-survey.csv', import.meta.url));


/**
 * Cases marked `large` write tens of megabytes or a million rows: they run in
 * the slow tier (npm run test:slow), as their own process under a 512 MB heap.
 * @returns {{name: string, args: string[], stdin?: Buffer|string, status: number, stderr?: RegExp, stdout?: RegExp, json?: (out: any) => void, large?: boolean}[]}
 */
export function makeCorpus(dir, which = 'all') {
  mkdirSync(dir, { recursive: true });
  const file = (name, content) => {
    const path = join(dir, name);
    writeFileSync(path, content);
    return path;
  };
  const pair = (path, rows = 'a', cols = 'b', ...rest) => ['pair', path, '--rows', rows, '--cols', cols, ...rest];
  const cases = [];
  const add = (c) => {
    if (which === 'all' || (which === 'large') === (c.large === true)) cases.push(c);
  };
  const large = which !== 'small';

  add({ name: 'empty file', args: pair(file('empty.csv', '')), status: 1, stderr: /empty\.csv: the file is empty/ });
  add({ name: 'header only', args: pair(file('header-only.csv', 'a,b\n')), status: 1, stderr: /no data rows/ });
  add({ name: 'header only, with a byte-order mark', args: pair(file('bom-header.csv', '\ufeffa,b\r\n')), status: 1, stderr: /no data rows/ });
  add({ name: 'only blank lines', args: pair(file('blank.csv', '\n\n   \n\r\n\t\n')), status: 1, stderr: /only blank lines/ });
  add({ name: 'unterminated quote at the end', args: pair(file('unterminated.csv', 'a,b\nx,1\ny,"open\nstill open')), status: 1, stderr: /line 3: a quoted field \(column 2\) opens here and is never closed/ });
  add({ name: 'a quote inside an unquoted field', args: pair(file('inner-quote.csv', 'a,b\nx,1\ny,ab"c\n')), status: 1, stderr: /line 3: a quote inside the unquoted field 2/ });
  add({ name: 'text after a closing quote', args: pair(file('after-quote.csv', 'a,b\n"x"y,1\n')), status: 1, stderr: /line 2: unexpected character after the closing quote/ });
  add({ name: 'ragged rows', args: pair(file('ragged.csv', 'a,b\nx,1\ny,2,3\nx,2\n')), status: 1, stderr: /line 3: 3 fields where the header has 2/ });
  add({ name: 'duplicate header names', args: pair(file('dup.csv', 'a,b,a\n1,2,3\n')), status: 1, stderr: /names "a" twice/ });
  add({ name: 'empty header name', args: pair(file('noname.csv', 'a,,b\n1,2,3\n')), status: 1, stderr: /column 2 has an empty name/ });
  add({ name: 'NUL bytes', args: pair(file('nul.csv', 'a,b\nx\0,1\n')), status: 1, stderr: /NUL byte at byte offset 5 \(line 2\)/ });
  add({ name: 'invalid UTF-8', args: pair(file('bad-utf8.csv', Buffer.concat([Buffer.from('a,b\nx,1\n'), Buffer.from([0xc3, 0x28]), Buffer.from(',2\n')]))), status: 1, stderr: /invalid UTF-8 at byte offset 8 \(line 3\); pass --encoding/ });
  // past the first 1 MB read chunk: the line is still exact
  if (large) {
    const longLines = ['a,b'];
    for (let i = 0; i < 200_000; i++) longLines.push(`row${i % 7},${i % 3}`);
    const deep = Buffer.concat([Buffer.from(longLines.join('\n') + '\n'), Buffer.from([0x78, 0xff]), Buffer.from(',1\n')]);
    add({ name: 'invalid UTF-8 past the first read chunk', args: pair(file('deep-bad.csv', deep)), status: 1, stderr: new RegExp(`invalid UTF-8 at byte offset ${deep.length - 4} \\(line 200002\\)`), large: true });
    add({ name: 'invalid UTF-8 past the first read chunk, on standard input', args: ['pair', '-', '--rows', 'a', '--cols', 'b'], stdin: deep, status: 1, stderr: /line 200002\)/, large: true });
  }
  const random = mulberry32(99);
  const garbage = Buffer.alloc(4096);
  for (let i = 0; i < garbage.length; i++) garbage[i] = Math.floor(random() * 256);
  add({ name: 'binary garbage', args: pair(file('garbage.bin', garbage)), status: 1, stderr: /NUL byte|invalid UTF-8/ });

  // 50 MB in one field: in a column nobody asked for, and in a selected one.
  if (large) {
    const blob = 'z'.repeat(50 * 1024 * 1024);
    add({
      name: 'a 50 MB field in an unselected column',
      args: pair(file('blob-other.csv', `a,b,blob\nx,1,short\ny,2,"${blob}"\nx,2,short\ny,1,short\n`), 'a', 'b', '--format', 'json'),
      status: 0,
      json: (out) => {
        if (out.n !== 4 || JSON.stringify(out.counts) !== '[[1,1],[1,1]]') throw new Error(`wrong table ${JSON.stringify(out.counts)}`);
      },
      large: true,
    });
    add({
      name: 'a 50 MB field as a level label',
      args: pair(file('blob-level.csv', `a,b\n${blob},1\nx,2\nx,1\ny,2\ny,1\n`)),
      status: 0,
      // shown shortened, saying how much was left out (never silently cut)
      stdout: /zzzz…\s+\(52,428,\d{3}\s+more\s+characters\)/,
      large: true,
    });
  }

  // A million distinct levels in one column.
  if (large) {
    const ids = ['id,g,h'];
    for (let i = 0; i < 1_000_000; i++) ids.push(`r${i},${i % 3},${i % 2}`);
    const million = file('million.csv', ids.join('\n') + '\n');
    add({ name: 'a million distinct levels (pair)', args: pair(million, 'id', 'g'), status: 1, stderr: /"id" has 1,000,000 distinct values, more than --max-levels 50/, large: true });
    add({
      name: 'a million distinct levels (scan)',
      args: ['scan', million, '--format', 'json'],
      status: 0,
      json: (out) => {
        if (!out.skipped.some((s) => s.column === 'id' && s.code === 'identifier')) throw new Error('id not skipped as an identifier');
        if (out.pairsTested !== 1) throw new Error(`expected 1 pair, got ${out.pairsTested}`);
      },
      large: true,
    });
  }

  // Ten thousand columns.
  if (large) {
    const header = Array.from({ length: 10_000 }, (_v, i) => `c${i}`);
    const wideRows = [header.join(',')];
    for (let r = 0; r < 30; r++) wideRows.push(header.map((_h, i) => String((r + i) % 3)).join(','));
    const wide = file('wide.csv', wideRows.join('\n') + '\n');
    add({ name: '10,000 columns (pair)', args: pair(wide, 'c1', 'c2', '--format', 'json'), status: 0, json: (out) => { if (out.n !== 30) throw new Error('n'); }, large: true });
    add({ name: '10,000 columns (scan)', args: ['scan', wide], status: 2, stderr: /10,000 candidate columns .* more than --max-columns 300/, large: true });
  }

  add({ name: 'a column selected twice', args: pair(file('twice.csv', 'a,b\nx,1\n'), 'a', 'a'), status: 2, stderr: /both name "a"/ });
  add({ name: 'a directory instead of a file', args: pair(dir), status: 1, stderr: /is a directory/ });
  add({ name: 'a path through a file', args: pair(join(file('plain.csv', 'a,b\n'), 'inside.csv')), status: 1, stderr: /a part of the path is a file/ });
  add({ name: 'a missing file', args: pair(join(dir, 'missing.csv')), status: 1, stderr: /no such file/ });
  for (const [value, reason] of [['heavy', /"heavy" is not a number/], ['-2', /"-2" is negative/], ['Infinity', /not a finite number/]]) {
    add({ name: `a weight column with ${value}`, args: pair(file(`weight-${value}.csv`, `a,b,w\nx,1,1\ny,2,${value}\n`), 'a', 'b', '--weight', 'w'), status: 1, stderr: reason });
  }
  add({ name: 'standard input closed mid-row', args: ['pair', '-', '--rows', 'a', '--cols', 'b'], stdin: 'a,b\nx,1\ny,2\nx', status: 1, stderr: /standard input, line 4: 1 field where the header has 2/ });
  add({ name: 'standard input closed inside a quote', args: ['pair', '-', '--rows', 'a', '--cols', 'b'], stdin: 'a,b\nx,1\ny,"2', status: 1, stderr: /standard input, line 3: a quoted field/ });
  add({ name: 'standard input empty', args: ['pair', '-', '--rows', 'a', '--cols', 'b'], stdin: '', status: 1, stderr: /standard input: the file is empty/ });
  add({
    name: 'old Mac line endings (CR only) are legal',
    args: pair(file('cr.csv', 'a,b\rx,1\ry,2\rx,2\ry,1\rx,1\r'), 'a', 'b', '--format', 'json'),
    status: 0,
    json: (out) => { if (out.n !== 5) throw new Error(`n = ${out.n}`); },
  });
  addLimitCases({ dir, add, large });
  if (which !== 'large') {
    addOutputCases({ dir, add, demo: DEMO });
    addStreamCases({ dir, add });
    addEscapingCases({ dir, add });
    addEngineReachCases({ dir, add, demo: DEMO });
    addVerdictCases({ dir, add });
  }
  return cases;
}

if (process.argv[1] && process.argv[1].endsWith('corpus.mjs')) {
  const dir = process.argv[2] ?? 'hostile-corpus';
  const cases = makeCorpus(dir);
  console.log(`wrote ${cases.length} cases into ${dir}`);
}
