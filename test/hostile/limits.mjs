// Hostile corpus, class 5: numbers and sizes at the limits. Counts past 2^53
// are merged exactly and never read inexactly; a table's levels × levels is
// bounded before it is counted (pair, count, layers, scan per pair and in
// total); a record (an endless field or line) and a header have documented
// limits. Each ends with the right result or one line, in bounded time and
// memory.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';

const expect = (condition, message) => {
  if (!condition) throw new Error(message);
};

export function addLimitCases({ dir, add, large }) {
  const folder = join(dir, 'limits');
  mkdirSync(folder, { recursive: true });
  const file = (name, content) => {
    const path = join(folder, name);
    writeFileSync(path, content);
    return path;
  };

  // Counts past 2^53 (9,007,199,254,740,991).
  const partA = file('counts-a.csv', 'a,b,count\nx,1,9007199254740993\ny,2,1\n');
  const partB = file('counts-b.csv', 'a,b,count\nx,1,9007199254740993\ny,2,1.5e3\nx,2,1e20\n');
  add({ name: 'limits: merge adds counts past 2^53 exactly', args: ['merge', partA, partB], status: 0, stdout: /^a,b,count\nx,1,18014398509481986\nx,2,100000000000000000000\ny,2,1501\n$/ });
  add({ name: 'limits: a fractional count is refused by merge', args: ['merge', file('counts-half.csv', 'a,b,count\nx,1,2.5\n')], status: 1, stderr: /counts-half\.csv, line 2: the count "2\.5" is not a whole number/ });
  const inexact = file('inexact.csv', 'a,b,count\nx,1,18014398509481986\ny,2,3\nx,2,5\ny,1,7\n');
  add({ name: 'limits: --freq refuses a count a double cannot hold exactly', args: ['pair', inexact, '--rows', 'a', '--cols', 'b', '--freq', 'count'], status: 1, stderr: /inexact\.csv, line 2: --freq column "count" "18014398509481986" is past 2\^53 and cannot be counted exactly \(it would be read as 18014398509481984\)/ });
  add({
    name: 'limits: --freq takes a count past 2^53 that a double holds exactly (1e16)',
    args: ['pair', file('exact-big.csv', 'a,b,count\nx,1,1e16\ny,2,3\nx,2,5\ny,1,7\n'), '--rows', 'a', '--cols', 'b', '--freq', 'count', '--format', 'json'],
    status: 0,
    // The total, 1e16 + 15, is past 2^53 itself: held to 16 digits (README: counts are exact up to 2^53, totals past it rounded once).
    json: (out) => expect(Math.abs(out.n - (1e16 + 15)) <= 2 && JSON.stringify(out.counts) === '[[10000000000000000,5],[7,3]]', `n ${out.n}, counts ${JSON.stringify(out.counts)}`),
  });

  // Levels × levels, bounded before counting.
  let rows = 'a,b\n';
  for (let i = 0; i < 5000; i++) rows += `a${i},b${(i * 7) % 5000}\na${i},b${(i * 7 + 31) % 5000}\n`;
  const fiveThousand = file('levels-5000.csv', rows);
  const tooMany = /the table of "a" by "b" would have 5,000 × 5,000 = 25,000,000 cells, more than the limit of 1,000,000/;
  add({ name: 'limits: pair of two 5,000-level columns (raised --max-levels)', args: ['pair', fiveThousand, '--rows', 'a', '--cols', 'b', '--max-levels', '10000'], status: 1, stderr: tooMany });
  add({ name: 'limits: count of two 5,000-level columns', args: ['count', fiveThousand, '--rows', 'a', '--cols', 'b', '--max-levels', '10000'], status: 1, stderr: tooMany });
  add({ name: 'limits: scan of two 5,000-level columns', args: ['scan', fiveThousand, '--max-levels', '10000'], status: 1, stderr: tooMany });
  let layered = 'a,b,g\n';
  for (let i = 0; i < 40000; i++) layered += `a${i % 400},b${(i * 7) % 400},g${i % 20}\n`;
  add({ name: 'limits: layers multiply the cells (400 × 400 × 20 layers)', args: ['pair', file('layered.csv', layered), '--rows', 'a', '--cols', 'b', '--by', 'g', '--max-levels', '1000'], status: 1, stderr: /would have 400 × 400 × 20 layers of "g" = 3,200,000 cells, more than the limit of 1,000,000/ });
  const names = Array.from({ length: 40 }, (_v, k) => `q${k}`);
  let wide = `${names.join(',')}\n`;
  for (let r = 0; r < 2400; r++) wide += names.map((_n, k) => String((r * (k + 1)) % 1000)).join(',') + '\n';
  add({ name: 'limits: a scan whose pairs together pass the limit', args: ['scan', file('many-levels.csv', wide), '--max-levels', '1000'], status: 1, stderr: /the 780 pairs of 40 columns would have [\d,]+ cells together, more than the scan's limit of 200,000,000/ });
  // A stray header row in the middle of a 20-column file: every column gains a level, nothing more.
  const twenty = Array.from({ length: 20 }, (_v, k) => `c${k}`);
  let stray = `${twenty.join(',')}\n`;
  for (let r = 0; r < 20000; r++) {
    stray += twenty.map((_n, k) => String((r * (k + 3)) % (k < 10 ? 7 : 40))).join(',') + '\n';
    if (r === 10000) stray += `${twenty.join(',')}\n`;
  }
  const everyPair = (out) => expect(out.columnsScored.length === 20 && out.pairsTested + out.derived.length + out.untestable.length === 190, `${out.columnsScored.length} columns, ${out.pairsTested} pairs tested`);
  add({ name: 'limits: a stray header row in a 20-column file', args: ['scan', file('stray-header.csv', stray), '--format', 'json'], status: 0, json: everyPair });
  add({ name: 'limits: a stray header row with a raised --max-levels', args: ['scan', file('stray-header-raised.csv', stray), '--max-levels', '100000', '--format', 'json'], status: 0, json: everyPair });

  // Records and headers.
  add({ name: 'limits: a header of more than 1,000,000 columns', args: ['pair', file('wide-header.csv', `a,b${',c'.repeat(1_000_001)}\nx,1\n`), '--rows', 'a', '--cols', 'b'], status: 1, stderr: /wide-header\.csv, line 1: the header has more than 1,000,000 columns, the limit/ });
  if (large) {
    const endless = gzipSync(Buffer.concat([Buffer.from('a,b\nx,"'), Buffer.alloc(70 * 1024 * 1024, 0x7a)]));
    add({ name: 'limits: an endless quoted field in a gzip file (70 MB inflated)', args: ['pair', file('endless-field.csv.gz', endless), '--rows', 'a', '--cols', 'b'], status: 1, stderr: /endless-field\.csv\.gz, line 2: a record longer than 64 MiB, the limit for one record/, large: true });
    add({ name: 'limits: an endless line without line breaks', args: ['scan', file('endless-line.csv', Buffer.concat([Buffer.from('a,b\nx,'), Buffer.alloc(70 * 1024 * 1024, 0x79)]))], status: 1, stderr: /endless-line\.csv, line 2: a record longer than 64 MiB/, large: true });
    mkdirSync(join(folder, 'endless'), { recursive: true });
    writeFileSync(join(folder, 'endless', 'part-1.csv'), 'a,b\nx,1\ny,2\n');
    writeFileSync(join(folder, 'endless', 'part-2.csv.gz'), endless);
    add({ name: 'limits: an endless field in a file of a pattern names that file', args: ['pair', join(folder, 'endless', 'part-*'), '--rows', 'a', '--cols', 'b'], status: 1, stderr: /part-2\.csv\.gz, line 2: a record longer than 64 MiB/, large: true, engine: 'only' });
    mkdirSync(join(folder, 'long'), { recursive: true });
    writeFileSync(join(folder, 'long', 'part-1.csv'), `a,b\nx,${'z'.repeat(5 * 1024 * 1024)}\ny,2\nx,2\ny,1\n`);
    writeFileSync(join(folder, 'long', 'part-2.csv'), 'a,b\nx,1\ny,2\n');
    add({ name: 'limits: a 5 MB field in a file of a pattern is read by both engines', args: ['pair', join(folder, 'long', 'part-*.csv'), '--rows', 'a', '--cols', 'b', '--format', 'json'], status: 0, json: (out) => expect(out.n === 6, `n ${out.n}`), large: true, engine: 'only' });
  }
}
