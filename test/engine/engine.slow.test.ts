// Slow tier (npm run test:slow): the engine against the built-in reader on
// random CSV text (quotes, padding, missing tokens, blank lines, CRLF,
// weights): the same tables, sums and counts, or the built-in reader
// decides (the engine hands the file back, or both refuse it alike).
import fc from 'fast-check';
import { expect, it } from 'vitest';
import { countTable, TableRequest } from '../../src/io/counting.js';
import { inputSource } from '../../src/io/source.js';
import type { ReaderOptions } from '../../src/io/readRecords.js';
import { tempFile } from '../cli/cliHelpers.js';
import { describeEngine } from '../engineHelpers.js';

describeEngine('random CSV text: the engine counts what the built-in reader counts', () => {
  const base: ReaderOptions = { missing: ['NA'], skipBadRows: false, header: true };
  const plan: TableRequest = { rows: 'a', cols: 'b', weight: { column: 'w', kind: 'weight' }, decimalComma: false, where: [], recodes: [], keepMissing: true, maxLevels: 200, allowDegenerate: true };
  const value = fc.oneof(
    fc.constantFrom('x', 'y', ' x ', 'x\t', 'NA', '', '"x"', '"y, z"', '"line\nbreak"', '"say ""hi"""', 'é', ' ', '"  "'),
    fc.stringMatching(/^[a-c]{1,2}$/),
  );
  const weight = fc.oneof(fc.constantFrom('1', '0', '2.5', '1e-3', '0.1', '7'), fc.double({ min: 0, max: 1e6, noNaN: true }).map((w) => String(w)));
  it('same tables, sums and counts, or the built-in reader decides', async () => {
    let engineUsed = 0;
    let runs = 0;
    await fc.assert(
      fc.asyncProperty(fc.array(fc.tuple(value, value, weight), { minLength: 1, maxLength: 60 }), fc.constantFrom('\n', '\r\n'), fc.boolean(), async (rows, eol, blank) => {
        const lines = ['a,b,w', ...rows.map(([a, b, w]) => `${a},${b},${w}`)];
        if (blank) lines.splice(1 + Math.floor(lines.length / 2), 0, '');
        const path = tempFile(`random-${runs++}.csv`, lines.join(eol) + eol);
        const source = inputSource(path);
        let fellBack = false;
        const builtin = await countTable(source, { ...base, engine: 'builtin' }, plan).catch((e: Error) => e);
        const engine = await countTable(source, { ...base, engine: 'duckdb', onNote: () => (fellBack = true) }, plan).catch((e: Error) => e);
        if (builtin instanceof Error) {
          expect(engine).toBeInstanceOf(Error);
          expect((engine as Error).message).toBe(builtin.message);
          return;
        }
        if (engine instanceof Error) throw engine;
        if (!fellBack) engineUsed++;
        expect(engine.summary.engine).toBe(fellBack ? 'builtin' : 'duckdb');
        const summary = (c: typeof builtin) => [c.summary.header, c.summary.delimiter, c.summary.records, c.summary.blankLines, c.summary.badRows];
        expect(summary(engine)).toEqual(summary(builtin));
        expect(engine.table).toEqual(builtin.table);
        expect(engine.weighting).toEqual(builtin.weighting);
        expect([engine.excluded, engine.filtered, engine.badWeights]).toEqual([builtin.excluded, builtin.filtered, builtin.badWeights]);
      }),
      { numRuns: 400, seed: 20261202 },
    );
    // Most random files are read by the engine itself, not handed back.
    expect(engineUsed).toBeGreaterThan(200);
  });
});
