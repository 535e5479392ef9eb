#!/usr/bin/env node
import { statSync } from 'node:fs';

// The bundled program when the build made one from the current modules
// (scripts/bundle.mjs: one file starts faster), else the modules in dist/ as
// tsc wrote them (also after a tsc run that left an older bundle behind).
const bundled = new URL('../dist/bundle/tabsight.js', import.meta.url);
const modules = new URL('../dist/cli/main.js', import.meta.url);
const bundleTime = statSync(bundled, { throwIfNoEntry: false })?.mtimeMs ?? -1;
const { main } = await import(bundleTime >= (statSync(modules, { throwIfNoEntry: false })?.mtimeMs ?? 0) ? bundled.href : modules.href);

main(process.argv).then(
  (status) => {
    process.exitCode = status;
  },
  (error) => {
    // Not a user-facing failure: a bug. Say so in one line, keep the detail for reports.
    process.stderr.write(`tabsight: internal error: ${error && error.message ? error.message : String(error)} (please report it; set TABSIGHT_DEBUG=1 for details)\n`);
    if (process.env.TABSIGHT_DEBUG) process.stderr.write(String(error && error.stack) + '\n');
    process.exitCode = 70;
  },
);
