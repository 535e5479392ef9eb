#!/usr/bin/env node
import { main } from '../dist/cli/main.js';

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
