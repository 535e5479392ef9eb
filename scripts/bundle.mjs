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
import { existsSync, readdirSync, rmSync } from 'node:fs';
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
await rolldown.build({
  input: { tabsight: join(dist, 'cli', 'main.js'), rangeWorker: join(dist, 'io', 'rangeWorker.js') },
  platform: 'node',
  // The optional engine and the spreadsheet writer stay packages of their own, loaded when used.
  external: ['@duckdb/node-api', 'exceljs'],
  logLevel: 'warn',
  output: { dir: out, format: 'esm', entryFileNames: '[name].js', chunkFileNames: 'part-[name]-[hash].js', minify: false },
});
console.log(`bundle: ${readdirSync(out).length} files in dist/bundle`);
