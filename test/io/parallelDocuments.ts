/**
 * Random CSV documents and the check that counting one in byte ranges (the
 * threads of io/parallelCount.ts) equals the single reader, shared by the
 * fast property test and the larger one of the slow tier.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { expect } from 'vitest';
import { tallyInParallel } from '../../src/io/parallelCount.js';
import { countRange } from '../../src/io/rangeCount.js';
import { readRecords, ReaderOptions } from '../../src/io/readRecords.js';

const value = fc.array(fc.constantFrom('a', 'b', 'Z', '1', ' ', ',', ';', '"', '\n', '\r\n', 'é', '日', 'x y', ''), { maxLength: 4 }).map((parts) => parts.join(''));

export interface Document {
  text: string;
  delimiter: string;
  /** Byte offsets inside quoted fields (just after a quote or an embedded line end). */
  insideQuotes: number[];
}

/** A document: a header of `width` names, rows of random values (quoted when needed or at random), LF or CRLF, blank lines, ragged rows and broken quotes now and then. */
export function documentArbitrary(maxRows: number): fc.Arbitrary<{ document: Document; cutSeeds: number[]; insideSeeds: number[] }> {
  return fc
    .record({
      delimiter: fc.constantFrom(',', ';', '\t'),
      width: fc.integer({ min: 2, max: 4 }),
      crlf: fc.boolean(),
      finalNewline: fc.boolean(),
      bom: fc.boolean(),
    })
    .chain((shape) =>
      fc.record({
        shape: fc.constant(shape),
        rows: fc.array(
          fc.record({
            cells: fc.array(fc.record({ value, quote: fc.boolean() }), { minLength: shape.width, maxLength: shape.width }),
            blankBefore: fc.constantFrom('', '', '', '', '\n', '  \n'),
            ragged: fc.constantFrom(0, 0, 0, 0, 0, 0, 0, 0, 0, 1),
            broken: fc.constantFrom(0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0, 1),
          }),
          { minLength: 1, maxLength: maxRows },
        ),
        cutSeeds: fc.array(fc.nat(), { maxLength: 4 }),
        insideSeeds: fc.array(fc.nat(), { maxLength: 3 }),
      }),
    )
    .map(({ shape, rows, cutSeeds, insideSeeds }) => {
      const eol = shape.crlf ? '\r\n' : '\n';
      const parts: string[] = [shape.bom ? '\ufeff' : '', Array.from({ length: shape.width }, (_v, k) => `c${k}`).join(shape.delimiter), eol];
      const insideQuotes: number[] = [];
      let length = Buffer.byteLength(parts.join(''));
      const add = (text: string) => {
        parts.push(text);
        length += Buffer.byteLength(text);
      };
      rows.forEach((row, r) => {
        if (row.blankBefore) add(row.blankBefore.replace('\n', eol));
        const cells = row.ragged ? row.cells.slice(1) : row.cells;
        cells.forEach((cell, k) => {
          if (k > 0) add(shape.delimiter);
          const needs = /[,;\t"\r\n]/.test(cell.value) || cell.value.trim() === '' || cell.value !== cell.value.trim();
          if (row.broken && k === 0) add(`x"${cell.value.replace(/"/g, '')}`);
          else if (cell.quote || needs) {
            add('"');
            insideQuotes.push(length);
            for (const ch of cell.value) {
              add(ch === '"' ? '""' : ch);
              if (ch === '\n') insideQuotes.push(length);
            }
            add('"');
          } else add(cell.value);
        });
        if (r < rows.length - 1 || shape.finalNewline) add(eol);
      });
      return { document: { text: parts.join(''), delimiter: shape.delimiter, insideQuotes }, cutSeeds, insideSeeds };
    });
}

/** Label combinations and their rows, as one sorted list, with what was read. */
type Counted = { rows: string[]; records: number; blankLines: number; badRows: number };

function sorted(map: Map<string, number>): string[] {
  return [...map.entries()].map(([k, v]) => `${k}=${v}`).sort();
}

const options = (delimiter: string): ReaderOptions => ({ missing: ['NA'], skipBadRows: true, header: true, delimiter });

/** The single reader's counts of columns 0 and 1 (label combinations, missing as ""). */
async function single(path: string, delimiter: string): Promise<Counted | Error> {
  const combos = new Map<string, number>();
  try {
    const read = await readRecords({ path, label: path }, options(delimiter), () => [1, 0], (ids, _line, _texts, interners) => {
      const key = JSON.stringify([...ids].map((id, slot) => (id === 0 ? '' : interners[slot].labels[id - 1])));
      combos.set(key, (combos.get(key) ?? 0) + 1);
    });
    return { rows: sorted(combos), records: read.records, blankLines: read.blankLines, badRows: read.badRows };
  } catch (error) {
    return error as Error;
  }
}

/**
 * Counts the document in ranges cut at the given offsets (in this thread,
 * or in this thread and a worker taking them in turn) and checks it against the single reader: equal counts, or (only when the
 * ranges did not settle) null. Says whether the ranges settled, and if not
 * whether the file has an error (which must never settle).
 */
export async function checkRanges(document: Document, cuts: number[], inWorkers = false): Promise<'settled' | 'error' | 'fallback'> {
  const dir = mkdtempSync(join(tmpdir(), 'tabsight-ranges-'));
  const path = join(dir, 'doc.csv');
  writeFileSync(path, document.text);
  const expected = await single(path, document.delimiter);
  let result;
  try {
    // In worker threads, the pieces are taken in turn from the shared queue by this thread and one worker.
    result = await tallyInParallel({ path, label: path }, options(document.delimiter), () => [1, 0], 2, inWorkers ? { cuts } : { cuts, run: async (job) => countRange(job) });
  } catch (error) {
    // Only an error of the header part (read by the single reader itself) may surface here.
    expect(expected).toBeInstanceOf(Error);
    expect((error as Error).message).toBe((expected as Error).message);
    return 'error';
  }
  if (result === null) return expected instanceof Error ? 'error' : 'fallback';
  expect(expected).not.toBeInstanceOf(Error);
  const combos = new Map<string, number>();
  result.forEach((ids, rows) => {
    const key = JSON.stringify([...ids].map((id, slot) => (id === 0 ? '' : result.labels[slot][id - 1])));
    combos.set(key, (combos.get(key) ?? 0) + rows);
  });
  const ours: Counted = { rows: sorted(combos), records: result.summary.records, blankLines: result.summary.blankLines, badRows: result.summary.badRows };
  expect(ours).toEqual(expected);
  return 'settled';
}

/** Cuts for a document: some anywhere, some just inside a quoted field. */
export function cutsFor(document: Document, cutSeeds: number[], insideSeeds: number[]): number[] {
  const size = Buffer.byteLength(document.text);
  const anywhere = cutSeeds.map((seed) => seed % (size + 1));
  const inside = document.insideQuotes.length > 0 ? insideSeeds.map((seed) => document.insideQuotes[seed % document.insideQuotes.length]) : [];
  return [...anywhere, ...inside];
}
