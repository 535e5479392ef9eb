// `tabsight waves` through the command line, checked against values recorded
// from reference libraries on real data (fixtures/reference/waves-banner.json,
// written by scripts/record_waves_reference.py: GSS vocabulary waves from
// carData, Ille-et-Vilaine from R datasets, Liu 1992 from statsmodels).
import { describe, expect, it } from 'vitest';
import { expectClose } from '../helpers.js';
import { wavesReference } from '../stats/wavesReference.js';
import { DEMO, run, runJson, tempFile } from './cliHelpers.js';

const EDUCATION = ['<12', '12', '13-15', '16+'];
const VOCABULARY = ['0-4', '5-6', '7-10'];
const GSS_YEARS = wavesReference.oddsRatioTrend[1].scores.map(String);

/** Counted cells of K waves as one CSV with a period column (read back with --freq count). */
function cellsWithPeriod(name: string, waves: string[], layers: number[][][], rows: string[], cols: string[]): string {
  const lines = ['wave,r,c,count'];
  layers.forEach((t, k) => t.forEach((row, i) => row.forEach((n, j) => lines.push(`${waves[k]},${rows[i]},${cols[j]},${n}`))));
  return tempFile(name, lines.join('\n') + '\n');
}

/** The same cells as one file per wave, named by the wave. */
function cellsAsFiles(prefix: string, waves: string[], layers: number[][][], rows: string[], cols: string[]): string[] {
  return layers.map((t, k) => {
    const lines = ['r,c,count'];
    t.forEach((row, i) => row.forEach((n, j) => lines.push(`${rows[i]},${cols[j]},${n}`)));
    return tempFile(`${prefix}-${waves[k]}.csv`, lines.join('\n') + '\n');
  });
}

const PAIR = ['--rows', 'r', '--cols', 'c', '--freq', 'count'];

describe('waves: the tests across waves against recorded references, through the command', () => {
  const vocab = wavesReference.noThreeWay[0];
  const vocabFile = cellsWithPeriod('vocab.csv', GSS_YEARS, vocab.layers, EDUCATION, VOCABULARY);

  it(`${vocab.name}: the K-wave G² of no three-way interaction and each wave's departure equal statsmodels' Poisson GLM`, async () => {
    const out = await runJson(['waves', vocabFile, '--period', 'wave', ...PAIR]);
    expect(out.waves).toHaveLength(22);
    expect(out.sameAssociation.test).toBe('no-three-way-interaction');
    expect(out.sameAssociation.df).toBe(vocab.df);
    expectClose(out.sameAssociation.statistic, vocab.statistic, 1e-9);
    expectClose(out.sameAssociation.pValue, vocab.pValue, 1e-8);
    expectClose(out.sameAssociation.interaction.pearson.statistic, vocab.pearson, 1e-9);
    expect(out.sameAssociation.interaction.converged).toBe(true);
    out.departures.forEach((d: any, k: number) => {
      expect(d.df).toBe(vocab.departures[k].df);
      expectClose(d.statistic, vocab.departures[k].statistic, 1e-7);
    });
  });

  it(`${wavesReference.layerTrend[0].name}: the layer-effect trend (Xie 1992) equals statsmodels' profiled GLM, waves evenly spaced`, async () => {
    const item = wavesReference.layerTrend[0];
    const out = await runJson(['waves', vocabFile, '--period', 'wave', '--spacing', 'even', ...PAIR]);
    expect(out.trend.method).toBe('layer-effect');
    expect(out.trend.unit).toBe('wave');
    expectClose(out.trend.statistic, item.statistic, 1e-8);
    expectClose(out.trend.pValue, item.pValue, 1e-7);
    expectClose(out.trend.slope, item.beta, 1e-7);
    expectClose(out.trend.lower, item.lower, 1e-6);
    expectClose(out.trend.upper, item.upper, 1e-6);
    expect(out.trend.direction).toBe('fades');
    expect(out.verdict.pattern).toBe('fades');
  });

  it('the same GSS waves placed at their survey years: the trend is per year, and the years were read from the levels', async () => {
    const out = await runJson(['waves', vocabFile, '--period', 'wave', ...PAIR]);
    expect(out.setup.keyKind).toBe('year');
    expect(out.setup.scores.values.slice(0, 3)).toEqual([1974, 1976, 1978]);
    expect(out.trend.unit).toBe('year');
    expect(out.trend.slope).toBeLessThan(0);
  });

  for (const item of [wavesReference.equalOdds[0], wavesReference.equalOdds[1]]) {
    it(`${item.name}: Breslow–Day with Tarone's correction across K strata equals statsmodels' StratifiedTable`, async () => {
      const levels = item.strata.map((_t, k) => String(k + 1));
      const file = cellsWithPeriod(`equal-odds-${item.strata.length}.csv`, levels, item.strata, ['exposed', 'unexposed'], ['case', 'control']);
      const out = await runJson(['waves', file, '--period', 'wave', ...PAIR, '--row-order', 'exposed,unexposed', '--col-order', 'case,control']);
      expect(out.sameAssociation.test).toBe('breslow-day-tarone');
      expect(out.sameAssociation.df).toBe(item.strata.length - 1);
      expectClose(out.sameAssociation.equalOdds.commonOddsRatio.estimate, item.commonOddsRatio, 1e-12);
      expectClose(out.sameAssociation.statistic, item.tarone.statistic, 1e-9);
      expectClose(out.sameAssociation.equalOdds.uncorrected, item.breslowDay.statistic, 1e-9);
      // statsmodels 0.13 forms this p-value as 1 − cdf, good to about 1e-8 relative
      expectClose(out.sameAssociation.pValue, item.tarone.pValue, 1e-7);
    });
  }

  it(`${wavesReference.oddsRatioTrend[1].name}: the trend score test (Breslow & Day §4.4) and the Woolf regression equal the recorded numpy and statsmodels WLS values`, async () => {
    const item = wavesReference.oddsRatioTrend[1];
    const file = cellsWithPeriod('college.csv', item.scores.map(String), item.strata, ['yes', 'no'], ['yes', 'no']);
    const out = await runJson(['waves', file, '--period', 'wave', ...PAIR, '--row-order', 'yes,no', '--col-order', 'yes,no']);
    expect(out.setup.scores.values).toEqual(item.scores);
    expect(out.trend.method).toBe('odds-ratio');
    expectClose(out.trend.statistic, item.breslowDayTrend.statistic, 1e-9);
    expectClose(out.trend.pValue, item.breslowDayTrend.pValue, 1e-8);
    expectClose(out.trend.woolf.slope, item.woolf.slope, 1e-9);
    expectClose(out.trend.woolf.standardError, item.woolf.standardError, 1e-9);
    expectClose(out.trend.lower, item.woolf.lower, 1e-9);
    expectClose(out.trend.upper, item.woolf.upper, 1e-9);
    expectClose(out.trend.woolf.intercept, item.woolf.intercept, 1e-9);
    expectClose(out.trend.factor, Math.exp(item.woolf.slope), 1e-9);
    out.departures.forEach((d: any) => expectClose(d.z, item.breslowDayTrend.residuals[d.wave] as number, 1e-8));
    // the odds ratio is above 1 and falls: the association fades
    expect(out.trend.direction).toBe('fades');
  });

  it(`${wavesReference.oddsRatioTrend[0].name}: waves numbered 1 to 6 are evenly spaced, and the trend does not depend on where the numbering starts`, async () => {
    const item = wavesReference.oddsRatioTrend[0];
    const file = cellsWithPeriod('esoph.csv', item.scores.map(String), item.strata, ['case', 'control'], ['80+', 'under 80']);
    const out = await runJson(['waves', file, '--period', 'wave', ...PAIR, '--row-order', 'case,control', '--col-order', '80+,under 80']);
    expect(out.trend.unit).toBe('wave');
    expectClose(out.trend.statistic, item.breslowDayTrend.statistic, 1e-9);
    expectClose(out.trend.woolf.slope, item.woolf.slope, 1e-9);
    expectClose(out.trend.woolf.residualHeterogeneity.statistic, item.woolf.residualHeterogeneity.statistic, 1e-9);
  });

  it(`${wavesReference.marginDrift[0].name}: each margin's drift equals scipy's chi2_contingency of margin × wave`, async () => {
    const item = wavesReference.marginDrift[0];
    const out = await runJson(['waves', vocabFile, '--period', 'wave', ...PAIR]);
    expectClose(out.marginDrift.rows.pearson.statistic, item.rows.pearson.statistic, 1e-10);
    expectClose(out.marginDrift.rows.pearson.pValue, item.rows.pearson.pValue, 1e-8);
    expect(out.marginDrift.rows.pearson.df).toBe(item.rows.pearson.df);
    expectClose(out.marginDrift.cols.likelihoodRatio.statistic, item.columns.likelihoodRatio.statistic, 1e-10);
    expect(out.marginDrift.rows.drifted).toBe(true);
  });
});

describe('waves: levels present in some waves only', () => {
  const item = wavesReference.noThreeWay[2];
  const years = GSS_YEARS.slice(0, 6);

  it(`${item.name}: kept as zeros (the adjusted df of the recorded GLM), listed, and the 1974 wave analysed on its own levels`, async () => {
    const file = cellsWithPeriod('vocab-partial.csv', years, item.layers, EDUCATION, VOCABULARY);
    const out = await runJson(['waves', file, '--period', 'wave', ...PAIR]);
    expect(out.rows.levels).toEqual(EDUCATION);
    expect(out.sameAssociation.df).toBe(item.df);
    expect(out.sameAssociation.interaction.dfAdjusted).toBe(true);
    expectClose(out.sameAssociation.statistic, item.statistic, 1e-9);
    expect(out.partialLevels.rows).toEqual([{ level: '16+', absentFrom: ['1974'] }]);
    expect(out.waves[0].rows.levels).toEqual(['<12', '12', '13-15']);
    expect(out.waves[1].rows.levels).toEqual(EDUCATION);
    expect(out.warnings.find((w: any) => w.code === 'level-in-some-waves').message).toMatch(/r "16\+" \(absent from wave 1974\)/);
    expect(out.marginDrift.rows.shares[0][3]).toBe(0);
  });
});

describe('waves: two waves are compare, files and a period column are the same series', () => {
  const two = wavesReference.noThreeWay[0].layers;
  const pick = [two[0], two[21]];

  it('K = 2: the latest block equals `compare` field for field (files, and --period)', async () => {
    const [a, b] = cellsAsFiles('two', ['1974', '2016'], pick, EDUCATION, VOCABULARY);
    const waves = await runJson(['waves', a, b, ...PAIR]);
    const compare = await runJson(['compare', a, b, ...PAIR]);
    expect(waves.latest).toEqual(compare);
    const file = cellsWithPeriod('two.csv', ['1974', '2016'], pick, EDUCATION, VOCABULARY);
    const byColumn = await runJson(['waves', file, '--period', 'wave', ...PAIR]);
    const compareByColumn = await runJson(['compare', file, '--period', 'wave', ...PAIR]);
    expect(byColumn.latest).toEqual(compareByColumn);
    // and the per-wave records are those of compare's periods
    expect(waves.waves[1].tests).toEqual(compare.after.tests);
    expect(waves.waves[1].measures).toEqual(compare.after.measures);
  });

  it('files named by year and one file with a year column give the same JSON (but for where the waves came from)', async () => {
    const layers = wavesReference.noThreeWay[0].layers.slice(0, 8);
    const years = GSS_YEARS.slice(0, 8);
    const files = cellsAsFiles('series', years, layers, EDUCATION, VOCABULARY);
    const column = cellsWithPeriod('series.csv', years, layers, EDUCATION, VOCABULARY);
    const shuffled = [files[3], files[0], files[7], files[1], files[6], files[2], files[5], files[4]];
    const fromFiles = await runJson(['waves', ...shuffled, ...PAIR]);
    const fromColumn = await runJson(['waves', column, '--period', 'wave', ...PAIR]);
    const strip = (report: any) => {
      const copy = JSON.parse(JSON.stringify(report));
      delete copy.setup;
      for (const w of copy.waves) {
        delete w.label;
        delete w.input;
      }
      copy.latest = null;
      return copy;
    };
    expect(fromFiles.setup).toMatchObject({ source: 'files', orderedBy: 'names', keyKind: 'year' });
    expect(fromColumn.setup).toMatchObject({ source: 'column', period: 'wave', orderedBy: 'natural', keyKind: 'year' });
    expect(strip(fromFiles)).toEqual(strip(fromColumn));
  });

  it('a pattern of files is the same series as the files named one by one', async () => {
    const layers = wavesReference.noThreeWay[0].layers.slice(0, 3);
    const files = cellsAsFiles('glob', GSS_YEARS.slice(0, 3), layers, EDUCATION, VOCABULARY);
    const pattern = files[0].replace(/glob-\d+\.csv$/, 'glob-*.csv');
    const viaPattern = await runJson(['waves', pattern, ...PAIR, '--engine', 'builtin']);
    const viaFiles = await runJson(['waves', ...files, ...PAIR]);
    expect(viaPattern.setup.patterns).toEqual([pattern]);
    expect(viaPattern.waves.map((w: any) => w.label)).toEqual(files);
    expect(viaPattern.sameAssociation).toEqual(viaFiles.sameAssociation);
  });
});

describe('waves: order of the files', () => {
  const layers = wavesReference.noThreeWay[0].layers;
  const table = (k: number) => {
    const lines = ['r,c,count'];
    layers[k].forEach((row, i) => row.forEach((n, j) => lines.push(`${EDUCATION[i]},${VOCABULARY[j]},${n}`)));
    return lines.join('\n') + '\n';
  };

  it('ISO weeks across a year end are sorted by their dates, and the trend is per year', async () => {
    const names = ['2026-W02', '2025-W52', '2026-W01', '2025-W51'];
    const files = names.map((n, k) => tempFile(`export-${n}.csv`, table(k)));
    const out = await runJson(['waves', ...files, ...PAIR]);
    expect(out.waves.map((w: any) => w.key)).toEqual(['2025-W51', '2025-W52', '2026-W01', '2026-W02']);
    expect(out.setup.orderedBy).toBe('names');
    expect(out.trend.unit).toBe('year');
    const step = out.setup.scores.values[1] - out.setup.scores.values[0];
    expect(step).toBeCloseTo(7 / 365.2425, 11);
  });

  it('numbers sort by value (wave-9 before wave-10); --wave-order given keeps the order given', async () => {
    const files = ['wave-10', 'wave-9', 'wave-11'].map((n, k) => tempFile(`${n}.csv`, table(k)));
    const sorted = await runJson(['waves', ...files, ...PAIR]);
    expect(sorted.waves.map((w: any) => w.key)).toEqual(['wave-9', 'wave-10', 'wave-11']);
    expect(sorted.trend.unit).toBe('wave');
    const given = await runJson(['waves', ...files, ...PAIR, '--wave-order', 'given']);
    expect(given.waves.map((w: any) => w.key)).toEqual(['wave-10', 'wave-9', 'wave-11']);
  });

  it('two files with the same week, or names that mix dates and weeks, are refused with one line and status 2', async () => {
    const a = tempFile('a-2026-W03.csv', table(0));
    const b = tempFile('b-2026-W03.csv', table(1));
    const clash = await run(['waves', a, b, ...PAIR]);
    expect(clash.status).toBe(2);
    expect(clash.stderr).toMatch(/^tabsight: cannot order the waves by their file names: .*a-2026-W03\.csv and .*b-2026-W03\.csv carry the same week \(2026-W03\); .*--wave-order given\n$/);
    expect((await run(['waves', a, b, ...PAIR, '--wave-order', 'given'])).status).toBe(0);
  });
});

describe('waves: the decision, and every format holds it', () => {
  const item = wavesReference.oddsRatioTrend[1];
  const file = cellsWithPeriod('college-formats.csv', item.scores.map(String), item.strata, ['yes', 'no'], ['yes', 'no']);
  const args = ['waves', file, '--period', 'wave', ...PAIR, '--row-order', 'yes,no', '--col-order', 'yes,no'];

  it('JSON: Holm over the two tests across waves decides; the waves that stand out are Holm-adjusted over the waves', async () => {
    const out = await runJson(args);
    const v = out.verdict;
    expect(v.pattern).toBe('fades');
    expect(v.moved).toBe(true);
    // Holm (1979) with two p-values: the smaller doubled, the larger kept (monotone)
    const [small, large] = [out.trend.pValue, out.sameAssociation.pValue].sort((x, y) => x - y);
    expect(v.decidingPValue).toBeCloseTo(2 * small, 20);
    expect(Math.max(v.trend.adjustedPValue, v.sameAssociation.adjustedPValue)).toBe(Math.max(large, 2 * small));
    const named = out.statements.filter((s: any) => s.kind === 'stands-out').map((s: any) => s.key);
    const standing = out.departures.filter((d: any) => d.standsOut);
    expect(standing.every((d: any) => d.adjustedPValue <= v.alpha)).toBe(true);
    expect(named.every((k: string) => standing.some((d: any) => d.key === k))).toBe(true);
    expect(out.statements.at(-1)).toEqual({ kind: 'many-looks', waves: 22 });
  });

  it('text, CSV, Markdown and HTML show the same decision; --exit-status follows it', async () => {
    const text = (await run(args)).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/■ Over the 22 waves the association fades \(strong evidence\): adjusted p 9\.20e−14 ≤ α 0\.05/);
    expect(text).toMatch(/□ No evidence that the association changed from 2014 to 2016/);
    const csv = (await run([...args, '--format', 'csv'])).stdout.trim().split('\n');
    expect(csv).toHaveLength(23);
    const header = csv[0].split(',');
    const last = csv[22].split(',');
    expect(last[header.indexOf('moved')]).toBe('true');
    expect(last[header.indexOf('pattern')]).toBe('fades');
    expect(last[header.indexOf('latest_changed')]).toBe('false');
    const md = (await run([...args, '--format', 'markdown'])).stdout;
    expect(md).toContain('**Over all waves.** Over the 22 waves the association fades (strong evidence)');
    const html = (await run([...args, '--format', 'html'])).stdout;
    expect(html).toContain('Over the 22 waves the association fades (strong evidence)');
    expect(html).toMatch(/<svg[^>]*class="waves-v"/);
    expect(html).toMatch(/<svg[^>]*class="waves-odds-ratio"/);
    expect((await run([...args, '--exit-status'])).status).toBe(0);
  });

  it('a stable series: two identical waves and more show no movement, and --exit-status says 3', async () => {
    const t = wavesReference.noThreeWay[0].layers[5];
    const same = cellsWithPeriod('stable.csv', ['1', '2', '3'], [t, t, t], EDUCATION, VOCABULARY);
    const out = await runJson(['waves', same, '--period', 'wave', ...PAIR]);
    expect(out.verdict.pattern).toBe('stable');
    expect(out.verdict.moved).toBe(false);
    expect(out.sameAssociation.statistic).toBeCloseTo(0, 8);
    expect((await run(['waves', same, '--period', 'wave', ...PAIR, '--exit-status'])).status).toBe(3);
    const text = (await run(['waves', same, '--period', 'wave', ...PAIR])).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/□ No evidence that the association moved over the 3 waves/);
  });
});

describe('waves: weights and the per-wave analysis', () => {
  it('each wave is the analysis `pair` gives that wave (sampling weights: Kish effective size), on the demo survey', async () => {
    const out = await runJson(['waves', DEMO, '--period', 'has_children', '--rows', 'age_band', '--cols', 'membership', '--weight', 'survey_weight']);
    expect(out.weighted).toBe(true);
    for (const [k, level] of ['no', 'yes'].entries()) {
      const pair = await runJson(['pair', DEMO, '--rows', 'age_band', '--cols', 'membership', '--weight', 'survey_weight', '--where', `has_children=${level}`]);
      expect(out.waves[k].effectiveN).toBe(pair.effectiveN);
      expect(out.waves[k].tests).toEqual(pair.tests);
      expect(out.waves[k].verdict).toEqual(pair.verdict);
    }
  });

  it('rows left out for a missing value are counted in their wave; rows without a wave are counted and said', async () => {
    const lines = ['wave,r,c'];
    for (const [w, r, c, n] of [['1', 'a', 'x', 20], ['1', 'b', 'y', 20], ['1', 'a', 'y', 8], ['1', 'b', 'x', 7], ['2', 'a', 'x', 15], ['2', 'b', 'y', 18], ['2', 'a', 'y', 9], ['2', 'b', 'x', 6], ['1', '', 'x', 3], ['', 'a', 'x', 4]] as const) {
      for (let i = 0; i < n; i++) lines.push(`${w},${r},${c}`);
    }
    const file = tempFile('missing-waves.csv', lines.join('\n') + '\n');
    const out = await runJson(['waves', file, '--period', 'wave', '--rows', 'r', '--cols', 'c']);
    expect(out.waves.map((w: any) => w.excluded)).toEqual([3, 0]);
    expect(out.setup.withoutWave).toBe(4);
    expect(out.warnings.find((w: any) => w.code === 'no-wave').message).toMatch(/^4 rows are in no wave/);
  });
});

describe('waves: sparse waves', () => {
  it('the demo survey in three branches: sparse waves lead with exact or simulated p-values, the trend model that finds no finite estimate gives no trend (and no hang), and both are said', async () => {
    const out = await runJson(['waves', DEMO, '--period', 'branch', '--levels', 'Old Town,Riverside,Westfield', '--rows', 'heard_via', '--cols', 'satisfaction']);
    expect(out.waves.map((w: any) => w.verdict.test)).not.toContain('pearson');
    expect(out.trend).toBeNull();
    expect(out.verdict.trend).toBeNull();
    expect(['differs', 'stable']).toContain(out.verdict.pattern);
    const codes = out.warnings.map((w: any) => w.code);
    expect(codes).toContain('trend-not-fitted');
    expect(codes).toContain('sparse-waves');
  });
});

describe('waves: bad usage is one line with its status', () => {
  it('one file without --period, --levels naming an absent level, standard input without --period', async () => {
    const file = tempFile('one.csv', 'r,c\na,x\nb,y\n');
    const one = await run(['waves', file, '--rows', 'r', '--cols', 'c']);
    expect(one.status).toBe(2);
    expect(one.stderr).toMatch(/^tabsight: waves needs several files/);
    const levels = await run(['waves', DEMO, '--period', 'branch', '--levels', 'Old Town,Atlantis', '--rows', 'age_band', '--cols', 'membership']);
    expect(levels.status).toBe(2);
    expect(levels.stderr).toMatch(/"Atlantis" is not a level of branch/);
    expect((await run(['waves', '-', 'x.csv', '--rows', 'r', '--cols', 'c'], 'r,c\n')).status).toBe(2);
    // quantile bins of each file would give each wave its own levels
    const bins = await run(['waves', file, file, '--rows', 'r', '--cols', 'c', '--bins', '3', '--wave-order', 'given']);
    expect(bins.status).toBe(2);
    expect(bins.stderr).toMatch(/--bins cuts a side at the quantiles .* give fixed cut points with --cuts/);
    expect((await run(['waves', file, file, '--rows', 'r', '--cols', 'c', '--cells', 'counts', '--wave-order', 'given'])).status).toBe(2);
    const none = await run(['waves', file.replace(/one\.csv$/, 'nothing-*.csv'), '--rows', 'r', '--cols', 'c', '--engine', 'builtin']);
    expect(none.status).toBe(1);
    expect(none.stderr).toMatch(/no file matches this pattern/);
  });
});
