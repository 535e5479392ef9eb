// Writes the V8 code cache of the bundle's parts (dist/bundle/cache/), run by
// scripts/bundle.mjs at build and install: the program runs a few typical
// commands on the demo files in one process (so that the functions they use
// are compiled), then every part it loaded is saved with its compiled code.
// bin/tabsight.js hands each part its cache; V8 refuses a cache made by
// another Node.js or for other sources, and the part is then compiled afresh.
//
// `pair` and `scan`, the commands most often run on small files, have caches
// of their own (dist/bundle/cache/pair/, .../scan/), each made in a process
// that ran that command alone, every part compiled afresh: V8 reads a whole
// cache when the part is loaded, so a cache holding only what the command
// uses is read faster, and fewer of the command's functions were left to
// compile on first use (pair on a 10-row file: 186M instructions against
// 207M with the common cache). Every other command uses the common cache.
'use strict';
const { spawnSync } = require('node:child_process');
const { mkdirSync, readFileSync, rmSync, writeFileSync } = require('node:fs');
const { join } = require('node:path');
const { Readable, Writable } = require('node:stream');
const { loadBundle } = require('../bin/tabsight.js');

const root = join(__dirname, '..');
const demo = join(root, 'fixtures', 'demo', 'patron-survey.csv');
const weekly = join(root, 'fixtures', 'demo', 'weekly');
// The small file: the demo's first 10 rows, on standard input (exact tests and the other paths of small tables).
const pairOnSmall = ['pair', '-', '--rows', 'age_band', '--cols', 'preferred_format'];
const scanOnSmall = ['scan', '-', '--columns', 'branch,age_band,membership,preferred_format,has_children'];
const groups = {
  common: [
    ['pair', demo, '--rows', 'age_band', '--cols', 'preferred_format'],
    ['pair', demo, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'json'],
    ['scan', demo],
    ['scan', demo, '--format', 'csv'],
    ['compare', demo, '--rows', 'age_band', '--cols', 'preferred_format', '--period', 'branch'],
    ['waves', join(weekly, '*.csv'), '--rows', 'age_band', '--cols', 'preferred_format'],
    ['profile', demo],
  ],
  pair: [['pair', demo, '--rows', 'age_band', '--cols', 'preferred_format'], ['pair', demo, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'json'], pairOnSmall],
  scan: [['scan', demo], ['scan', demo, '--format', 'csv'], scanOnSmall],
};
const cacheRoot = join(root, 'dist', 'bundle', 'cache');

/** Runs one group's commands in this process and writes the cache of every part it loaded. */
async function writeGroup(group) {
  const scripts = new Map();
  const { run } = loadBundle(scripts, group, true);
  const sink = () => Object.assign(new Writable({ write: (_chunk, _encoding, done) => done() }), { isTTY: false });
  const firstRows = readFileSync(demo, 'utf8').split('\n').slice(0, 11).join('\n') + '\n';
  for (const args of groups[group]) {
    const input = args[1] === '-' ? [Buffer.from(firstRows)] : [];
    await run(args, { stdin: Object.assign(Readable.from(input), { isTTY: false }), stdout: sink(), stderr: sink(), env: {} });
  }
  const dir = group === 'common' ? cacheRoot : join(cacheRoot, group);
  mkdirSync(dir, { recursive: true });
  for (const [name, script] of scripts) writeFileSync(join(dir, `${name}.cache`), script.createCachedData());
  return scripts.size;
}

/** Each group in a process of its own. */
function main() {
  rmSync(cacheRoot, { recursive: true, force: true });
  const made = [];
  for (const group of Object.keys(groups)) {
    const child = spawnSync(process.execPath, [__filename, group], { encoding: 'utf8' });
    if (child.status !== 0 || !/^\d+$/.test(child.stdout.trim())) throw new Error(`${group}: ${(child.stderr || child.stdout).trim().split('\n')[0]}`);
    made.push(`${group} ${child.stdout.trim()}`);
  }
  console.log(`bundle: code cache in dist/bundle/cache (parts: ${made.join(', ')})`);
}

const group = process.argv[2];
if (group === undefined) {
  try {
    main();
  } catch (error) {
    // The program runs without a cache, only slower to start.
    rmSync(cacheRoot, { recursive: true, force: true });
    console.log(`bundle: no code cache (${String(error && error.message ? error.message : error).split('\n')[0]})`);
  }
} else if (Object.hasOwn(groups, group)) {
  writeGroup(group).then(
    (parts) => console.log(parts),
    (error) => {
      process.stderr.write(`${error && error.stack ? error.stack : error}\n`);
      process.exitCode = 1;
    },
  );
}
