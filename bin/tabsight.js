#!/usr/bin/env node
import { existsSync } from 'node:fs';

// The bundled program when the build made one (scripts/bundle.mjs: one file
// starts faster), else the modules in dist/ as tsc wrote them.
const bundled = new URL('../dist/bundle/tabsight.js', import.meta.url);
const { main } = await import(existsSync(bundled) ? bundled.href : '../dist/cli/main.js');

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
