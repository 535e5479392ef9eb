#!/usr/bin/env node
// The program as one bundled file (with its lazily loaded parts split off),
// built after tsc by npm run build and at install (prepare): Node.js then
// reads and compiles one file at start instead of a hundred modules and
// their package lookups, which was most of the time of a run on a small
// file (README, Speed). The bundler is rolldown, pinned in devDependencies
// (it is also the test runner's own bundler). Where it cannot run (an
// install without optional dependencies lacks its native binding) no
// bundle is written, and bin/tabsight.js runs the modules in dist/ as they
// are: slower to start, the same program.
import { spawnSync } from 'node:child_process';
import { existsSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const dist = join(root, 'dist');
const out = join(dist, 'bundle');

// An old bundle never outlives the modules it was built from.
rmSync(out, { recursive: true, force: true });
let rolldown;
try {
  rolldown = await import('rolldown');
} catch (error) {
  console.log(`bundle: skipped (rolldown cannot load here: ${String(error?.message ?? error).split('\n')[0]}); bin/tabsight.js runs dist/ directly`);
  process.exit(0);
}
if (!existsSync(join(dist, 'cli', 'main.js'))) throw new Error('bundle: run tsc first (dist/cli/main.js is missing)');
const { version, optionalDependencies } = JSON.parse(readFileSync(join(root, 'package.json'), 'utf8'));

/**
 * The text-width libraries make an Intl.Segmenter when they are loaded; its
 * start-up (the grapheme data) is a visible part of a run on a small file,
 * and most runs never use it (src/render/layout.ts measures and wraps text
 * of simple characters without it). Here it is made on its first use; the
 * libraries only call its segment method. A library whose text no longer
 * has that line is bundled as it is.
 */
const lazySegmenter = {
  name: 'lazy-segmenter',
  transform(code, id) {
    if (!/[\\/]node_modules[\\/](string-width|wrap-ansi)[\\/]/.test(id)) return null;
    const made = /^const segmenter = new Intl\.Segmenter\(\);$/m;
    if (!made.test(code)) return null;
    return code.replace(made, 'let madeSegmenter;\nconst segmenter = { segment: (text) => (madeSegmenter ??= new Intl.Segmenter()).segment(text) };');
  },
};

await rolldown.build({
  input: { tabsight: join(dist, 'cli', 'main.js'), rangeWorker: join(dist, 'io', 'rangeWorker.js') },
  platform: 'node',
  // The optional engine and the spreadsheet writer stay packages of their own, loaded when used.
  external: ['@duckdb/node-api', 'exceljs'],
  logLevel: 'warn',
  plugins: [lazySegmenter],
  transform: { define: { TABSIGHT_PACKAGE_JSON: JSON.stringify(JSON.stringify({ version, optionalDependencies })) } },
  // CommonJS: bin/tabsight.js compiles each part with its code cache (vm.Script), and Node.js
  // loads built-in modules for CommonJS without the wrappers it makes for ES modules.
  output: { dir: out, format: 'cjs', dynamicImportInCjs: false, entryFileNames: '[name].cjs', chunkFileNames: 'part-[name]-[hash].cjs', minify: false },
});
console.log(`bundle: ${readdirSync(out).length} files in dist/bundle`);
// The code cache, made by running a few commands on the demo files (scripts/code-cache.cjs).
const cache = spawnSync(process.execPath, [join(root, 'scripts', 'code-cache.cjs')], { encoding: 'utf8' });
process.stdout.write(cache.stdout);
if (cache.status !== 0) console.log(`bundle: no code cache (${cache.stderr.trim().split('\n')[0]})`);
