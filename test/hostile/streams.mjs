// Hostile corpus, class 3: streams, devices and encodings. Standard input,
// pipes, FIFOs, process substitution and devices are read once and never
// seeked or read again (an error's line is counted as they stream); UTF-16
// with an odd last byte, a byte-order mark split across reads, truncated
// gzip (alone, on a pipe, in a pattern), and a file name with [ ] that
// exists: each ends with the right table or one line naming the input.
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';

const expect = (condition, message) => {
  if (!condition) throw new Error(message);
};

/** The JSON check of the 2×2 table x/y × 1/2 with counts [[2,1],[1,1]]. */
const theTable = (out) => {
  expect(out.n === 5 && JSON.stringify(out.rows.levels) === '["x","y"]' && JSON.stringify(out.counts) === '[[2,1],[1,1]]', `wrong table ${JSON.stringify(out.counts)} of ${JSON.stringify(out.rows?.levels)}`);
};

export function addStreamCases({ dir, add }) {
  const folder = join(dir, 'streams');
  mkdirSync(folder, { recursive: true });
  const file = (name, content) => {
    const path = join(folder, name);
    writeFileSync(path, content);
    return path;
  };
  const table = 'a,b\nx,1\ny,2\nx,2\ny,1\nx,1\n';
  const data = file('data.csv', table);
  const pair = (input, ...rest) => ['pair', input, '--rows', 'a', '--cols', 'b', ...rest];
  // The program's quoted arguments hold '@INPUT@' where the shell's own input form goes.
  const substitute = (program, input) => program.replace(`'@INPUT@'`, input);

  add({ name: 'streams: process substitution <(…) is read as a stream', args: pair('@INPUT@', '--format', 'json'), mode: 'shell', shell: (p) => substitute(p, `<(cat '${data}')`), status: 0, json: theTable, engine: false });
  add({ name: 'streams: process substitution with --engine duckdb is refused in one line', args: pair('@INPUT@', '--engine', 'duckdb'), mode: 'shell', shell: (p) => substitute(p, `<(cat '${data}')`), status: 2, stderr: /--engine duckdb reads files; \/dev\/fd\/\d+ is a stream .*use --engine builtin/, engine: false });
  add({ name: 'streams: /dev/stdin fed by a pipe', args: pair('/dev/stdin', '--format', 'json'), mode: 'shell', shell: (p) => `cat '${data}' | ${p}`, status: 0, json: theTable, engine: false });
  add({ name: 'streams: a FIFO, scanned', args: ['scan', join(folder, 'input.fifo'), '--format', 'json'], mode: 'shell', shell: (p) => `rm -f '${folder}/input.fifo' && mkfifo '${folder}/input.fifo' && { cat '${data}' > '${folder}/input.fifo' & } && ${p}; s=$?; wait; exit $s`, status: 0, json: (out) => expect(out.pairsTested === 1, 'no pair scanned'), engine: false });
  add({ name: 'streams: merge of two process substitutions', args: ['merge', '@INPUT@'], mode: 'shell', shell: (p) => substitute(p, `<(printf 'a,b,count\\nx,1,2\\n') <(printf 'a,b,count\\nx,1,3\\n')`), status: 0, stdout: /^a,b,count\nx,1,5\n$/, engine: false });
  add({ name: 'streams: invalid UTF-8 on a pipe names its line, counted as it streams', args: pair('@INPUT@'), mode: 'shell', shell: (p) => substitute(p, `<(printf 'a,b\\nx,1\\ny,2\\nx,\\377\\n')`), status: 1, stderr: /\/dev\/fd\/\d+: invalid UTF-8 at byte offset 14 \(line 4\)/, engine: false });
  add({ name: 'streams: a NUL byte on a pipe names its line', args: pair('@INPUT@'), mode: 'shell', shell: (p) => substitute(p, `<(printf 'a,b\\nx,1\\ny,\\000z\\n')`), status: 1, stderr: /NUL byte at byte offset 10 \(line 3\)/, engine: false });
  add({ name: 'streams: /dev/zero ends at its first byte', args: pair('/dev/zero'), status: 1, stderr: /\/dev\/zero: NUL byte at byte offset 0 \(line 1\)/, engine: false });
  add({ name: 'streams: gzip on standard input is decompressed', args: pair('-', '--format', 'json'), stdin: gzipSync(table), status: 0, json: theTable });
  add({ name: 'streams: truncated gzip on standard input', args: pair('-'), stdin: gzipSync(table).subarray(0, 25), status: 1, stderr: /^tabsight: standard input: not a readable gzip file \(unexpected end of file\); the file may be cut short$/ });

  // Byte-order marks split across reads of a pipe.
  const utf16 = (text, bigEndian) => {
    const bytes = Buffer.from(text, 'utf16le');
    if (bigEndian) bytes.swap16();
    return Buffer.concat([Buffer.from(bigEndian ? [0xfe, 0xff] : [0xff, 0xfe]), bytes]);
  };
  const quotedHeader = '"a",b\nx,1\ny,2\nx,2\ny,1\nx,1\n';
  add({ name: 'streams: a UTF-8 byte-order mark split across two reads', args: pair('-', '--format', 'json'), stdin: [Buffer.from([0xef]), Buffer.from([0xbb, 0xbf]), Buffer.from(quotedHeader)], status: 0, json: theTable });
  add({ name: 'streams: a UTF-16 byte-order mark split across two reads', args: pair('-', '--format', 'json'), stdin: (() => { const b = utf16(quotedHeader, false); return [b.subarray(0, 1), b.subarray(1, 3), b.subarray(3)]; })(), status: 0, json: theTable });
  add({ name: 'streams: UTF-16 big-endian split at every byte', args: pair('-', '--format', 'json'), stdin: [...utf16(quotedHeader, true)].map((b) => Buffer.from([b])), status: 0, json: theTable });
  add({ name: 'streams: a file shorter than a byte-order mark', args: pair(file('two-bytes.csv', 'a\n')), status: 2, stderr: /--cols "b": no such column/ });

  add({ name: 'streams: UTF-16 with an odd last byte', args: pair(file('odd-utf16.csv', Buffer.concat([utf16(table, false), Buffer.from([0x41])]))), status: 1, stderr: /odd-utf16\.csv: the UTF-16 text ends inside a character/ });
  add({ name: 'streams: UTF-16 with an unpaired surrogate', args: pair(file('surrogate-utf16.csv', Buffer.concat([utf16('a,b\nx,', false), Buffer.from([0x00, 0xd8, 0x31, 0x00, 0x0a, 0x00])]))), status: 1, stderr: /surrogate-utf16\.csv: invalid UTF-16 near byte/ });
  add({ name: 'streams: UTF-16 on standard input with an odd last byte', args: pair('-'), stdin: Buffer.concat([utf16(table, false), Buffer.from([0x41])]), status: 1, stderr: /standard input: the UTF-16 text ends inside a character/ });

  // Truncated and broken gzip.
  const whole = gzipSync(table);
  add({ name: 'streams: a truncated gzip file', args: pair(file('cut.csv.gz', whole.subarray(0, 25))), status: 1, stderr: /cut\.csv\.gz: not a readable gzip file \(unexpected end of file\)/ });
  add({ name: 'streams: gzip magic followed by garbage', args: pair(file('fake.csv.gz', Buffer.from([0x1f, 0x8b, 0x00, 0x01, 0x02, 0x03]))), status: 1, stderr: /fake\.csv\.gz: not a readable gzip file/ });
  mkdirSync(join(folder, 'gz'), { recursive: true });
  writeFileSync(join(folder, 'gz', 'part-1.csv.gz'), whole);
  writeFileSync(join(folder, 'gz', 'part-2.csv.gz'), whole.subarray(0, 25));
  add({ name: 'streams: a truncated gzip file in a pattern', args: pair(join(folder, 'gz', 'part-*.csv.gz')), status: 1, stderr: /part-2\.csv\.gz: not a readable gzip file/, engine: 'only' });
  add({ name: 'streams: a truncated gzip file in a pattern, scanned', args: ['scan', join(folder, 'gz', 'part-*.csv.gz')], status: 1, stderr: /part-2\.csv\.gz: not a readable gzip file/, engine: 'only' });

  // A name with [ ] that exists is that file, not a pattern (which would match the decoy).
  const bracketed = file('week[1].csv', table);
  file('week1.csv', 'a,b\nDECOY,1\nDECOY,2\nq,1\nq,2\n');
  add({ name: 'streams: a file name with [ ] that exists is that file', args: pair(bracketed, '--format', 'json'), status: 0, json: theTable });
  add({ name: 'streams: a file name with [ ] that exists is that file, scanned', args: ['scan', bracketed, '--format', 'json'], status: 0, json: (out) => expect(out.rows === 5 || out.input?.rowsRead === 5, `read ${JSON.stringify(out.input)}`) });
  add({
    name: 'streams: one more bracketed character forces a pattern (week[1].cs[v])',
    args: pair(join(folder, 'week[1].cs[v]'), '--format', 'json'),
    status: 0,
    json: (out) => expect(JSON.stringify(out.rows.levels) === '["DECOY","q"]', `read ${JSON.stringify(out.rows.levels)}`),
    engine: 'only',
  });
}
