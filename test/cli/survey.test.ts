import { describe, expect, it } from 'vitest';
import { expectClose, expectMatrixClose, reference } from '../helpers.js';
import { DEMO, run, runJson, tempFile } from './cliHelpers.js';

/** Pearson's X² written out directly, for hand checks. */
function chiSquare(counts: number[][]): number {
  const rows = counts.map((r) => r.reduce((s, v) => s + v, 0));
  const cols = counts[0].map((_v, j) => counts.reduce((s, r) => s + r[j], 0));
  const n = rows.reduce((s, v) => s + v, 0);
  let x2 = 0;
  counts.forEach((r, i) => r.forEach((v, j) => {
    const e = (rows[i] * cols[j]) / n;
    x2 += (v - e) ** 2 / e;
  }));
  return x2;
}

describe('sampling weights (--weight)', () => {
  const csv = 'g,a,w\nx,yes,2\nx,yes,1\nx,no,0.5\ny,no,3\ny,no,1\ny,yes,0.5\nx,no,2\ny,yes,1\n';
  const file = tempFile('weights.csv', csv);

  it("counts weighted sums and tests the table rescaled to Kish's effective sample size (hand-computed; Kish 1965)", async () => {
    const out = await runJson(['pair', file, '--rows', 'g', '--cols', 'a', '--weight', 'w']);
    // by hand: x/no = 0.5 + 2, x/yes = 2 + 1, y/no = 3 + 1, y/yes = 0.5 + 1
    expect(out.counts).toEqual([[2.5, 3], [4, 1.5]]);
    const weights = [2, 1, 0.5, 3, 1, 0.5, 2, 1];
    const sum = weights.reduce((s, v) => s + v, 0);
    const squares = weights.reduce((s, v) => s + v * v, 0);
    expect(out.weighted).toBe(true);
    expect(out.weighting).toBe('weight');
    expect(out.n).toBe(11);
    expect(out.unweightedN).toBe(8);
    expectClose(out.effectiveN, (sum * sum) / squares, 1e-14);
    const scaled = [[2.5, 3], [4, 1.5]].map((r) => r.map((v) => (v * out.effectiveN) / sum));
    expectClose(out.tests.pearson.statistic, chiSquare(scaled), 1e-12);
    expectClose(out.measures.cramersV, Math.sqrt(chiSquare([[2.5, 3], [4, 1.5]]) / 11), 1e-12);
    expect(out.tests.fisher).toBeNull();
    expect(out.warnings.map((w: any) => w.code)).toContain('weighted');
    const text = (await run(['pair', file, '--rows', 'g', '--cols', 'a', '--weight', 'w'])).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/weighted n 11 \(effective sample/);
    expect(text).toMatch(/ignores clustering and stratification/);
  });

  it('refuses text, negative and infinite weights naming the line and value; --skip-bad-rows counts them', async () => {
    for (const [value, reason] of [['abc', /"abc" is not a number/], ['-1', /"-1" is negative/], ['Infinity', /"Infinity" is not a finite number/]] as const) {
      const bad = tempFile(`bad-${value}.csv`, `g,a,w\nx,yes,1\ny,no,${value}\nx,no,1\ny,yes,1\n`);
      const r = await run(['pair', bad, '--rows', 'g', '--cols', 'a', '--weight', 'w']);
      expect(r.status).toBe(1);
      expect(r.stderr).toMatch(/line 3: --weight column "w"/);
      expect(r.stderr).toMatch(reason);
      const skipped = await runJson(['pair', bad, '--rows', 'g', '--cols', 'a', '--weight', 'w', '--skip-bad-rows']);
      expect(skipped.input.badWeightsSkipped).toBe(1);
      expect(skipped.unweightedN).toBe(3);
    }
  });

  it('reads decimal commas in a ;-separated file with --decimal-comma', async () => {
    const semi = tempFile('comma.csv', 'g;a;w\nx;yes;1,5\ny;no;2,25\nx;no;1\ny;yes;0,75\n');
    const out = await runJson(['pair', semi, '--rows', 'g', '--cols', 'a', '--weight', 'w', '--decimal-comma']);
    expect(out.counts).toEqual([[1, 1.5], [2.25, 0.75]]);
    const r = await run(['pair', semi, '--rows', 'g', '--cols', 'a', '--weight', 'w']);
    expect(r.stderr).toMatch(/pass --decimal-comma/);
  });
});

describe('frequency weights (--freq): counted elsewhere, analysed here', () => {
  it('an aggregated file gives exactly the same analysis as the expanded raw file', async () => {
    const counts = [[12, 5, 3], [4, 9, 11]];
    const rowsLevels = ['early', 'late'];
    const colsLevels = ['bus', 'walk', 'bike'];
    const aggregated = ['period,mode,count'];
    const raw = ['period,mode'];
    counts.forEach((r, i) => r.forEach((v, j) => {
      aggregated.push(`${rowsLevels[i]},${colsLevels[j]},${v}`);
      for (let k = 0; k < v; k++) raw.push(`${rowsLevels[i]},${colsLevels[j]}`);
    }));
    const a = await runJson(['pair', tempFile('agg.csv', aggregated.join('\n')), '--rows', 'period', '--cols', 'mode', '--freq', 'count']);
    const b = await runJson(['pair', tempFile('raw.csv', raw.join('\n')), '--rows', 'period', '--cols', 'mode']);
    for (const key of ['rows', 'cols', 'n', 'counts', 'expected', 'tests', 'measures', 'residuals', 'percentages', 'expectedCountRule', 'findings']) {
      expect(a[key], key).toEqual(b[key]);
    }
    expect(a.weighting).toBe('freq');
    expect(a.unweightedN).toBe(6);
    expect(b.unweightedN).toBe(44);
  });

  it('refuses a non-integer frequency', async () => {
    const r = await run(['pair', tempFile('freq-bad.csv', 'a,b,n\nx,1,2\ny,2,1.5\n'), '--rows', 'a', '--cols', 'b', '--freq', 'n']);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/line 3: --freq column "n" "1.5" is not a whole number/);
  });

  it('--weight and --freq together are a usage error', async () => {
    expect((await run(['pair', DEMO, '--rows', 'branch', '--cols', 'membership', '--weight', 'survey_weight', '--freq', 'survey_weight'])).status).toBe(2);
  });
});

describe(`layers (--by): ${reference.stratified2x2.name}`, () => {
  const lines = ['gender,decision,department'];
  const departments = ['A', 'B', 'C', 'D', 'E', 'F'];
  reference.stratified2x2.strata.forEach((t, k) => {
    const cells: [string, string, number][] = [['male', 'admitted', t[0][0]], ['male', 'rejected', t[0][1]], ['female', 'admitted', t[1][0]], ['female', 'rejected', t[1][1]]];
    for (const [g, d, count] of cells) for (let i = 0; i < count; i++) lines.push(`${g},${d},${departments[k]}`);
  });
  const file = tempFile('admissions.csv', lines.join('\n'));
  const args = ['pair', file, '--rows', 'gender', '--cols', 'decision', '--row-order', 'male,female', '--by', 'department'];

  it('gives CMH, the common odds ratio and Breslow–Day equal to statsmodels (recorded), one record per department', async () => {
    const out = await runJson(args);
    expect(out.strata.map((s: any) => s.level)).toEqual(departments);
    expect(out.strata.every((s: any) => s.testable)).toBe(true);
    expectClose(out.stratified.cmh.statistic, reference.stratified2x2.cmh.statistic, 1e-10);
    expectClose(out.stratified.commonOddsRatio.estimate, reference.stratified2x2.commonOddsRatio.estimate, 1e-12);
    expectClose(out.stratified.commonOddsRatio.lower, reference.stratified2x2.commonOddsRatio.lower, 1e-9);
    expectClose(out.stratified.breslowDay.statistic, reference.stratified2x2.breslowDay.statistic, 1e-9);
    expect(out.strata[0].counts).toEqual(reference.stratified2x2.strata[0]);
  });

  it('says in a sentence that the layers reverse the pooled association (the classic trap)', async () => {
    const out = await runJson(args);
    const codes = out.warnings.map((w: any) => w.code);
    expect(codes).toContain('reversal');
    expect(codes).toContain('layer-explains');
    expect(codes).toContain('heterogeneous-odds');
    expect(out.stratified.pooledOddsRatio).toBeGreaterThan(1);
    expect(out.stratified.commonOddsRatio.estimate).toBeLessThan(1);
    const text = (await run(args)).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/holding department fixed reverses the association/);
    expect(text).toMatch(/Within each level of department/);
    // "In words" leads with the within-department result, and the decision follows the layered test
    expect(out.verdict.test).toBe('cmh');
    expect(out.verdict.passes).toBe(false);
    expect(out.findings.statements[0].kind).toBe('held-fixed');
    expect(text).toMatch(/Holding department fixed, there is no convincing evidence that gender and decision are associated within its levels/);
    expect(text.indexOf('Holding department fixed')).toBeLessThan(text.indexOf('In the pooled table'));
    expect((await run([...args, '--exit-status'])).status).toBe(3);
  });

  it('a layer that is also --rows is a usage error', async () => {
    expect((await run(['pair', file, '--rows', 'gender', '--cols', 'decision', '--by', 'gender'])).status).toBe(2);
  });
});

describe('shaping levels: --recode, --where, --keep-missing, --other', () => {
  const csv = 'colour,size,region\nred,S,north\nred,M,south\nblue,L,north\ngreen,S,\nred,,south\nblue,XL,east\ngreen,M,north\nblue,S,south\nred,L,east\nteal,S,north\n';
  const file = tempFile('shape.csv', csv);

  it('--recode merges levels before counting', async () => {
    const out = await runJson(['pair', file, '--rows', 'colour', '--cols', 'size', '--recode', 'size:S=small,M=small,L=large,XL=large']);
    expect(out.cols.levels).toEqual(['large', 'small']);
    expect(out.n).toBe(9);
    expect(out.counts.flat().reduce((s: number, v: number) => s + v, 0)).toBe(9);
  });

  it('--where keeps or drops rows; filtered rows are counted apart from missing ones', async () => {
    const kept = await runJson(['pair', file, '--rows', 'colour', '--cols', 'size', '--where', 'region=north,south']);
    expect(kept.input.filtered).toBe(3); // two east rows and one with no region
    expect(kept.excluded).toBe(1); // red with no size
    expect(kept.n).toBe(6);
    const dropped = await runJson(['pair', file, '--rows', 'colour', '--cols', 'size', '--where', 'region!=east', '--where', 'colour!=teal']);
    expect(dropped.input.filtered).toBe(4);
    expect(dropped.rows.levels).not.toContain('teal');
    const text = (await run(['pair', file, '--rows', 'colour', '--cols', 'size', '--where', 'region=north,south'])).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/3 filtered out by --where/);
  });

  it('--keep-missing makes missing a level of its own', async () => {
    const out = await runJson(['pair', file, '--rows', 'size', '--cols', 'region', '--keep-missing']);
    expect(out.rows.levels).toContain('(missing)');
    expect(out.cols.levels).toContain('(missing)');
    expect(out.excluded).toBe(0);
    expect(out.n).toBe(10);
  });

  it('--other k keeps the k most frequent levels and merges the rest under --other-label', async () => {
    const out = await runJson(['pair', file, '--rows', 'colour', '--cols', 'size', '--other', '2', '--other-label', 'rest']);
    expect(out.rows.levels).toEqual(['blue', 'red', 'rest']);
    expect(out.n).toBe(9);
  });

  it('a malformed spec is a usage error', async () => {
    expect((await run(['pair', file, '--rows', 'colour', '--cols', 'size', '--where', 'region'])).status).toBe(2);
    expect((await run(['pair', file, '--rows', 'colour', '--cols', 'size', '--recode', 'size=S'])).status).toBe(2);
  });
});

describe('encodings and dialects', () => {
  const text = 'année,réponse\n2025,oui\n2026,non\n2025,non\n2026,oui\n2025,oui\n';
  it('reads UTF-16 BE with a byte-order mark', async () => {
    const le = Buffer.from('\ufeff' + text, 'utf16le');
    const be = Buffer.alloc(le.length);
    for (let i = 0; i < le.length; i += 2) {
      be[i] = le[i + 1];
      be[i + 1] = le[i];
    }
    const out = await runJson(['pair', tempFile('be.csv', be), '--rows', 'année', '--cols', 'réponse']);
    expect(out.counts).toEqual([[1, 2], [1, 1]]);
  });

  it('reads windows-1252 with --encoding', async () => {
    const out = await runJson(['pair', tempFile('cp1252.csv', Buffer.from(text, 'latin1')), '--rows', 'année', '--cols', 'réponse', '--encoding', 'windows-1252']);
    expect(out.rows.name).toBe('année');
  });

  it('--no-header names columns 1, 2, … and counts the first line as data', async () => {
    const out = await runJson(['pair', tempFile('noheader.csv', 'x,1\ny,2\nx,2\ny,1\nx,1\n'), '--rows', '1', '--cols', '2', '--no-header']);
    expect(out.n).toBe(5);
    expect(out.counts).toEqual([[2, 1], [1, 1]]);
  });
});

describe('the same options in scan', () => {
  it('scan --weight, --by, --where and --recode give each pair what pair gives', async () => {
    const common = ['--where', 'branch!=Westfield', '--recode', 'satisfaction:1=low,2=low,3=mid,4=high,5=high'];
    const scan = await runJson(['scan', DEMO, '--columns', 'membership,visit_frequency,satisfaction,has_children', '--weight', 'survey_weight', '--by', 'age_band', '--full', ...common]);
    expect(scan.by).toBe('age_band');
    for (const pair of scan.pairs) {
      const single = await runJson(['pair', DEMO, '--rows', pair.rows.name, '--cols', pair.cols.name, '--weight', 'survey_weight', '--by', 'age_band', ...common]);
      // the same sums, added in another order
      expectMatrixClose(pair.counts, single.counts, 1e-12);
      expectClose(pair.effectiveN, single.effectiveN, 1e-12);
      expectClose(pair.tests.pearson.statistic, single.tests.pearson.statistic, 1e-9);
      expectClose(pair.stratified.cmh.statistic, single.stratified.cmh.statistic, 1e-9);
      expect(pair.strata.map((s: any) => s.level)).toEqual(single.strata.map((s: any) => s.level));
    }
    expect(scan.input.filtered).toBeGreaterThan(0);
  });

  it('scan --freq on an aggregated file equals scan on the expanded file', async () => {
    const aggregated = ['a,b,c,n', 'x,p,u,5', 'x,q,v,2', 'y,p,v,4', 'y,q,u,7', 'x,p,v,3', 'y,q,v,1'];
    const raw = ['a,b,c'];
    for (const line of aggregated.slice(1)) {
      const [a, b, c, n] = line.split(',');
      for (let k = 0; k < Number(n); k++) raw.push(`${a},${b},${c}`);
    }
    const x = await runJson(['scan', tempFile('scan-agg.csv', aggregated.join('\n')), '--freq', 'n']);
    const y = await runJson(['scan', tempFile('scan-raw.csv', raw.join('\n'))]);
    expect(x.pairs.map((p: any) => p.tests)).toEqual(y.pairs.map((p: any) => p.tests));
    expect(x.pairs.map((p: any) => p.measures)).toEqual(y.pairs.map((p: any) => p.measures));
  });
});
