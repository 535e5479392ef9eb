import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { tallyInParallel } from '../../src/io/parallelCount.js';
import { firstRecordAfter, insideQuotesAt } from '../../src/io/rangeCount.js';
import { openSync, closeSync } from 'node:fs';
import { checkRanges, cutsFor, documentArbitrary } from './parallelDocuments.js';

describe('counting a file in byte ranges (threads) equals the single reader', () => {
  it('on random documents cut at random offsets and inside quoted fields (quotes, embedded line ends, CRLF, blank lines, ragged and broken rows)', async () => {
    const outcomes = { settled: 0, error: 0, fallback: 0 };
    await fc.assert(
      fc.asyncProperty(documentArbitrary(12), async ({ document, cutSeeds, insideSeeds }) => {
        outcomes[await checkRanges(document, cutsFor(document, cutSeeds, insideSeeds))]++;
      }),
      { numRuns: 150 },
    );
    // A valid file always settles in ranges (a wrong quote-state guess is counted again); only a file with an error goes to the single reader.
    expect(outcomes.fallback).toBe(0);
    expect(outcomes.settled).toBeGreaterThan(0);
  });

  it('with a worker thread and this one taking the pieces in turn from a shared queue, on random documents cut at many offsets', async () => {
    const outcomes = { settled: 0, error: 0, fallback: 0 };
    await fc.assert(
      fc.asyncProperty(documentArbitrary(12), fc.array(fc.nat(), { minLength: 4, maxLength: 12 }), async ({ document, cutSeeds, insideSeeds }, more) => {
        outcomes[await checkRanges(document, cutsFor(document, [...cutSeeds, ...more], insideSeeds), true)]++;
      }),
      { numRuns: 25 },
    );
    expect(outcomes.fallback).toBe(0);
    expect(outcomes.settled).toBeGreaterThan(0);
  });

  it('judges the quote state at a cut from the quotes after it (RFC 4180 §2: a closing quote is followed by a delimiter or line end)', () => {
    const bytes = (s: string) => Buffer.from(s);
    expect(insideQuotesAt(bytes('abc",x\n'), 0, 0x61, 44)).toBe(true); // "abc" closes after the cut
    expect(insideQuotesAt(bytes('x,"a\nb",y\n'), 0, 0x0a, 44)).toBe(false); // opens after the cut
    expect(insideQuotesAt(bytes('plain,line\n'), 0, 0x0a, 44)).toBe(false);
  });

  it('starts a range at the first record boundary at or after its cut, also when the cut falls between CR and LF', () => {
    const dir = mkdtempSync(join(tmpdir(), 'tabsight-first-'));
    const path = join(dir, 'crlf.csv');
    const text = 'a,b\r\n1,"x\r\ny"\r\n2,z\r\n';
    writeFileSync(path, text);
    const fd = openSync(path, 'r');
    try {
      const size = Buffer.byteLength(text);
      expect(firstRecordAfter(fd, text.indexOf('1'), size, 44)).toBe(text.indexOf('1')); // a boundary itself
      expect(firstRecordAfter(fd, text.indexOf('x') + 2, size, 44)).toBe(text.indexOf('2')); // inside the quoted field, at its LF
      expect(firstRecordAfter(fd, text.indexOf('2') - 1, size, 44)).toBe(text.indexOf('2')); // between CR and LF
    } finally {
      closeSync(fd);
    }
  });

  it('in worker threads, on a file of 20,000 rows with quoted multi-line fields: the same tally as one range', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'tabsight-workers-'));
    const path = join(dir, 'big.csv');
    const lines = ['id,group,answer'];
    for (let i = 0; i < 20_000; i++) lines.push(`${i},g${i % 7},${i % 13 === 0 ? `"line one\nline, ""two"" ${i % 3}"` : `a${i % 5}`}`);
    writeFileSync(path, lines.join('\n') + '\n');
    const reader = { missing: [], skipBadRows: false, header: true };
    const select = () => [1, 2];
    const collect = async (threads: number) => {
      const result = await tallyInParallel({ path, label: path }, reader, select, threads);
      expect(result).not.toBeNull();
      const out = new Map<string, number>();
      result!.forEach((ids, rows) => {
        const key = `${result!.labels[0][ids[0] - 1]}|${result!.labels[1][ids[1] - 1]}`;
        out.set(key, (out.get(key) ?? 0) + rows);
      });
      return { rows: [...out].sort(), records: result!.summary.records };
    };
    const one = await collect(1);
    expect(await collect(3)).toEqual(one);
    expect(one.records).toBe(20_000);
  });
});
