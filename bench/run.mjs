#!/usr/bin/env node
// npm run bench: tabsight against the route a data team would write instead
// (pandas reading the CSV + scipy's chi2_contingency, bench/reference_route.py),
// measured in the same run as whole-process wall time, median of several runs,
// reported as ratios. Generates its seeded files in bench/data/ (not in git).
// Options: --runs N (default 5), --quick (3 runs, no 10x memory file),
// --only banner (the banner scenario alone).
import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { cpus } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { bannerFile, DATA, pairFile, scanFile, surveyFile } from './generate.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..');
const bin = join(root, 'bin', 'tabsight.js');
const args = process.argv.slice(2);
const quick = args.includes('--quick');
const only = args.includes('--only') ? args[args.indexOf('--only') + 1] : null;
const runs = Number(args[args.indexOf('--runs') + 1]) || (quick ? 3 : 5);
const python = '/usr/bin/python3';

function ensureReference() {
  const check = () => spawnSync(python, ['-c', 'import pandas, scipy, statsmodels'], { stdio: 'ignore' }).status === 0;
  if (check()) return;
  console.log('installing the reference route: apt-get install python3-pandas python3-scipy python3-statsmodels');
  spawnSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  spawnSync('apt-get', ['install', '-y', '-qq', 'python3-pandas', 'python3-scipy', 'python3-statsmodels'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
  if (!check()) throw new Error('the reference route (Debian python3-pandas, python3-scipy, python3-statsmodels) could not be installed');
}

const hasTime = existsSync('/usr/bin/time');

/** Runs a command once; returns wall seconds and peak resident memory in MB (when /usr/bin/time exists). */
function once(command, commandArgs) {
  const full = hasTime ? ['/usr/bin/time', ['-f', '%M', command, ...commandArgs]] : [command, commandArgs];
  const started = process.hrtime.bigint();
  const result = spawnSync(full[0], full[1], { encoding: 'utf8', maxBuffer: 1 << 28 });
  const seconds = Number(process.hrtime.bigint() - started) / 1e9;
  if (result.status !== 0) throw new Error(`${command} ${commandArgs.join(' ')} failed: ${result.stderr}`);
  const peak = hasTime ? Number(result.stderr.trim().split('\n').pop()) / 1024 : null;
  return { seconds, peak };
}

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

/** Alternates the two routes run by run so that drift on the machine hits both alike. */
function compare(name, ours, theirs, goal) {
  const a = [];
  const b = [];
  for (let k = 0; k < runs; k++) {
    a.push(once(...ours));
    b.push(once(...theirs));
  }
  const mine = median(a.map((r) => r.seconds));
  const reference = median(b.map((r) => r.seconds));
  const ratio = mine / reference;
  return { name, mine, reference, ratio, goal, met: ratio <= goal, peak: median(a.map((r) => r.peak ?? 0)) };
}

async function benchBanner() {
  // The banner: 100,000 respondents × 60 questions × 5 break variables (25
  // break columns), weighted, as text and as a spreadsheet, against the
  // dataframe route (bench/banner_reference.py: pandas crosstabs normalised per
  // column, chi2_contingency, statsmodels' z-test per pair of columns in a loop).
  const banner = await bannerFile();
  const bannerBreaks = 'age_band,region,membership,income_band,household';
  const bannerArgs = (extra) => [bin, 'banner', banner, '--break', bannerBreaks, '--weight', 'weight', ...extra];
  const bannerReference = [python, [join(here, 'banner_reference.py'), banner, bannerBreaks, 'weight', join(DATA, 'banner-reference-out.csv')]];
  const bannerText = compare('banner text, 100k x 60 q x 25 cols', [process.execPath, bannerArgs(['--output', join(DATA, 'banner-out.txt')])], bannerReference, 0.1);
  const bannerXlsx = compare('banner xlsx, 100k x 60 q x 25 cols', [process.execPath, bannerArgs(['--output', join(DATA, 'banner-out.xlsx')])], bannerReference, 0.1);
  for (const r of [bannerText, bannerXlsx]) {
    console.log(`${r.name.padEnd(36)} ${r.mine.toFixed(2).padStart(8)} s ${r.reference.toFixed(2).padStart(9)} s ${r.ratio.toFixed(3).padStart(7)}   ≤ ${r.goal} ${r.met ? 'met' : 'NOT MET'}`);
  }
  if (hasTime) {
    // Memory: the columns used are 66 (60 questions, 5 breaks, the weight) × 100,000 rows; the
    // baseline is the same command on the first 1,000 rows (the program, its libraries, the report).
    const tiny = join(DATA, 'banner-1k.csv');
    if (!existsSync(tiny)) writeFileSync(tiny, readFileSync(banner, 'utf8').split('\n').slice(0, 1001).join('\n') + '\n');
    const base = median(Array.from({ length: 3 }, () => once(process.execPath, [bin, 'banner', tiny, '--break', bannerBreaks, '--weight', 'weight', '--output', join(DATA, 'banner-1k.txt')]).peak));
    const cells = 66 * 100_000;
    console.log(`banner peak memory: ${bannerText.peak.toFixed(0)} MB (baseline on 1,000 rows ${base.toFixed(0)} MB): ${(((bannerText.peak - base) * 1024 * 1024) / cells).toFixed(1)} bytes per cell of the ${cells.toLocaleString('en-US')} cells used (goal about 2); ${cpus().length} cores`);
  }
}

ensureReference();
if (only === 'banner') {
  await benchBanner();
  process.exit(0);
}
const scan = await scanFile();
const pair = await pairFile();
const results = [];
results.push(compare('scan, 200,000 rows x 30 columns', [process.execPath, [bin, 'scan', scan, '--format', 'csv', '--engine', 'builtin']], [python, [join(here, 'reference_route.py'), 'scan', scan]], 0.1));
results.push(compare('pair, 1,000,000 rows x 8 columns', [process.execPath, [bin, 'pair', pair, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'builtin']], [python, [join(here, 'reference_route.py'), 'pair', pair, 'region', 'segment']], 0.5));

console.log(`\nwhole-process wall time, median of ${runs} runs, same machine, same run\n`);
console.log('scenario                              tabsight   reference   ratio   goal');
for (const r of results) {
  console.log(`${r.name.padEnd(36)} ${r.mine.toFixed(2).padStart(8)} s ${r.reference.toFixed(2).padStart(9)} s ${r.ratio.toFixed(3).padStart(7)}   ≤ ${r.goal} ${r.met ? 'met' : 'NOT MET'}`);
}
// Exact and simulated p-values in scan: the sparse pairs of a survey-sized
// file with --exact auto (exact within the work bound, else simulated with
// sequential stopping) against --exact never (chi-square only), same run.
const survey = await surveyFile();
const exactBudget = compare('scan --exact auto vs never, 4,642 x 28', [process.execPath, [bin, 'scan', survey, '--format', 'csv', '--engine', 'builtin']], [process.execPath, [bin, 'scan', survey, '--format', 'csv', '--engine', 'builtin', '--exact', 'never']], 3);
console.log(`\nscan exact budget: --exact auto ${exactBudget.mine.toFixed(2)} s, --exact never ${exactBudget.reference.toFixed(2)} s, ratio ${exactBudget.ratio.toFixed(2)} (goal ≤ 3) ${exactBudget.met ? 'met' : 'NOT MET'}`);

await benchBanner();

const pairResult = results[1];
const megabytes = statSync(pair).size / 1e6;
console.log(`\npair throughput: ${(megabytes / pairResult.mine).toFixed(0)} MB/s, ${(1e6 / pairResult.mine / 1e6).toFixed(2)} million rows/s (whole process, ${megabytes.toFixed(0)} MB file)`);

if (!quick && hasTime) {
  const large = await pairFile(10_000_000, 'pair-10m.csv');
  const small = median(Array.from({ length: 3 }, () => once(process.execPath, [bin, 'pair', pair, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'builtin']).peak));
  const big = median(Array.from({ length: 3 }, () => once(process.execPath, [bin, 'pair', large, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'builtin']).peak));
  console.log(`peak memory of pair (built-in reader): ${small.toFixed(0)} MB on 1M rows, ${big.toFixed(0)} MB on 10M rows: ratio ${(big / small).toFixed(2)} (goal ≤ 1.5)`);
}

// The embedded engine (--engine duckdb) against the built-in reader and the
// dataframe route, in the same run, on CSV and on the same rows as Parquet.
// Debian has no Parquet reader for pandas (no pyarrow), so on Parquet the
// dataframe route is the CSV one.
const engineLoads = spawnSync(process.execPath, ['-e', "import('@duckdb/node-api').then(() => process.exit(0), () => process.exit(1))"], { cwd: root }).status === 0;
if (!engineLoads) {
  console.log('\nengine route: @duckdb/node-api is not installed (optional dependency); skipped');
} else {
  const sizes = quick ? [[1_000_000, pair]] : [[1_000_000, pair], [10_000_000, await pairFile(10_000_000, 'pair-10m.csv')]];
  console.log(`\nengine route (pair region x segment), whole-process wall time, median of ${runs} runs\n`);
  console.log('input                          engine    built-in  dataframe  engine/built-in  engine/dataframe');
  for (const [rows, csv] of sizes) {
    const parquet = csv.replace(/\.csv$/, '.parquet');
    if (!existsSync(parquet)) {
      const made = spawnSync(process.execPath, [join(here, 'to-parquet.mjs'), csv, parquet], { cwd: root, encoding: 'utf8' });
      if (made.status !== 0) throw new Error(`to-parquet failed: ${made.stderr}`);
    }
    const pairArgs = (file, engine) => [bin, 'pair', file, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', engine];
    const times = { engineCsv: [], engineParquet: [], builtin: [], dataframe: [] };
    const peaks = [];
    for (let k = 0; k < runs; k++) {
      const engineRun = once(process.execPath, pairArgs(csv, 'duckdb'));
      times.engineCsv.push(engineRun.seconds);
      peaks.push(engineRun.peak ?? 0);
      times.engineParquet.push(once(process.execPath, pairArgs(parquet, 'duckdb')).seconds);
      times.builtin.push(once(process.execPath, pairArgs(csv, 'builtin')).seconds);
      times.dataframe.push(once(python, [join(here, 'reference_route.py'), 'pair', csv, 'region', 'segment']).seconds);
    }
    const m = Object.fromEntries(Object.entries(times).map(([k, v]) => [k, median(v)]));
    const label = `${(rows / 1e6).toFixed(0)}M rows`;
    for (const [name, t] of [[`${label}, CSV (${(statSync(csv).size / 1e6).toFixed(0)} MB)`, m.engineCsv], [`${label}, Parquet (${(statSync(parquet).size / 1e6).toFixed(0)} MB)`, m.engineParquet]]) {
      console.log(`${name.padEnd(30)} ${t.toFixed(2).padStart(6)} s ${m.builtin.toFixed(2).padStart(8)} s ${m.dataframe.toFixed(2).padStart(8)} s ${(t / m.builtin).toFixed(3).padStart(15)} ${(t / m.dataframe).toFixed(3).padStart(17)}`);
    }
    if (hasTime) console.log(`${''.padEnd(30)} engine peak memory on the CSV: ${median(peaks).toFixed(0)} MB`);
  }
}

const accuracy = spawnSync(process.execPath, [join(here, 'jstat-accuracy.mjs')], { encoding: 'utf8' });
process.stdout.write('\n' + accuracy.stdout);
