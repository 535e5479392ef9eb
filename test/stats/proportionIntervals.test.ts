import { describe, expect, it } from 'vitest';
import { kornGraubardInterval, logitInterval } from '../../src/stats/proportionIntervals.js';
import { upperQuantileStudentT } from '../../src/stats/studentTDistribution.js';
import { expectClose } from '../helpers.js';

describe('proportion intervals', () => {
  it('Korn–Graubard with no variance and p = 0 is the Clopper–Pearson bound 1 − (α/2)^(1/n) (Clopper & Pearson 1934) on the df-adjusted size', () => {
    const n = 50;
    const df = 12;
    const ratio = upperQuantileStudentT(0.025, n - 1) / upperQuantileStudentT(0.025, df);
    const size = n * ratio * ratio;
    const interval = kornGraubardInterval(0, 0, n, df)!;
    expect(interval.lower).toBe(0);
    expectClose(interval.upper, 1 - Math.pow(0.025, 1 / size), 1e-12);
    expectClose(interval.effectiveSize, size, 1e-14);
  });

  it('Korn–Graubard with df = n − 1 and binomial variance is the Clopper–Pearson interval: 7 of 20 gives [0.1539, 0.5922] (Newcombe 1998, Stat. Med. 17, 857–872, table II, method 5)', () => {
    const p = 7 / 20;
    const interval = kornGraubardInterval(p, (p * (1 - p)) / 20, 20, 19)!;
    expectClose(interval.lower, 0.1539, 4e-4);
    expectClose(interval.upper, 0.5922, 2e-4);
  });

  it('logit interval is symmetric on the log-odds scale around logit(p)', () => {
    const interval = logitInterval(0.2, 0.04, 30)!;
    const logit = (x: number): number => Math.log(x / (1 - x));
    expectClose(logit(interval.upper) - logit(0.2), logit(0.2) - logit(interval.lower), 1e-12);
    expectClose(logit(interval.upper) - logit(0.2), (upperQuantileStudentT(0.025, 30) * 0.04) / 0.16, 1e-12);
    expect(logitInterval(0, 0.01, 30)).toBeNull();
  });
});
