// A scan's file read in byte ranges (io/readRecords.ts, RecordSplit; the
// ranges after the first by worker threads) must give the report the single
// reader gives, byte for byte: the same levels in the same first-seen order,
// the same counts, and the same messages (file, line, column) for a file
// with an error. The ranges are cut as io/parallelCount.ts cuts them, and
// checked the same way (test/io/parallelCount.test.ts).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { Readable } from 'node:stream';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { runScan, scanCommand, ScanPlan } from '../../src/cli/scan.js';
import type { CliIo, OutputStream } from '../../src/cli/output.js';
import { TabsightError } from '../../src/errors.js';
import { encodeRange, EncodeJob } from '../../src/io/rangeCount.js';
import { run } from '../cli/cliHelpers.js';

class Captured implements OutputStream {
  private readonly chunks: string[] = [];
  readonly isTTY = false;
  write(text: string, callback?: (error?: Error | null) => void): boolean {
    this.chunks.push(text);
    callback?.(null);
    return true;
  }
  once(): this {
    return this;
  }
  get text(): string {
    return this.chunks.join('');
  }
}

/** The scan of a file as JSON (or its one-line error), read by one thread, or in ranges cut at `cuts` (read in this thread). */
async function scan(path: string, args: string[], cuts: number[] | null, settled: boolean[] = []): Promise<string> {
  let plan: ScanPlan | null = null;
  await scanCommand((p) => (plan = p))
    .exitOverride()
    .parseAsync([path, '--format', 'json', '--engine', 'builtin', '--threads', '1', ...args], { from: 'user' });
  const chosen = plan as unknown as ScanPlan;
  const read = (job: EncodeJob) => {
    const range = encodeRange(job);
    settled.push(range.settled);
    return { result: Promise.resolve(range), stop: () => undefined };
  };
  if (cuts !== null) chosen.reader = { ...chosen.reader, scanRanges: { cuts, read } };
  const stdout = new Captured();
  const stderr = new Captured();
  const io: CliIo = { stdin: Object.assign(Readable.from([]), { isTTY: false }), stdout, stderr, env: {} };
  try {
    await runScan(chosen, io);
  } catch (error) {
    if (error instanceof TabsightError) return `error: ${error.message}\n${stderr.text}`;
    throw error;
  }
  return `${stdout.text}\n${stderr.text}`;
}

const values = ['x', 'y', 'z', 'NA', '', ' x ', 'q"q', 'two\nlines', 'a,b', 'é', '日本'];

interface ScanDocument {
  text: string;
  /** Byte offsets just inside quoted fields. */
  insideQuotes: number[];
}

/** A document of three categorical columns, a weight and a layer; quoted fields, embedded line ends, CRLF, blank lines, ragged rows, now and then a broken quote or a bad weight. */
const documents = fc
  .record({
    crlf: fc.boolean(),
    bom: fc.boolean(),
    finalNewline: fc.boolean(),
    rows: fc.array(
      fc.record({
        cells: fc.array(fc.constantFrom(...values), { minLength: 3, maxLength: 3 }),
        quote: fc.array(fc.boolean(), { minLength: 3, maxLength: 3 }),
        weight: fc.constantFrom('1', '2', '0.5', '3', '1', '2', '1', '0.25', '1', 'bad', ''),
        layer: fc.constantFrom('g1', 'g2', 'g2'),
        blankBefore: fc.constantFrom('', '', '', '', '', '\n'),
        ragged: fc.constantFrom(0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1),
        broken: fc.constantFrom(...new Array<number>(40).fill(0), 1),
      }),
      { minLength: 1, maxLength: 40 },
    ),
  })
  .map(({ crlf, bom, finalNewline, rows }): ScanDocument => {
    const eol = crlf ? '\r\n' : '\n';
    let text = (bom ? '\ufeff' : '') + `a,b,c,w,g${eol}`;
    const insideQuotes: number[] = [];
    rows.forEach((row, r) => {
      if (row.blankBefore) text += eol;
      const cells = row.cells.map((value, k) => {
        if (row.broken && k === 0) return `x"${value.replace(/"/g, '')}`;
        const needs = /[,"\r\n]/.test(value) || value !== value.trim() || value === '';
        return row.quote[k] || needs ? `"${value.replace(/"/g, '""')}"` : value;
      });
      const line = [...cells, row.weight, row.layer].slice(row.ragged).join(',');
      // Offsets just after each opening quote, counted in bytes.
      let at = Buffer.byteLength(text);
      for (const ch of line) {
        at += Buffer.byteLength(ch);
        if (ch === '"') insideQuotes.push(at);
      }
      text += line.replace(/\n/g, eol);
      if (r < rows.length - 1 || finalNewline) text += eol;
    });
    return { text, insideQuotes };
  });

const optionSets = fc.record({
  missing: fc.boolean(),
  skipBadRows: fc.boolean(),
  weight: fc.boolean(),
  by: fc.boolean(),
  recode: fc.boolean(),
  maxLevels: fc.constantFrom('50', '3'),
});

function argsOf(o: { missing: boolean; skipBadRows: boolean; weight: boolean; by: boolean; recode: boolean; maxLevels: string }): string[] {
  return [
    ...(o.missing ? ['--missing', 'NA'] : []),
    ...(o.skipBadRows ? ['--skip-bad-rows'] : []),
    ...(o.weight ? ['--weight', 'w'] : ['--exclude', 'w']),
    ...(o.by ? ['--by', 'g'] : []),
    ...(o.recode ? ['--recode', 'a:x=y,z=y'] : []),
    '--max-levels',
    o.maxLevels,
  ];
}

function fileWith(text: string): string {
  const path = join(mkdtempSync(join(tmpdir(), 'tabsight-scan-ranges-')), 'doc.csv');
  writeFileSync(path, text);
  return path;
}

describe('a scan read in byte ranges equals the scan read by one thread (JSON, byte for byte)', () => {
  it('on random documents cut at random offsets and inside quoted fields (errors, missing values, weights, --by, recodes, --max-levels)', async () => {
    const settled: boolean[] = [];
    await fc.assert(
      fc.asyncProperty(documents, optionSets, fc.array(fc.nat(), { minLength: 1, maxLength: 3 }), fc.array(fc.nat(), { maxLength: 2 }), async (document, options, cutSeeds, insideSeeds) => {
        const path = fileWith(document.text);
        const size = Buffer.byteLength(document.text);
        const inside = document.insideQuotes.length > 0 ? insideSeeds.map((seed) => document.insideQuotes[seed % document.insideQuotes.length]) : [];
        const cuts = [...cutSeeds.map((seed) => seed % (size + 1)), ...inside];
        const args = argsOf(options);
        expect(await scan(path, args, cuts, settled)).toBe(await scan(path, args, null));
      }),
      { numRuns: 120 },
    );
    // Most ranges settle; those of a file with an error send it back to one thread.
    expect(settled.filter((s) => s).length).toBeGreaterThan(settled.length / 2);
  });

  it('with many levels (two-byte codes), the levels of the later ranges first seen there, and values that only the later ranges hold', async () => {
    const lines = ['id,many,few,late'];
    for (let i = 0; i < 3000; i++) lines.push(`${i},m${(i * 7919) % 700},f${i % 4},${i < 2000 ? 'early' : `late${i % 3}`}`);
    const text = lines.join('\n') + '\n';
    const path = fileWith(text);
    const size = Buffer.byteLength(text);
    const args = ['--max-levels', '1000', '--exclude', 'id'];
    const single = await scan(path, args, null);
    expect(JSON.parse(single.split('\n\n')[0]).columnsScored).toEqual(['many', 'few', 'late']);
    const settled: boolean[] = [];
    for (const cuts of [[Math.floor(size / 2)], [size / 3, (2 * size) / 3].map(Math.floor), [100, 101, size - 5]]) expect(await scan(path, args, cuts, settled)).toBe(single);
    // Every range was read on its own and joined (none sent the file back to one thread).
    expect(settled).toEqual([true, true, true, true, true, true]);
  });

  it('names the line of an error in a later range as one thread does (a row with a field missing, a bad weight)', async () => {
    const lines = ['a,b,w'];
    for (let i = 0; i < 2000; i++) lines.push(i === 1500 ? 'x,1' : `x${i % 3},y${i % 5},${i === 1700 ? 'heavy' : '1'}`);
    const path = fileWith(lines.join('\n') + '\n');
    const cuts = [Math.floor(Buffer.byteLength(lines.join('\n')) / 2)];
    const ragged = await scan(path, ['--exclude', 'w'], cuts);
    expect(ragged).toMatch(/^error: .*line 1502: 2 fields where the header has 3/);
    expect(ragged).toBe(await scan(path, ['--exclude', 'w'], null));
    const weights = fileWith(lines.map((line, k) => (k === 1501 ? 'x,y,1' : line)).join('\n') + '\n');
    const weighted = await scan(weights, ['--weight', 'w'], cuts);
    expect(weighted).toMatch(/^error: .*line 1702/);
    expect(weighted).toBe(await scan(weights, ['--weight', 'w'], null));
  });

  it('--threads 2 reads a file in worker threads with the report of --threads 1 (the built worker; a quoted field with line ends across the cut)', async () => {
    const lines = ['id,group,answer,topic,w'];
    for (let i = 0; i < 20_000; i++) lines.push(`${i},g${i % 7},${i % 13 === 0 ? `"line one\nline, ""two"" ${i % 3}"` : `a${i % 5}`},t${(i * 31) % 4},${1 + (i % 3)}`);
    const path = fileWith(lines.join('\n') + '\n');
    for (const extra of [[], ['--weight', 'w', '--by', 'group'], ['--recode', 'answer:a1=a2', '--missing', 'a0']]) {
      const one = await run(['scan', path, '--format', 'json', '--exclude', 'id', '--threads', '1', ...extra]);
      const two = await run(['scan', path, '--format', 'json', '--exclude', 'id', '--threads', '2', ...extra]);
      expect(one.status).toBe(0);
      expect(two).toEqual(one);
    }
  });
});
