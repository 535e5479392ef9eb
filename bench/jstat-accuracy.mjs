// Measures jstat's chi-square tail (1 − cdf, the only route it offers)
// against the 40-digit mpmath values in fixtures/reference/reference.json,
// next to tabsight's own upper tail. This is why tabsight does not use jstat
// for p-values.
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import jstat from 'jstat';
import { upperTailChiSquare } from '../dist/stats/chiSquareDistribution.js';

const here = dirname(fileURLToPath(import.meta.url));
const reference = JSON.parse(readFileSync(join(here, '..', 'fixtures', 'reference', 'reference.json'), 'utf8'));
const worst = { jstat: 0, tabsight: 0 };
let jstatZero = 0;
const moderate = { jstat: 0, tabsight: 0 };
for (const { x, df, mpmath } of reference.chi2Sf) {
  const theirs = 1 - jstat.jStat.chisquare.cdf(x, df);
  const ours = upperTailChiSquare(x, df);
  const e1 = Math.abs(theirs - mpmath) / mpmath;
  const e2 = Math.abs(ours - mpmath) / mpmath;
  if (theirs === 0) jstatZero++;
  worst.jstat = Math.max(worst.jstat, e1);
  worst.tabsight = Math.max(worst.tabsight, e2);
  if (mpmath > 1e-6) {
    moderate.jstat = Math.max(moderate.jstat, e1);
    moderate.tabsight = Math.max(moderate.tabsight, e2);
  }
}
const n = reference.chi2Sf.length;
console.log(`chi-square upper tail on ${n} reference points (df 1 to 100000, p down to 1e-300), largest relative error:`);
console.log(`  jstat 1 − cdf : ${moderate.jstat.toExponential(1)} where p > 1e-6; ${worst.jstat.toExponential(1)} overall; returns 0 on ${jstatZero} of ${n} points`);
console.log(`  tabsight      : ${moderate.tabsight.toExponential(1)} where p > 1e-6; ${worst.tabsight.toExponential(1)} overall`);
