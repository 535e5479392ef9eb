#!/usr/bin/env node
// Time per call of the 2×2 exact test (src/stats/fisherExact.ts, built into
// dist/) at n = 200,000 and 1,000,000, on tables with an association of a
// survey's size: the test sums only the two tails down to where their terms
// no longer change the sum (about 20 standard deviations), not the whole
// hypergeometric support. Prints one line per size: milliseconds per call and
// the terms summed against the support's size.
import { fisherExact2x2 } from '../dist/stats/fisherExact.js';

for (const n of [200_000, 1_000_000]) {
  const a = Math.round(n * 0.26);
  const b = Math.round(n * 0.24);
  const c = Math.round(n * 0.24);
  const table = [[a, b], [c, n - a - b - c]];
  let result = fisherExact2x2(table);
  for (let k = 0; k < 50; k++) result = fisherExact2x2(table); // warm up
  const runs = 200;
  const started = process.hrtime.bigint();
  for (let k = 0; k < runs; k++) result = fisherExact2x2(table);
  const ms = Number(process.hrtime.bigint() - started) / 1e6 / runs;
  const support = Math.min(a + b, a + c) - Math.max(0, a + c - (c + n - a - b - c)) + 1;
  console.log(`2x2 exact test, n = ${n.toLocaleString('en-US')}: ${ms.toFixed(3)} ms a call, ${result.work.toLocaleString('en-US')} terms of a support of ${support.toLocaleString('en-US')}`);
}
