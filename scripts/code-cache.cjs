// Writes the V8 code cache of the bundle's parts (dist/bundle/cache/), run by
// scripts/bundle.mjs at build and install: the program runs a few typical
// commands on the demo files in this one process (so that the functions they
// use are compiled), then every part it loaded is saved with its compiled
// code. bin/tabsight.js hands each part its cache; V8 refuses a cache made by
// another Node.js or for other sources, and the part is then compiled afresh.
'use strict';
const { mkdirSync, writeFileSync } = require('node:fs');
const { join } = require('node:path');
const { Readable, Writable } = require('node:stream');
const { loadBundle } = require('../bin/tabsight.js');

const root = join(__dirname, '..');
const demo = join(root, 'fixtures', 'demo', 'patron-survey.csv');
const weekly = join(root, 'fixtures', 'demo', 'weekly');
const commands = [
  ['pair', demo, '--rows', 'age_band', '--cols', 'preferred_format'],
  ['pair', demo, '--rows', 'age_band', '--cols', 'preferred_format', '--format', 'json'],
  ['scan', demo],
  ['scan', demo, '--format', 'csv'],
  ['compare', demo, '--rows', 'age_band', '--cols', 'preferred_format', '--period', 'branch'],
  ['waves', join(weekly, '*.csv'), '--rows', 'age_band', '--cols', 'preferred_format'],
  ['profile', demo],
];

async function main() {
  const scripts = new Map();
  const { run } = loadBundle(scripts);
  const sink = () => Object.assign(new Writable({ write: (_chunk, _encoding, done) => done() }), { isTTY: false });
  for (const args of commands) {
    await run(args, { stdin: Object.assign(Readable.from([]), { isTTY: false }), stdout: sink(), stderr: sink(), env: {} });
  }
  const dir = join(root, 'dist', 'bundle', 'cache');
  mkdirSync(dir, { recursive: true });
  for (const [name, script] of scripts) writeFileSync(join(dir, `${name}.cache`), script.createCachedData());
  console.log(`bundle: code cache of ${scripts.size} parts in dist/bundle/cache`);
}

main().catch((error) => {
  // The program runs without a cache, only slower to start.
  console.log(`bundle: no code cache (${String(error && error.message ? error.message : error).split('\n')[0]})`);
});
