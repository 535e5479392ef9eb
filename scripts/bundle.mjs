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

/**
 * The text width library also makes its patterns of Unicode properties when
 * it is loaded, and V8 builds a pattern's character sets as the pattern is
 * made: \p{RGI_Emoji} alone (every emoji sequence, from ICU's data) was
 * about a fifth of the instructions of `pair` on a 10-row file. Each such
 * pattern is made here on its first use: its name becomes a function that
 * makes it once (the same pattern object every time, so its uses behave as
 * before). A library whose text no longer has such lines is bundled as it is.
 */
const lazyPropertyPatterns = {
  name: 'lazy-property-patterns',
  transform(code, id) {
    if (!/[\\/]node_modules[\\/]string-width[\\/]/.test(id)) return null;
    const declared = /^const (\w+) = (\/.*\\p\{.*\/[a-z]*);$/gm;
    const names = [...code.matchAll(declared)].map((m) => m[1]);
    if (names.length === 0) return null;
    let lazy = code.replace(declared, (_line, name, pattern) => `let made_${name};\nconst ${name}_ = () => (made_${name} ??= ${pattern});`);
    for (const name of names) lazy = lazy.replace(new RegExp(`\\b${name}\\b(?!_)`, 'g'), `${name}_()`);
    return lazy;
  },
};

/**
 * The argument parser loads node:child_process when it is loaded (for
 * subcommands that are programs of their own, which tabsight has none of);
 * that module brings the network and stream modules with it. Here it is
 * loaded when the parser would start such a program.
 */
const lazyChildProcess = {
  name: 'lazy-child-process',
  transform(code, id) {
    if (!/[\\/]node_modules[\\/]commander[\\/]lib[\\/]command\.js$/.test(id)) return null;
    const made = /^const childProcess = require\('node:child_process'\);$/m;
    if (!made.test(code)) return null;
    return code.replace(made, "const childProcess = { spawn: (...args) => require('node:child_process').spawn(...args) };");
  },
};

/**
 * The colour library's detection of colour support asks node:tty whether
 * each standard stream is a terminal when it is loaded, and node:tty loads
 * the network and stream modules. tabsight never uses that detection (it
 * chooses colour itself, src/cli/output.ts), but the library runs it; here
 * the question goes to node:tty only for a character device other than
 * /dev/null (a terminal is one; a file, a pipe or /dev/null never is), with
 * the same answer.
 */
const lazyTerminalCheck = {
  name: 'lazy-terminal-check',
  transform(code, id) {
    if (!/[\\/]node_modules[\\/]chalk[\\/]source[\\/]vendor[\\/]supports-color[\\/]index\.js$/.test(id)) return null;
    const made = /^import tty from 'node:tty';$/m;
    if (!made.test(code)) return null;
    return code.replace(
      made,
      [
        "import { fstatSync, readlinkSync } from 'node:fs';",
        "import { createRequire } from 'node:module';",
        'const tty = {',
        '\tisatty(fd) {',
        '\t\ttry {',
        '\t\t\tif (!fstatSync(fd).isCharacterDevice()) return false;',
        '\t\t} catch {',
        '\t\t\treturn false;',
        '\t\t}',
        '\t\ttry {',
        "\t\t\tif (readlinkSync(`/proc/self/fd/${fd}`) === '/dev/null') return false;",
        '\t\t} catch {}',
        "\t\treturn createRequire(import.meta.url)('node:tty').isatty(fd);",
        '\t},',
        '};',
      ].join('\n'),
    );
  },
};

await rolldown.build({
  input: { tabsight: join(dist, 'cli', 'main.js'), rangeWorker: join(dist, 'io', 'rangeWorker.js') },
  platform: 'node',
  // The optional engine and the spreadsheet writer stay packages of their own, loaded when used.
  external: ['@duckdb/node-api', 'exceljs'],
  logLevel: 'warn',
  plugins: [lazySegmenter, lazyPropertyPatterns, lazyChildProcess, lazyTerminalCheck],
  transform: { define: { TABSIGHT_PACKAGE_JSON: JSON.stringify(JSON.stringify({ version, optionalDependencies })) } },
  // CommonJS: bin/tabsight.js compiles each part with its code cache (vm.Script), and Node.js
  // loads built-in modules for CommonJS without the wrappers it makes for ES modules.
  output: { dir: out, format: 'cjs', charset: 'ascii', comments: { jsdoc: false }, dynamicImportInCjs: false, entryFileNames: '[name].cjs', chunkFileNames: 'part-[name]-[hash].cjs', minify: { compress: false, mangle: false, codegen: { removeWhitespace: true } } },
});
console.log(`bundle: ${readdirSync(out).length} files in dist/bundle`);
// The code cache, made by running a few commands on the demo files (scripts/code-cache.cjs).
const cache = spawnSync(process.execPath, [join(root, 'scripts', 'code-cache.cjs')], { encoding: 'utf8' });
process.stdout.write(cache.stdout);
if (cache.status !== 0) console.log(`bundle: no code cache (${cache.stderr.trim().split('\n')[0]})`);
