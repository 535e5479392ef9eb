// The embedded engine (--engine duckdb) against the built-in reader: the
// same JSON on the same input (every field but input.engine), on the demo
// file under every kind of option, on gzip, Parquet and many-file inputs,
// and on random CSV text. The reference is the built-in reader, itself
// tested against csv-parse and the published references elsewhere.
import { spawnSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { countTables, CountPlan } from '../../src/io/countTables.js';
import { run as engineRun } from '../../src/io/engine.js';
import { inputSource } from '../../src/io/source.js';
import type { ReaderOptions } from '../../src/io/readRecords.js';
import { BIN, DEMO, run, tempFile } from '../cli/cliHelpers.js';

function json(args: string[], env: Record<string, string> = {}): any {
  const result = spawnSync(process.execPath, [BIN, ...args, '--format', 'json'], { encoding: 'utf8', env: { ...process.env, ...env }, maxBuffer: 64 << 20 });
  if (result.status !== 0) throw new Error(`exit ${result.status}: ${result.stderr}`);
  return { out: JSON.parse(result.stdout), stderr: result.stderr };
}

/** The report without the field that names the engine. */
function withoutEngine(report: any): any {
  const copy = structuredClone(report);
  const strip = (o: any) => {
    if (o && typeof o === 'object') {
      if (o.input && typeof o.input === 'object') delete o.input.engine;
      for (const v of Object.values(o)) strip(v);
    }
  };
  strip(copy);
  return copy;
}

function sameBothWays(args: string[]) {
  const builtin = json([...args, '--engine', 'builtin']);
  const engine = json([...args, '--engine', 'duckdb']);
  expect(JSON.stringify(builtin.out)).toContain('"engine":"builtin"');
  expect(JSON.stringify(engine.out), engine.stderr).toContain('"engine":"duckdb"'); // no fallback on the demo
  expect(JSON.stringify(engine.out)).not.toContain('"engine":"builtin"');
  expect(withoutEngine(engine.out)).toEqual(withoutEngine(builtin.out));
}

describe('engine and built-in reader give the same report on the demo file', () => {
  const pairs: [string, string[]][] = [
    ['plain', ['--rows', 'age_band', '--cols', 'preferred_format']],
    ['sampling weights', ['--rows', 'branch', '--cols', 'membership', '--weight', 'survey_weight']],
    ['layers with weights', ['--rows', 'membership', '--cols', 'has_children', '--by', 'branch', '--weight', 'survey_weight']],
    ['filters, recodes, missing as a level', ['--rows', 'heard_via', '--cols', 'has_children', '--where', 'branch!=Old Town', '--recode', 'heard_via:poster=print ad,flyer=print ad', '--keep-missing']],
    ['ordinal, rare levels merged, a missing token', ['--rows', 'satisfaction', '--cols', 'visit_frequency', '--ordinal', '--other', '2', '--missing', '3']],
    ['frequencies', ['--rows', 'branch', '--cols', 'has_children', '--freq', 'satisfaction', '--skip-bad-rows']],
  ];
  for (const [name, args] of pairs) it(`pair: ${name}`, () => sameBothWays(['pair', DEMO, ...args]));
  const scans: [string, string[]][] = [
    ['every column', []],
    ['bins and weights', ['--bins', '4', '--weight', 'survey_weight', '--full']],
    ['a layer, a filter and a recode', ['--by', 'branch', '--where', 'has_children=yes', '--recode', 'heard_via:poster=print ad', '--columns', 'age_band,membership,preferred_format,heard_via']],
    ['missing as a level, rare levels merged', ['--keep-missing', '--other', '2', '--columns', 'age_band,heard_via,preferred_format,visit_frequency']],
  ];
  for (const [name, args] of scans) it(`scan: ${name}`, () => sameBothWays(['scan', DEMO, ...args]));
  it('compare: two periods of one file', () => sameBothWays(['compare', DEMO, '--rows', 'membership', '--cols', 'preferred_format', '--period', 'has_children']));
  it('count: the long format', () => {
    const a = run(['count', DEMO, '--rows', 'branch', '--cols', 'heard_via', '--by', 'age_band', '--engine', 'builtin']);
    const b = run(['count', DEMO, '--rows', 'branch', '--cols', 'heard_via', '--by', 'age_band', '--engine', 'duckdb']);
    expect(b.status, b.stderr).toBe(0);
    expect(b.stdout).toBe(a.stdout);
  });
});

describe('gzip, Parquet and patterns of many files', () => {
  const dir = join(tempFile('unused', ''), '..', 'engine-inputs');
  mkdirSync(dir, { recursive: true });
  const demo = readFileSync(DEMO);
  const gz = join(dir, 'patrons.csv.gz');
  writeFileSync(gz, gzipSync(demo));
  const lines = demo.toString('utf8').trimEnd().split('\n');
  const [header, ...body] = lines;
  const third = Math.ceil(body.length / 3);
  for (let k = 0; k < 3; k++) writeFileSync(join(dir, `part-${k}.csv`), [header, ...body.slice(k * third, (k + 1) * third)].join('\n') + '\n');
  const args = ['--rows', 'branch', '--cols', 'membership', '--by', 'age_band', '--weight', 'survey_weight'];
  const reference = json(['pair', DEMO, ...args, '--engine', 'builtin']).out;
  const comparable = (r: any) => {
    const c = withoutEngine(r);
    for (const key of ['file', 'files', 'format', 'delimiter']) delete c.input[key];
    return c;
  };

  it('a gzip file reads the same with either engine, and as the plain file', () => {
    for (const engine of ['builtin', 'duckdb']) {
      const out = json(['pair', gz, ...args, '--engine', engine]).out;
      expect(out.input.engine).toBe(engine);
      expect(comparable(out)).toEqual(comparable(reference));
    }
  });

  it('three files by a pattern give the analysis of the whole file (auto picks the engine)', () => {
    const out = json(['pair', join(dir, 'part-*.csv'), ...args]).out;
    expect(out.input).toMatchObject({ engine: 'duckdb', files: 3, rowsRead: reference.input.rowsRead });
    expect(comparable(out)).toEqual(comparable(reference));
  });

  it('Parquet (text columns, and typed columns for the weight) gives the analysis of the CSV file', async () => {
    const text = join(dir, 'patrons-text.parquet');
    const typed = join(dir, 'patrons-typed.parquet');
    await engineRun(`COPY (SELECT * FROM read_csv('${DEMO}', all_varchar = true)) TO '${text}' (FORMAT parquet)`);
    await engineRun(`COPY (SELECT * REPLACE (CAST(survey_weight AS DOUBLE) AS survey_weight) FROM read_csv('${DEMO}', all_varchar = true)) TO '${typed}' (FORMAT parquet)`);
    for (const file of [text, typed]) {
      const out = json(['pair', file, ...args]).out;
      expect(out.input).toMatchObject({ engine: 'duckdb', format: 'parquet', delimiter: null, blankLines: 0 });
      expect(comparable(out)).toEqual(comparable(reference));
    }
    const scanned = json(['scan', text, '--bins', '3']).out;
    const scannedCsv = json(['scan', DEMO, '--bins', '3', '--engine', 'builtin']).out;
    expect(comparable(scanned)).toEqual(comparable(scannedCsv));
  });

  it('files of one pattern with different headers are refused in one line', () => {
    writeFileSync(join(dir, 'odd-1.csv'), 'a,b\nx,y\n');
    writeFileSync(join(dir, 'odd-2.csv'), 'a,c\nx,y\n');
    const r = run(['pair', join(dir, 'odd-*.csv'), '--rows', 'a', '--cols', 'b']);
    expect(r.status).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/odd-2\.csv: its header differs from that of .*odd-1\.csv/);
  });

  it('engine errors become the tool\'s own one-line messages', () => {
    const notParquet = join(dir, 'broken.parquet');
    writeFileSync(notParquet, 'this is not parquet');
    const cases: [string[], number, RegExp][] = [
      [['pair', join(dir, 'none-*.csv'), '--rows', 'a', '--cols', 'b'], 1, /no file matches this pattern/],
      [['pair', join(dir, 'missing.parquet'), '--rows', 'a', '--cols', 'b'], 1, /missing\.parquet: no such file/],
      [['pair', notParquet, '--rows', 'a', '--cols', 'b'], 1, /broken\.parquet: not a readable Parquet input/],
      [['pair', join(dir, 'part-*.csv'), '--rows', 'branch', '--cols', 'nope'], 2, /--cols "nope"/],
      [['pair', '-', '--rows', 'a', '--cols', 'b', '--engine', 'duckdb'], 2, /reads files, not standard input/],
    ];
    for (const [args2, status, message] of cases) {
      const r = run(args2, 'a,b\n1,2\n');
      expect(r.status, r.stderr).toBe(status);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(message);
      expect(r.stderr).not.toMatch(/\n\s+at /);
    }
  });

  it('without the optional package, --engine duckdb says how to add it and auto uses the built-in reader', () => {
    const env = { TABSIGHT_ENGINE_MODULE: '@tabsight/absent-engine' };
    const r = spawnSync(process.execPath, [BIN, 'pair', DEMO, '--rows', 'branch', '--cols', 'membership', '--engine', 'duckdb'], { encoding: 'utf8', env: { ...process.env, ...env } });
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/npm install @duckdb\/node-api@/);
    const auto = json(['pair', DEMO, '--rows', 'branch', '--cols', 'membership'], env);
    expect(auto.out.input.engine).toBe('builtin');
  });
});

describe('the portable SQL, run in the engine, gives the direct analysis back through --freq', () => {
  it.each([
    ['counts', [] as string[]],
    ['sampling weights', ['--weight', 'survey_weight']],
  ])('%s', async (_name, extra) => {
    const sql = run(['sql', '--rows', 'branch', '--cols', 'membership', '--by', 'age_band', '--table', 'patrons', '--missing', 'NA', ...extra]);
    expect(sql.status, sql.stderr).toBe(0);
    const cells = tempFile(`cells-${extra.length}.csv`, '');
    await engineRun(`CREATE OR REPLACE TABLE patrons AS SELECT * FROM read_csv('${DEMO}', all_varchar = true)`);
    await engineRun(`COPY (${sql.stdout.replace(/;\s*$/, '')}) TO '${cells}' (HEADER, DELIMITER ',')`);
    const readBack = extra.length > 0 ? ['--freq', 'count', '--summed-weights', 'weight_sum,weight_square_sum'] : ['--freq', 'count'];
    const viaSql = json(['pair', cells, '--rows', 'branch', '--cols', 'membership', '--by', 'age_band', ...readBack]).out;
    const direct = json(['pair', DEMO, '--rows', 'branch', '--cols', 'membership', '--by', 'age_band', '--missing', 'NA', ...extra]).out;
    if (extra.length === 0) {
      for (const key of ['counts', 'n', 'tests', 'measures', 'stratified']) expect(viaSql[key]).toEqual(direct[key]);
      expect(viaSql.strata.map((s: any) => [s.level, s.counts, s.tests])).toEqual(direct.strata.map((s: any) => [s.level, s.counts, s.tests]));
    } else {
      // A warehouse adds floating-point weights in its own order: equal to about 1e-15, not to the bit.
      const close = (x: any, y: any) => {
        if (typeof x === 'number') expect(Math.abs(x - y)).toBeLessThanOrEqual(1e-11 * Math.max(1, Math.abs(y)));
        else if (x && typeof x === 'object') for (const k of Object.keys(y)) close(x[k], y[k]);
        else expect(x).toEqual(y);
      };
      for (const key of ['counts', 'effectiveN', 'tests', 'measures']) close(viaSql[key], direct[key]);
    }
  });
});

describe('random CSV text: the engine counts what the built-in reader counts', () => {
  const base: ReaderOptions = { missing: ['NA'], skipBadRows: false, header: true };
  const plan: CountPlan = { rows: 'a', cols: 'b', weight: { column: 'w', kind: 'weight' }, decimalComma: false, where: [], recodes: [], keepMissing: true, maxLevels: 200, allowDegenerate: true };
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
        const builtin = await countTables(source, { ...base, engine: 'builtin' }, plan).catch((e: Error) => e);
        const engine = await countTables(source, { ...base, engine: 'duckdb', onNote: () => (fellBack = true) }, plan).catch((e: Error) => e);
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
      { numRuns: 60, seed: 20261202 },
    );
    // Most random files are read by the engine itself, not handed back.
    expect(engineUsed).toBeGreaterThan(30);
  }, 120_000);
});
