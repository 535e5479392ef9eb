#!/usr/bin/env node
// Time per table of the design-based statistics (src/stats, built into dist/) for r × c tables up to
// 50 × 50 (k = 49² = 2401), on seeded generated designs: 50 strata × 2 PSUs (linearised, with clusters),
// 20 strata without clusters (every row a PSU), and 80 replicate weights (jk1). The rows are tallied first;
// the time reported is what follows the read: covariance, design effects, Rao–Scott tests and the
// percentages with intervals, median of several runs. Run: npm run build && node bench/design-statistics.mjs
import { DesignTally, ReplicateCellTotals } from '../dist/stats/designTally.js';
import { linearizedCovariance, replicateCovariance } from '../dist/stats/designCovariance.js';
import { designTests } from '../dist/stats/raoScott.js';
import { designPercentages } from '../dist/stats/designPercentages.js';

function random(seed) {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

function median(values) {
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.floor(sorted.length / 2)];
}

function time(fn, runs) {
  const times = [];
  let result;
  for (let i = 0; i < runs; i++) {
    const start = performance.now();
    result = fn();
    times.push(performance.now() - start);
  }
  return { ms: median(times), result };
}

const rowsPerTable = 200_000;
console.log('r×c      k     design                    time/table   eigenvalues');
for (const size of [5, 10, 20, 30, 50]) {
  const K = size * size;
  const rand = random(size);
  const cells = Array.from({ length: rowsPerTable }, () => Math.floor(rand() * K));
  const weights = cells.map(() => 0.5 + rand() * 2);
  const strata = cells.map((_c, i) => i % 50);
  const clusters = cells.map(() => (rand() < 0.5 ? 'a' : 'b'));
  const clustered = new DesignTally({ clustered: true });
  clustered.addRows({ cell: cells, weight: weights, stratum: strata, cluster: clusters });
  const rowWise = new DesignTally({ clustered: false });
  rowWise.addRows({ cell: cells, weight: weights, stratum: cells.map((_c, i) => i % 20) });
  const replicates = new ReplicateCellTotals(80);
  const repWeights = new Float64Array(80);
  cells.forEach((cell, i) => {
    for (let r = 0; r < 80; r++) repWeights[r] = i % 80 === r ? 0 : (weights[i] * 80) / 79;
    replicates.add(cell, weights[i], repWeights);
  });
  const runs = size >= 30 ? 3 : 7;
  const cases = [
    ['50 strata × 2 PSUs', () => linearizedCovariance(clustered.totals, { layout: { size: K } })],
    ['20 strata, row PSUs', () => linearizedCovariance(rowWise.totals, { layout: { size: K } })],
    ['80 jk1 replicates', () => replicateCovariance(replicates, { method: 'jk1', layout: { size: K } })],
  ];
  for (const [name, estimate] of cases) {
    const { ms, result } = time(() => {
      const e = estimate();
      const tests = designTests(e, size, size);
      designPercentages(e, size, size);
      return tests;
    }, runs);
    const label = `${size}×${size}`.padEnd(8);
    console.log(`${label} ${String((size - 1) ** 2).padEnd(5)} ${name.padEnd(25)} ${ms.toFixed(1).padStart(8)} ms   ${result.designEffects.eigenvalueMethod}`);
  }
}
