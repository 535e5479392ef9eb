#!/usr/bin/env node
// npm run bench: tabsight against the routes a data team would write instead
// and against the floor of its own language, measured in the same run as
// whole-process wall time (start-up included), the routes alternating run by
// run, reported as the median of the per-run ratios, with the machine's
// number of cores beside each figure. Generates its seeded files in
// bench/data/ (not in git).
//
// Routes: pandas (Debian's python3-pandas and scipy, bench/reference_route.py),
// polars (the python3 on the PATH, with polars from the registry, and scipy;
// bench/polars_route.py), the embedded engine (--engine duckdb), and the
// floor: a plain Node.js byte loop that reads the file and finds its line
// ends (bench/floor.mjs).
//
// Options: --runs N (default 5), --quick (3 runs; no 10-million-row files),
// --only waves, --only banner, --only design, --only pair10m (pair on the
// 10-million-row file) or --only startup (a 10-row file against node -e 0):
// that scenario alone.
import { spawnSync } from 'node:child_process';
import { existsSync, statSync, writeFileSync, readFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { bannerFile, DATA, designFile, pairFile, scanFile, surveyFile, weeklyFiles } from './generate.mjs';

const here = dirname(fileURLToPath(import.meta.url));
const root = join(here, '..');
const bin = join(root, 'bin', 'tabsight.js');
const args = process.argv.slice(2);
const quick = args.includes('--quick');
const runs = Number(args[args.indexOf('--runs') + 1]) || (quick ? 3 : 5);
const debianPython = '/usr/bin/python3';
const cores = availableParallelism();
const node = process.execPath;
const POLARS_VERSION = '1.44.2';

function ensurePandas() {
  const check = () => spawnSync(debianPython, ['-c', 'import pandas, scipy, statsmodels'], { stdio: 'ignore' }).status === 0;
  if (check()) return;
  console.log('installing the pandas route: apt-get install python3-pandas python3-scipy python3-statsmodels');
  spawnSync('apt-get', ['update', '-qq'], { stdio: 'inherit' });
  spawnSync('apt-get', ['install', '-y', '-qq', 'python3-pandas', 'python3-scipy', 'python3-statsmodels'], { stdio: 'inherit', env: { ...process.env, DEBIAN_FRONTEND: 'noninteractive' } });
  if (!check()) throw new Error('the pandas route (Debian python3-pandas, python3-scipy, python3-statsmodels) could not be installed');
}

/** The python3 on the PATH with polars and scipy (polars installed from the registry when missing), or null. */
function polarsPython() {
  const check = () => spawnSync('python3', ['-c', 'import polars, scipy, numpy'], { stdio: 'ignore' }).status === 0;
  if (!check()) {
    console.log(`installing the polars route: python3 -m pip install polars==${POLARS_VERSION}`);
    spawnSync('python3', ['-m', 'pip', 'install', '-q', `polars==${POLARS_VERSION}`, 'scipy', 'numpy'], { stdio: 'inherit' });
  }
  return check() ? 'python3' : null;
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

/** Alternates two routes run by run (A B A B …) so that drift on the machine hits both alike; the ratio is the median of the per-run ratios. */
function versus(ours, theirs, n = runs) {
  const a = [];
  const b = [];
  for (let k = 0; k < n; k++) {
    a.push(once(...ours));
    b.push(once(...theirs));
  }
  return {
    mine: median(a.map((r) => r.seconds)),
    reference: median(b.map((r) => r.seconds)),
    ratio: median(a.map((r, k) => r.seconds / b[k].seconds)),
    peak: median(a.map((r) => r.peak ?? 0)),
  };
}

const lines = [];
function report(line = '') {
  console.log(line);
  lines.push(line);
}
function verdict(met) {
  return met ? 'met' : 'NOT MET';
}
const s = (x) => `${x.toFixed(2)} s`;
const tabsight = (...rest) => [node, [bin, ...rest]];

/**
 * waves: a year of weekly exports (52 files of 100,000 rows, given as the
 * pattern a weekly script gives) against the pandas route looping the same
 * per-wave crosstab and chi-square; and the engine's one pass over all the
 * files against the built-in reader's pass per file (which --engine auto takes).
 */
async function benchWaves() {
  const weekly = await weeklyFiles();
  const mb = weekly.files.reduce((sum, f) => sum + statSync(f).size, 0) / 1e6;
  const wavesArgs = (engine) => tabsight('waves', weekly.pattern, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', engine);
  report(`
waves region x segment over 52 weekly files (${mb.toFixed(0)} MB), ${cores} cores`);
  report('scenario                                           tabsight   other     ratio   goal');
  const w = versus(wavesArgs('auto'), [debianPython, [join(here, 'reference_route.py'), 'waves', 'region', 'segment', ...weekly.files]]);
  report(`${'52 x 100k rows vs pandas (loop of crosstab + chi2)'.padEnd(50)} ${s(w.mine).padStart(8)} ${s(w.reference).padStart(8)} ${w.ratio.toFixed(3).padStart(7)}   <= 0.2 ${verdict(w.ratio <= 0.2)}`);
  const engineLoads = spawnSync(node, ['-e', "import('@duckdb/node-api').then(() => process.exit(0), () => process.exit(1))"], { cwd: root }).status === 0;
  if (!engineLoads) return;
  const e = versus(wavesArgs('duckdb'), wavesArgs('builtin'), 3);
  report(`  engine (one pass over the 52 files) ${s(e.mine)}, built-in reader (one pass per file) ${s(e.reference)}, engine / built-in ${e.ratio.toFixed(2)}`);
}

async function benchBanner() {
  // The banner: 100,000 respondents × 60 questions × 5 break variables (25
  // break columns), weighted, as text and as a spreadsheet, against the
  // dataframe route (bench/banner_reference.py: pandas crosstabs normalised per
  // column, chi2_contingency, statsmodels' z-test per pair of columns in a loop).
  const banner = await bannerFile();
  const bannerBreaks = 'age_band,region,membership,income_band,household';
  const bannerArgs = (extra) => [bin, 'banner', banner, '--break', bannerBreaks, '--weight', 'weight', ...extra];
  const bannerReference = [debianPython, [join(here, 'banner_reference.py'), banner, bannerBreaks, 'weight', join(DATA, 'banner-reference-out.csv')]];
  report(`\nbanner, 100k x 60 questions x 25 break columns, weighted, against pandas and statsmodels, ${cores} cores`);
  const text = versus([node, bannerArgs(['--output', join(DATA, 'banner-out.txt')])], bannerReference);
  const xlsx = versus([node, bannerArgs(['--output', join(DATA, 'banner-out.xlsx')])], bannerReference);
  for (const [name, r] of [['text', text], ['xlsx', xlsx]]) report(`  banner ${name}: ${s(r.mine)} vs ${s(r.reference)}, ratio ${r.ratio.toFixed(3)} (goal <= 0.1) ${verdict(r.ratio <= 0.1)}`);
  if (hasTime) {
    // Memory: the columns used are 66 (60 questions, 5 breaks, the weight) × 100,000 rows; the
    // baseline is the same command on the first 1,000 rows (the program, its libraries, the report).
    const tinyBanner = join(DATA, 'banner-1k.csv');
    if (!existsSync(tinyBanner)) writeFileSync(tinyBanner, readFileSync(banner, 'utf8').split('\n').slice(0, 1001).join('\n') + '\n');
    const base = median(Array.from({ length: 3 }, () => once(node, [bin, 'banner', tinyBanner, '--break', bannerBreaks, '--weight', 'weight', '--output', join(DATA, 'banner-1k.txt')]).peak));
    const cells = 66 * 100_000;
    report(`  banner peak memory: ${text.peak.toFixed(0)} MB (baseline on 1,000 rows ${base.toFixed(0)} MB): ${(((text.peak - base) * 1024 * 1024) / cells).toFixed(1)} bytes per cell of the ${cells.toLocaleString('en-US')} cells used (goal about 2)`);
  }
}

/**
 * A survey design against --weight alone (Kish's approximation) on the same
 * 1,000,000 rows of 50 strata x 2 PSUs: the design registers every row's PSU
 * and counts per-PSU totals beside each table (pair), and beside every
 * pair's table in the same pass (scan, 30 columns, 435 pairs); waves with
 * the levels of one column as independent waves; banner of 25 questions by
 * 5 break variables.
 */
async function benchDesign() {
  const file = await designFile();
  const design = ['--weight', 'weight', '--strata', 'stratum', '--cluster', 'psu'];
  const columns = Array.from({ length: 30 }, (_v, k) => `q${String(k + 1).padStart(2, '0')}`).join(',');
  const pairDesign = (...extra) => tabsight('pair', file, '--rows', 'q02', '--cols', 'q05', '--format', 'json', '--engine', 'builtin', ...extra);
  const scanDesign = (...extra) => tabsight('scan', file, '--columns', columns, '--format', 'csv', '--engine', 'builtin', ...extra);
  report(`
survey design: 1,000,000 rows in 50 strata x 2 PSUs (${(statSync(file).size / 1e6).toFixed(0)} MB) against --weight alone, ${cores} cores`);
  report('scenario                                           design    weight     ratio   goal');
  const p = versus(pairDesign(...design), pairDesign('--weight', 'weight'));
  report(`${'pair q02 x q05'.padEnd(50)} ${s(p.mine).padStart(8)} ${s(p.reference).padStart(8)} ${p.ratio.toFixed(3).padStart(7)}   <= 1.5 ${verdict(p.ratio <= 1.5)}`);
  const sc = versus(scanDesign(...design), scanDesign('--weight', 'weight'));
  report(`${'scan of 30 columns (435 pairs)'.padEnd(50)} ${s(sc.mine).padStart(8)} ${s(sc.reference).padStart(8)} ${sc.ratio.toFixed(3).padStart(7)}   <= 2 ${verdict(sc.ratio <= 2)}`);
  // waves: the 9 levels of q08 as independent waves, each its own sample of the 50 strata x 2 PSUs (no goal set)
  const wavesDesign = (...extra) => tabsight('waves', file, '--period', 'q08', '--rows', 'q02', '--cols', 'q05', '--format', 'json', '--engine', 'builtin', ...extra);
  const wv = versus(wavesDesign(...design), wavesDesign('--weight', 'weight'));
  report(`${'waves, 9 waves of q02 x q05 (--period q08)'.padEnd(50)} ${s(wv.mine).padStart(8)} ${s(wv.reference).padStart(8)} ${wv.ratio.toFixed(3).padStart(7)}   (none)`);
  // banner: 25 questions (q06-q30) by 5 break variables (q01-q05) in one read; with the design each question
  // also counts its totals per PSU against every break, and every column share gets its design-based t tests (no goal set)
  const questions = Array.from({ length: 25 }, (_v, k) => `q${String(k + 6).padStart(2, '0')}`).join(',');
  const bannerDesign = (...extra) => tabsight('banner', file, '--break', 'q01,q02,q03,q04,q05', '--questions', questions, '--output', join(DATA, 'banner-design-out.txt'), ...extra);
  const bn = versus(bannerDesign(...design), bannerDesign('--weight', 'weight'));
  report(`${'banner, 25 questions x 5 break variables'.padEnd(50)} ${s(bn.mine).padStart(8)} ${s(bn.reference).padStart(8)} ${bn.ratio.toFixed(3).padStart(7)}   (none)`);
}

/** A 10-row file against node -e 0: the start-up of pair and scan. */
async function benchStartup() {
  const tiny = join(DATA, 'scan-10.csv');
  writeFileSync(tiny, readFileSync(await scanFile(), 'utf8').split('\n').slice(0, 11).join('\n') + '\n');
  const bare = [node, ['-e', '0']];
  report(`\na 10-row file against node -e 0 (start-up), ${cores} cores`);
  const small = [
    ['pair q01 x q02', tabsight('pair', tiny, '--rows', 'q01', '--cols', 'q02')],
    ['scan, 5 columns (10 pairs)', tabsight('scan', tiny, '--columns', 'q01,q02,q03,q04,q05')],
    ['scan, all 30 columns (435 exact tests)', tabsight('scan', tiny)],
  ];
  for (const [name, command] of small) {
    const r = versus(command, bare, Math.max(runs, 7));
    report(`  ${name.padEnd(40)} ${s(r.mine)} vs ${s(r.reference)}: ${r.ratio.toFixed(2)}x (goal <= 1.5) ${verdict(r.ratio <= 1.5)}`);
  }
}

const pairArgs = (file, ...extra) => tabsight('pair', file, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'builtin', ...extra);
const row = (name, r, goal, met) => report(`${name.padEnd(50)} ${s(r.mine).padStart(8)} ${s(r.reference).padStart(8)} ${r.ratio.toFixed(3).padStart(7)}   ${goal}${met === undefined ? '' : ` ${verdict(met)}`}`);

/** pair on 10 million rows (420 MB): one thread and every core against the floor, every core against polars, and peak memory against 1M rows. */
async function benchPair10m(polars, pair1m) {
  const pair10m = await pairFile(10_000_000, 'pair-10m.csv');
  const mb = statSync(pair10m).size / 1e6;
  const floorRun = [node, [join(here, 'floor.mjs'), pair10m]];
  const single = versus(pairArgs(pair10m, '--threads', '1'), floorRun);
  const auto = versus(pairArgs(pair10m), floorRun);
  row(`10M rows (${mb.toFixed(0)} MB), 1 thread vs the floor`, single, '');
  row(`10M rows, auto (${cores} threads) vs the floor`, auto, '<= 1.5', auto.ratio <= 1.5);
  report(`  10M rows, 1 thread: ${(mb / single.mine).toFixed(0)} MB/s whole process (goal >= 230 MB/s per core) ${verdict(mb / single.mine >= 230)}`);
  report(`  10M rows, auto on ${cores} cores: ${(mb / auto.mine).toFixed(0)} MB/s whole process (goal about 350 MB/s with two) ${verdict(mb / auto.mine >= 350 * Math.min(cores, 2) / 2)}`);
  if (polars) {
    const p10p = versus(pairArgs(pair10m), [polars, [join(here, 'polars_route.py'), 'pair', pair10m, 'region', 'segment']]);
    row(`10M rows, auto vs polars`, p10p, '<= 0.333', p10p.ratio <= 1 / 3);
  }
  if (hasTime) {
    const small = median(Array.from({ length: 3 }, () => once(...pairArgs(pair1m, '--threads', '1')).peak));
    const big = median(Array.from({ length: 3 }, () => once(...pairArgs(pair10m, '--threads', '1')).peak));
    report(`  peak memory of pair: ${small.toFixed(0)} MB on 1M rows, ${big.toFixed(0)} MB on 10M rows, ratio ${(big / small).toFixed(2)} (goal <= 1.5) ${verdict(big / small <= 1.5)}`);
  }
}

if (args.includes('--only') && args[args.indexOf('--only') + 1] === 'startup') {
  report(`npm run bench --only startup on ${cores} cores (${new Date().toISOString().slice(0, 10)}); whole-process wall time, median of ${Math.max(runs, 7)} alternating runs`);
  await benchStartup();
  process.exit(0);
}
if (args.includes('--only') && args[args.indexOf('--only') + 1] === 'design') {
  report(`npm run bench --only design on ${cores} cores (${new Date().toISOString().slice(0, 10)}); whole-process wall time, median of ${runs} alternating runs`);
  await benchDesign();
  process.exit(0);
}
ensurePandas();
if (args.includes('--only') && args[args.indexOf('--only') + 1] === 'banner') {
  await benchBanner();
  process.exit(0);
}
if (args.includes('--only') && args[args.indexOf('--only') + 1] === 'waves') {
  report(`npm run bench --only waves on ${cores} cores (${new Date().toISOString().slice(0, 10)}); whole-process wall time, median of ${runs} alternating runs`);
  await benchWaves();
  process.exit(0);
}
const polars = polarsPython();
if (args.includes('--only') && args[args.indexOf('--only') + 1] === 'pair10m') {
  report(`npm run bench --only pair10m on ${cores} cores (${new Date().toISOString().slice(0, 10)}); whole-process wall time, median of ${runs} alternating runs; ratio = tabsight / other route`);
  report('\npair region x segment, 10M rows');
  report('scenario                                           tabsight   other     ratio   goal');
  await benchPair10m(polars, await pairFile());
  process.exit(0);
}
report(`npm run bench on ${cores} cores (${new Date().toISOString().slice(0, 10)}); whole-process wall time, median of ${runs} alternating runs; ratio = tabsight / other route (below 1: tabsight faster)`);

// --- pair -----------------------------------------------------------------
const pair1m = await pairFile();
report('\npair region x segment');
report('scenario                                           tabsight   other     ratio   goal');
const mb1m = statSync(pair1m).size / 1e6;
const p1 = versus(pairArgs(pair1m), [debianPython, [join(here, 'reference_route.py'), 'pair', pair1m, 'region', 'segment']]);
row(`1M rows (${mb1m.toFixed(0)} MB) vs pandas`, p1, '<= 0.5', p1.ratio <= 0.5);
if (polars) {
  const p1p = versus(pairArgs(pair1m), [polars, [join(here, 'polars_route.py'), 'pair', pair1m, 'region', 'segment']]);
  row(`1M rows vs polars`, p1p, '<= 0.333', p1p.ratio <= 1 / 3);
}
const p1t = versus(pairArgs(pair1m, '--threads', String(Math.max(2, cores))), pairArgs(pair1m, '--threads', '1'));
row(`1M rows, ${Math.max(2, cores)} threads vs 1 thread`, p1t, 'auto uses 1 below 96 MB');
report(`  1M rows, one thread: ${(mb1m / p1.mine).toFixed(0)} MB/s whole process`);

if (!quick) await benchPair10m(polars, pair1m);

// --- scan -----------------------------------------------------------------
const scanArgs = (file, ...extra) => tabsight('scan', file, '--format', 'csv', '--engine', 'builtin', ...extra);
const scan200 = await scanFile();
report('\nscan (every pair of columns)');
report('scenario                                           tabsight   other     ratio   goal');
const sc = versus(scanArgs(scan200), [debianPython, [join(here, 'reference_route.py'), 'scan', scan200]]);
row('200k x 30 (435 pairs) vs pandas', sc, '<= 0.1', sc.ratio <= 0.1);
if (polars) {
  const scp = versus(scanArgs(scan200), [polars, [join(here, 'polars_route.py'), 'scan', scan200]]);
  row('200k x 30 vs polars', scp, '<= 0.167', scp.ratio <= 1 / 6);
}
// Linear in rows x pairs: seconds per million (row x pair) on each shape.
const shapes = [
  ['200k x 30', scan200, 200_000, 435],
  ['1M x 30', await scanFile(1_000_000, 30, 'scan-1m.csv'), 1_000_000, 435],
  ['200k x 100', await scanFile(200_000, 100, 'scan-200k-100.csv'), 200_000, 4950],
];
report('  time per million (row x pair), built-in reader, median of 3:');
const perUnit = [];
for (const [name, file, rows, pairs] of shapes) {
  const t = median(Array.from({ length: 3 }, () => once(...scanArgs(file)).seconds));
  perUnit.push((t / (rows * pairs)) * 1e6);
  report(`  ${name.padEnd(12)} ${s(t).padStart(9)}  ${((t / (rows * pairs)) * 1e6).toFixed(4)} s per million row-pairs`);
}
report(`  spread of the time per row-pair across the shapes: ${(Math.max(...perUnit) / Math.min(...perUnit)).toFixed(2)}x (linear: near 1; start-up weighs on the smallest)`);
if (!quick && hasTime) {
  const big = await scanFile(10_000_000, 30, 'scan-10m.csv');
  const run = once(...scanArgs(big, '--exact', 'never'));
  const cells = 10_000_000 * 30;
  report(`  10M x 30: ${s(run.seconds)}, peak memory ${run.peak.toFixed(0)} MB = ${((run.peak * 1024 * 1024) / cells).toFixed(2)} bytes per cell (goal <= 2.5) ${verdict((run.peak * 1024 * 1024) / cells <= 2.5)}`);
}

// --- exact tests ------------------------------------------------------------
const survey = await surveyFile();
const exact = versus(tabsight('scan', survey, '--format', 'csv', '--engine', 'builtin'), tabsight('scan', survey, '--format', 'csv', '--engine', 'builtin', '--exact', 'never'));
report(`\nscan --exact auto vs --exact never, 4,642 x 28: ${s(exact.mine)} vs ${s(exact.reference)}, ratio ${exact.ratio.toFixed(2)} (goal <= 3) ${verdict(exact.ratio <= 3)}`);
report(spawnSync(node, [join(here, 'exact2x2.mjs')], { encoding: 'utf8' }).stdout.trim());

// --- small files --------------------------------------------------------------
await benchStartup();

// --- waves ----------------------------------------------------------------------
await benchWaves();

// --- survey designs ---------------------------------------------------------
await benchDesign();

// --- the engine ---------------------------------------------------------------
const engineLoads = spawnSync(node, ['-e', "import('@duckdb/node-api').then(() => process.exit(0), () => process.exit(1))"], { cwd: root }).status === 0;
if (!engineLoads) report('\nengine route: @duckdb/node-api is not installed (optional dependency); skipped');
else {
  report(`\nthe engine (--engine duckdb) against the built-in reader on CSV (which --engine auto takes), ${cores} cores`);
  const files = quick ? [[pair1m, '1M']] : [[pair1m, '1M'], [await pairFile(10_000_000, 'pair-10m.csv'), '10M']];
  for (const [file, label] of files) {
    const r = versus(tabsight('pair', file, '--rows', 'region', '--cols', 'segment', '--format', 'json', '--engine', 'duckdb'), pairArgs(file));
    report(`  pair ${label} rows: engine ${s(r.mine)}, built-in ${s(r.reference)}, engine / built-in ${r.ratio.toFixed(2)} (auto keeps the built-in reader: ${verdict(r.ratio >= 1)})`);
    const parquet = file.replace(/\.csv$/, '.parquet');
    if (!existsSync(parquet)) {
      const made = spawnSync(node, [join(here, 'to-parquet.mjs'), file, parquet], { cwd: root, encoding: 'utf8' });
      if (made.status !== 0) throw new Error(`to-parquet failed: ${made.stderr}`);
    }
    const pq = versus(tabsight('pair', parquet, '--rows', 'region', '--cols', 'segment', '--format', 'json'), pairArgs(file));
    report(`  pair ${label} rows, Parquet through the engine (auto) vs the CSV through the built-in reader: ${pq.ratio.toFixed(2)}`);
  }
  const se = versus(tabsight('scan', scan200, '--format', 'csv', '--engine', 'duckdb'), scanArgs(scan200), 3);
  report(`  scan 200k x 30: engine ${s(se.mine)} (peak ${se.peak.toFixed(0)} MB), built-in ${s(se.reference)}, engine / built-in ${se.ratio.toFixed(2)} (auto keeps the built-in reader: ${verdict(se.ratio >= 1)})`);
}

const accuracy = spawnSync(node, [join(here, 'jstat-accuracy.mjs')], { encoding: 'utf8' });
report('\n' + accuracy.stdout.trim());
