// The embedded engine (--engine duckdb) against the built-in reader: the
// same JSON on the same input (every field but input.engine), on the demo
// file under every kind of option, on gzip, Parquet and many-file inputs
// (random CSV text: engine.slow.test.ts). The reference is the built-in reader, itself
// tested against csv-parse and the published references elsewhere.
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { gzipSync } from 'node:zlib';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { openEngine } from '../../src/io/engine/module.js';
import { ROOT } from '../helpers.js';
import { DEMO, run, runJson, tempFile } from '../cli/cliHelpers.js';
import { describeEngine } from '../engineHelpers.js';

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

async function sameBothWays(args: string[]) {
  const builtin = await runJson([...args, '--engine', 'builtin']);
  const engine = await run([...args, '--engine', 'duckdb', '--format', 'json']);
  expect(engine.status, engine.stderr).toBe(0);
  expect(engine.stderr).toBe(''); // no fallback on the demo
  const viaEngine = JSON.parse(engine.stdout);
  expect(JSON.stringify(builtin)).toContain('"engine":"builtin"');
  expect(JSON.stringify(viaEngine)).toContain('"engine":"duckdb"');
  expect(JSON.stringify(viaEngine)).not.toContain('"engine":"builtin"');
  expect(withoutEngine(viaEngine)).toEqual(withoutEngine(builtin));
}

describeEngine('engine and built-in reader give the same report on the demo file', () => {
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
  it('count: the long format', async () => {
    const a = await run(['count', DEMO, '--rows', 'branch', '--cols', 'heard_via', '--by', 'age_band', '--engine', 'builtin']);
    const b = await run(['count', DEMO, '--rows', 'branch', '--cols', 'heard_via', '--by', 'age_band', '--engine', 'duckdb']);
    expect(b.status, b.stderr).toBe(0);
    expect(b.stdout).toBe(a.stdout);
  });
});

describeEngine('the engine bins, merges and notes as the built-in reader does on a real coded export (ANES 1996, statsmodels)', () => {
  const anes = join(ROOT, 'fixtures', 'anes96', 'anes96.csv');
  it('scan --bins 5: every numeric column with more than 5 values binned alike', () => sameBothWays(['scan', anes, '--bins', '5', '--full']));
  it('scan --other 8 rescues the columns past --max-levels alike', () => sameBothWays(['scan', anes, '--other', '8', '--columns', 'age,popul,vote', '--full']));
  it('a numeric column with "NA": the same bins, the same note', async () => {
    const csv = 'age,g\n' + Array.from({ length: 80 }, (_v, i) => `${i % 7 === 0 ? 'NA' : i % 11 === 0 ? '.' : 20 + ((i * 13) % 57)},${i % 3 ? 'x' : 'y'}`).join('\n') + '\n';
    const data = tempFile('engine-ages-na.csv', csv);
    for (const args of [['--bins', '4'], ['--max-levels', '10']]) {
      const builtin = await run(['scan', data, ...args, '--format', 'json', '--engine', 'builtin']);
      const engine = await run(['scan', data, ...args, '--format', 'json', '--engine', 'duckdb']);
      expect(engine.status, engine.stderr).toBe(0);
      expect(engine.stderr).toBe(builtin.stderr);
      expect(builtin.stderr).toContain('"NA"');
      expect(withoutEngine(JSON.parse(engine.stdout))).toEqual(withoutEngine(JSON.parse(builtin.stdout)));
    }
  });
});

describeEngine('gzip, Parquet and patterns of many files', () => {
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
  let reference: any = null;
  const referenceReport = async () => (reference ??= await runJson(['pair', DEMO, ...args, '--engine', 'builtin']));
  const comparable = (r: any) => {
    const c = withoutEngine(r);
    for (const key of ['file', 'files', 'format', 'delimiter']) delete c.input[key];
    return c;
  };

  it('a gzip file reads the same with either engine, and as the plain file', async () => {
    for (const engine of ['builtin', 'duckdb']) {
      const out = await runJson(['pair', gz, ...args, '--engine', engine]);
      expect(out.input.engine).toBe(engine);
      expect(comparable(out)).toEqual(comparable(await referenceReport()));
    }
  });

  it('three files by a pattern give the analysis of the whole file (auto picks the engine)', async () => {
    const out = await runJson(['pair', join(dir, 'part-*.csv'), ...args]);
    expect(out.input).toMatchObject({ engine: 'duckdb', files: 3, rowsRead: (await referenceReport()).input.rowsRead });
    expect(comparable(out)).toEqual(comparable(await referenceReport()));
  });

  it('Parquet (text columns, and typed columns for the weight) gives the analysis of the CSV file', async () => {
    const text = join(dir, 'patrons-text.parquet');
    const typed = join(dir, 'patrons-typed.parquet');
    await (await openEngine()).query(`COPY (SELECT * FROM read_csv('${DEMO}', all_varchar = true)) TO '${text}' (FORMAT parquet)`);
    await (await openEngine()).query(`COPY (SELECT * REPLACE (CAST(survey_weight AS DOUBLE) AS survey_weight) FROM read_csv('${DEMO}', all_varchar = true)) TO '${typed}' (FORMAT parquet)`);
    for (const file of [text, typed]) {
      const out = await runJson(['pair', file, ...args]);
      expect(out.input).toMatchObject({ engine: 'duckdb', format: 'parquet', delimiter: null, blankLines: 0 });
      expect(comparable(out)).toEqual(comparable(await referenceReport()));
    }
    const scanned = await runJson(['scan', text, '--bins', '3']);
    const scannedCsv = await runJson(['scan', DEMO, '--bins', '3', '--engine', 'builtin']);
    expect(comparable(scanned)).toEqual(comparable(scannedCsv));
  });

  it('files of one pattern with different headers are refused in one line', async () => {
    writeFileSync(join(dir, 'odd-1.csv'), 'a,b\nx,y\n');
    writeFileSync(join(dir, 'odd-2.csv'), 'a,c\nx,y\n');
    const r = await run(['pair', join(dir, 'odd-*.csv'), '--rows', 'a', '--cols', 'b']);
    expect(r.status).toBe(1);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/odd-2\.csv: its header differs from that of .*odd-1\.csv/);
  });

  it('engine errors become the tool\'s own one-line messages', async () => {
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
      const r = await run(args2, 'a,b\n1,2\n');
      expect(r.status, r.stderr).toBe(status);
      expect(r.stderr.trim().split('\n')).toHaveLength(1);
      expect(r.stderr).toMatch(message);
      expect(r.stderr).not.toMatch(/\n\s+at /);
    }
  });
});

describe('without the optional engine package (a machine where npm ci --omit=optional ran)', () => {
  // TABSIGHT_ENGINE_MODULE names a module that does not exist, standing for the missing package.
  const env = { TABSIGHT_ENGINE_MODULE: '@tabsight/absent-engine' };
  it('--engine duckdb says in one line how to add it, and auto uses the built-in reader', async () => {
    const r = await run(['pair', DEMO, '--rows', 'branch', '--cols', 'membership', '--engine', 'duckdb'], undefined, env);
    expect(r.status).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/npm install @duckdb\/node-api@/);
    const auto = await runJson(['pair', DEMO, '--rows', 'branch', '--cols', 'membership'], undefined, env);
    expect(auto.input.engine).toBe('builtin');
  });

  it('the install hint names the version package.json pins', async () => {
    const { optionalDependencies } = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
    const r = await run(['scan', DEMO, '--engine', 'duckdb'], undefined, env);
    expect(r.stderr).toContain(`npm install @duckdb/node-api@${optionalDependencies['@duckdb/node-api']}`);
  });
});

describeEngine('the portable SQL, run in the engine, gives the direct analysis back through --freq', () => {
  it.each([
    ['counts', [] as string[]],
    ['sampling weights', ['--weight', 'survey_weight']],
  ])('%s', async (_name, extra) => {
    const sql = await run(['sql', '--rows', 'branch', '--cols', 'membership', '--by', 'age_band', '--table', 'patrons', '--missing', 'NA', ...extra]);
    expect(sql.status, sql.stderr).toBe(0);
    const cells = tempFile(`cells-${extra.length}.csv`, '');
    await (await openEngine()).query(`CREATE OR REPLACE TABLE patrons AS SELECT * FROM read_csv('${DEMO}', all_varchar = true)`);
    await (await openEngine()).query(`COPY (${sql.stdout.replace(/;\s*$/, '')}) TO '${cells}' (HEADER, DELIMITER ',')`);
    const readBack = extra.length > 0 ? ['--freq', 'count', '--summed-weights', 'weight_sum,weight_square_sum'] : ['--freq', 'count'];
    const viaSql = await runJson(['pair', cells, '--rows', 'branch', '--cols', 'membership', '--by', 'age_band', ...readBack]);
    const direct = await runJson(['pair', DEMO, '--rows', 'branch', '--cols', 'membership', '--by', 'age_band', '--missing', 'NA', ...extra]);
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
