#!/usr/bin/env node
'use strict';
// The command. A CommonJS script (bin/package.json), so that Node.js starts
// it without its ES module loader: it loads the bundled program
// (dist/bundle/*.cjs, scripts/bundle.mjs) with the code cache written beside
// it at build time, or, when the build made no bundle from the current
// modules, the modules in dist/ as tsc wrote them (also after a tsc run that
// left an older bundle behind, which must not run). Node.js 20 has no
// compile cache of its own (module.enableCompileCache came with 22): the
// bundle's parts are compiled here through vm.Script with their cached code
// (V8 checks that it fits this Node.js and these exact sources, and compiles
// afresh when it does not), which was most of the start-up of a run on a
// small file (README, Speed).
const { readFileSync, statSync } = require('node:fs');
const { join } = require('node:path');

const dist = join(__dirname, '..', 'dist');
const bundle = join(dist, 'bundle');

/**
 * A part's text. The bundle is written in ASCII (scripts/bundle.mjs), which
 * is read as Latin-1, byte for byte: a copy, where decoding UTF-8 checks
 * every byte (a visible part of a run on a small file).
 */
function sourceText(bytes) {
  const { isAscii } = require('node:buffer');
  return typeof isAscii === 'function' && isAscii(bytes) ? bytes.toString('latin1') : bytes.toString('utf8');
}

/** The commands with code caches of their own (scripts/code-cache.cjs). */
const OWN_CACHES = new Set(['pair', 'scan']);

/**
 * Loads the bundle's entry; `scripts` collects each part's compiled script
 * (scripts/code-cache.cjs writes their cache, and compiles every part
 * afresh: `fresh`); `command` (the first argument) picks the command's own
 * caches where it has them.
 */
function loadBundle(scripts, command, fresh = false) {
  const vm = require('node:vm');
  const { createRequire, wrap } = require('node:module');
  const cacheRoot = join(bundle, 'cache');
  const cacheDirs = fresh ? [] : OWN_CACHES.has(command) ? [join(cacheRoot, command), cacheRoot] : [cacheRoot];
  const outside = createRequire(join(bundle, 'tabsight.cjs'));
  const loaded = new Map();
  const load = (name) => {
    const known = loaded.get(name);
    if (known) return known.exports;
    const file = join(bundle, name);
    const module = { exports: {}, id: file, filename: file, loaded: false };
    loaded.set(name, module);
    let cachedData;
    for (const dir of cacheDirs) {
      try {
        cachedData = readFileSync(join(dir, `${name}.cache`));
        break;
      } catch {
        // no cache for this part here: the next place, else compiled afresh
      }
    }
    const script = new vm.Script(wrap(sourceText(readFileSync(file))), { filename: file, cachedData, importModuleDynamically: vm.constants.USE_MAIN_CONTEXT_DEFAULT_LOADER });
    if (scripts) scripts.set(name, script);
    const required = (specifier) => (specifier.startsWith('./') ? load(specifier.slice(2)) : outside(specifier));
    required.resolve = outside.resolve;
    required.main = require.main;
    required.cache = require.cache;
    module.require = required;
    script.runInThisContext()(module.exports, required, module, file, bundle);
    module.loaded = true;
    return module.exports;
  };
  return load('tabsight.cjs');
}

/** The program: the bundle when it was built from the current modules, else dist/ as tsc wrote it. */
async function program() {
  const time = (path) => statSync(path, { throwIfNoEntry: false })?.mtimeMs;
  const bundled = time(join(bundle, 'tabsight.cjs'));
  if (bundled !== undefined && bundled >= (time(join(dist, 'cli', 'main.js')) ?? 0)) return loadBundle(null, process.argv[2]);
  const { pathToFileURL } = require('node:url');
  return import(pathToFileURL(join(dist, 'cli', 'main.js')).href);
}

if (require.main === module) {
  program()
    .then(({ main }) => main(process.argv))
    .then(
      (status) => {
        process.exitCode = status;
      },
      (error) => {
        // Not a user-facing failure: a bug. Say so in one line, keep the detail for reports
        // (standard error that cannot be written must not change the status).
        process.stderr.on('error', () => undefined);
        process.stderr.write(`tabsight: internal error: ${error && error.message ? error.message : String(error)} (please report it; set TABSIGHT_DEBUG=1 for details)\n`);
        if (process.env.TABSIGHT_DEBUG) process.stderr.write(String(error && error.stack) + '\n');
        process.exitCode = 70;
      },
    );
}

module.exports = { loadBundle };
