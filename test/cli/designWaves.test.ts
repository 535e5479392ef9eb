// waves with a survey design: each wave an independent sample, against values
// recorded from the survey package for R (Debian r-cran-survey) on the NHANES
// 2009–2010 extract it ships, split into three waves by stratum:
// fixtures/reference/survey-waves.json (scripts/record_survey_waves.R).
// Plus properties: K = 2 is compare with the design; the last two waves are
// compare's; files and a --period column give the same record; with every row
// its own PSU and equal weights the design-based tests are the Woolf ones
// times (n − 1)/n.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { expectClose, expectCloseLabelled as close, readReferenceFixture, ROOT } from '../helpers.js';
import { survey } from '../stats/surveyFixtures.js';
import { run, runJson, tempFile } from './cliHelpers.js';

const LIBRARY = 'survey for R (r-cran-survey)';
const DATA = join(ROOT, 'fixtures', 'reference', 'survey-data');

interface WaldReference {
  wald: number;
  waldPValue: number;
  statistic: number;
  numDf: number;
  denDf: number;
  pValue: number;
}

interface WavesTableReference {
  rowVariable: string;
  colVariable: string;
  rowLevels: string[];
  colLevels: string[];
  degreesOfFreedom: number[];
  waves: { key: string; n: number; designDf: number; F: number; ndf: number; pFWithOurDf: number; logOddsRatios: number[] }[];
  sameAssociation: WaldReference;
  departures: (WaldReference & { z: number | null })[];
  trend: WaldReference & { slope: number; standardError?: number; lower: number | null; upper: number | null; intercept?: number; common?: number; scatter?: number; homogeneousQ?: number; trendQ?: number; pattern?: number[] };
  rowDrift: WaldReference;
  colDrift: WaldReference;
  logisticInteractionWald?: number;
}

interface WavesReference {
  data: string;
  split: { column: string; upTo: number[]; labels: string[] };
  design: { strata: string; cluster: string; weight: string };
  scores: number[];
  tables: WavesTableReference[];
}

const reference = readReferenceFixture<WavesReference>('survey-waves.json');
const DESIGN = ['--weight', reference.design.weight, '--strata', reference.design.strata, '--cluster', reference.design.cluster];

// The three waves as the script makes them: by stratum, w1 up to 79, w2 up to 84, w3 the rest.
const lines = readFileSync(join(DATA, reference.data), 'utf8').trim().split('\n');
const header = lines[0].split(',');
const strataAt = header.indexOf(reference.split.column);
const waveOf = (line: string): string => {
  const s = Number(line.split(',')[strataAt]);
  const k = reference.split.upTo.findIndex((limit) => s <= limit);
  return reference.split.labels[k === -1 ? reference.split.labels.length - 1 : k];
};
const column = tempFile('nhanes-waves.csv', [`${lines[0]},wave`, ...lines.slice(1).map((l) => `${l},${waveOf(l)}`)].join('\n') + '\n');
const files = reference.split.labels.map((label) => tempFile(`${label}.csv`, [lines[0], ...lines.slice(1).filter((l) => waveOf(l) === label)].join('\n') + '\n'));

function tableArgs(t: WavesTableReference): string[] {
  return ['--rows', t.rowVariable, '--cols', t.colVariable, '--row-order', t.rowLevels.join(','), '--col-order', t.colLevels.join(',')];
}

function expectWald(label: string, ours: any, ref: WaldReference, tolerance = 1e-9): void {
  close(`${label} W`, ours.wald, ref.wald, tolerance);
  close(`${label} p of W`, ours.waldPValue, ref.waldPValue, tolerance);
  close(`${label} F`, ours.statistic, ref.statistic, tolerance);
  expect(ours.df, `${label} df`).toBe(ref.numDf);
  expect(ours.denDf, `${label} denDf`).toBe(ref.denDf);
  close(`${label} p`, ours.pValue, ref.pValue, tolerance);
}

describe(`waves with a survey design against ${LIBRARY} (NHANES in three waves by stratum; svychisq, svymean, svycontrast, svyglm; recorded)`, () => {
  for (const t of reference.tables) {
    const twoByTwo = t.rowLevels.length === 2 && t.colLevels.length === 2;
    for (const [mode, args] of [
      ['one file, --period wave', ['waves', column, '--period', 'wave']],
      ['three files', ['waves', ...files]],
    ] as const) {
      it(`${t.rowVariable} × ${t.colVariable}, ${mode}: each wave's design-based F, and the tests across waves`, async () => {
        const report = await runJson([...args, ...tableArgs(t), ...DESIGN]);
        expect(report.designed).toBe(true);
        expect(report.design.kind).toBe('taylor');
        expect(report.design.waves.map((w: any) => w.degreesOfFreedom)).toEqual(t.degreesOfFreedom);
        expect(report.design.degreesOfFreedom).toBe(t.degreesOfFreedom.reduce((a, b) => a + b, 0));
        // per wave: the record pair gives with the design on that wave's rows
        t.waves.forEach((ref, k) => {
          const wave = report.waves[k];
          expect(wave.key).toBe(ref.key);
          expect(wave.design.n).toBe(ref.n);
          expect(wave.design.degreesOfFreedom).toBe(ref.designDf);
          expect(wave.verdict.test).toBe('designF');
          close(`wave ${ref.key} F`, wave.tests.designF.statistic, ref.F, 1e-9);
          close(`wave ${ref.key} numDf`, wave.tests.designF.numDf, ref.ndf, 1e-9);
          close(`wave ${ref.key} p`, wave.tests.designF.pValue, ref.pFWithOurDf, 1e-8);
        });
        // the same association in every wave
        expect(report.sameAssociation.test).toBe('design-wald');
        expectWald('same association', report.sameAssociation.design, t.sameAssociation);
        expect(report.sameAssociation.pValue).toBe(report.sameAssociation.design.pValue);
        if (t.logisticInteractionWald !== undefined) close('W against the logistic model\'s interaction Wald test', report.sameAssociation.design.wald, t.logisticInteractionWald, 1e-6);
        // the trend
        const trend = report.trend;
        expectWald('trend', trend.design.test, t.trend, twoByTwo ? 1e-9 : 1e-6);
        close('slope', trend.slope, t.trend.slope, twoByTwo ? 1e-9 : 1e-6);
        if (twoByTwo) {
          expect(trend.method).toBe('odds-ratio');
          close('slope SE', trend.design.standardError, t.trend.standardError!, 1e-9);
          close('lower', trend.lower, t.trend.lower!, 1e-9);
          close('upper', trend.upper, t.trend.upper!, 1e-9);
          close('scatter about the line', trend.design.scatter.statistic, t.trend.scatter!, 1e-9);
        } else {
          expect(trend.method).toBe('layer-effect');
          close('Q of the trend model', trend.design.scatter.statistic, t.trend.trendQ!, 1e-8);
          if (t.trend.lower === null) expect(trend.lower).toBeNull();
          else close('lower', trend.lower, t.trend.lower, 1e-6);
          if (t.trend.upper === null) expect(trend.upper).toBeNull();
          else close('upper', trend.upper, t.trend.upper, 1e-6);
        }
        // each wave against the others
        t.departures.forEach((ref, k) => {
          const d = report.departures.find((x: any) => x.wave === k);
          close(`departure ${k} F`, d.statistic, ref.statistic, 1e-9);
          expect(d.df).toBe(ref.numDf);
          expect(d.denDf).toBe(ref.denDf);
          close(`departure ${k} p`, d.pValue, ref.pValue, 1e-9);
          if (ref.z !== null) close(`departure ${k} z`, d.z, ref.z, 1e-9);
        });
        // each margin's drift
        expect(report.marginDrift.rows.test).toBe('design-wald');
        expectWald('row drift', report.marginDrift.rows.design, t.rowDrift);
        expectWald('column drift', report.marginDrift.cols.design, t.colDrift);
        expect(report.marginDrift.rows.pearson).toBeNull();
      });
    }
  }

  it('files and a --period column give the same JSON with a design (but for where the waves came from)', async () => {
    const t = reference.tables[1];
    const fromFiles = await runJson(['waves', ...files, ...tableArgs(t), ...DESIGN]);
    const fromColumn = await runJson(['waves', column, '--period', 'wave', ...tableArgs(t), ...DESIGN]);
    const strip = (report: any) => {
      const copy = JSON.parse(JSON.stringify(report));
      delete copy.setup;
      for (const w of [...copy.waves, copy.latest.before, copy.latest.after]) {
        delete w.label;
        delete w.input;
      }
      copy.latest.warnings = copy.latest.warnings.map((x: any) => x.code);
      return copy;
    };
    expect(strip(fromFiles)).toEqual(strip(fromColumn));
  });
});

describe('waves with a design: the last two waves and K = 2 are compare with the same design', () => {
  const t = reference.tables[1];
  it('K = 3: latest is field for field what compare reports for the last two waves', async () => {
    const waves = await runJson(['waves', ...files, ...tableArgs(t), ...DESIGN]);
    const compare = await runJson(['compare', files[1], files[2], ...tableArgs(t), ...DESIGN]);
    expect(waves.latest).toEqual(compare);
    expect(compare.change.method).toBe('design-wald');
  });

  it('K = 2: the same association in both waves is compare\'s change, and each margin\'s drift is compare\'s shift', async () => {
    const waves = await runJson(['waves', files[0], files[1], ...tableArgs(t), ...DESIGN]);
    const compare = await runJson(['compare', files[0], files[1], ...tableArgs(t), ...DESIGN]);
    const same = waves.sameAssociation.design;
    expectClose(same.wald, compare.change.wald, 1e-10);
    expectClose(same.statistic, compare.change.statistic, 1e-10);
    expect(same.df).toBe(compare.change.df);
    expect(same.denDf).toBe(compare.change.denDf);
    expectClose(same.pValue, compare.change.pValue, 1e-10);
    for (const [side, shift] of [
      ['rows', 'rowShift'],
      ['cols', 'colShift'],
    ] as const) {
      expectClose(waves.marginDrift[side].design.wald, compare[shift].wald, 1e-10);
      expectClose(waves.marginDrift[side].pValue, compare[shift].pValue, 1e-10);
    }
    expect(waves.latest).toEqual(compare);
  });
});

describe('waves with a design: a level absent from a wave', () => {
  const t = reference.tables[1];
  // race level "3" taken out of wave w2: its design cells must be placed by their labels, on the shared levels.
  const raceAt = header.indexOf('race');
  const without = (label: string) => lines.slice(1).filter((l) => waveOf(l) === label && !(label === 'w2' && l.split(',')[raceAt] === '3'));
  const gapFiles = reference.split.labels.map((label) => tempFile(`gap-${label}.csv`, [lines[0], ...without(label)].join('\n') + '\n'));
  const gapColumn = tempFile('gap-waves.csv', [`${lines[0]},wave`, ...reference.split.labels.flatMap((label) => without(label).map((l) => `${l},${label}`))].join('\n') + '\n');

  it('each wave is the record pair gives on its own file, files and --period agree, and the level is listed', async () => {
    const report = await runJson(['waves', ...gapFiles, ...tableArgs(t), ...DESIGN]);
    expect(report.partialLevels.rows).toEqual([{ level: '3', absentFrom: ['gap-w2'] }]);
    for (const [k, file] of gapFiles.entries()) {
      const single = await runJson(['pair', file, ...tableArgs(t), ...DESIGN]);
      for (const key of ['rows', 'cols', 'n', 'tests', 'design', 'designEffects', 'designPercentages']) expect(report.waves[k][key], `${file} ${key}`).toEqual(single[key]);
    }
    // the wave without the level still enters the drift of race (its share 0), not the log odds ratios (an empty cell)
    expect(report.sameAssociation.design.waves).toEqual(['gap-w1', 'gap-w3']);
    expect(report.warnings.map((w: any) => w.code)).toContain('design-wave-left-out');
    expect(report.marginDrift.rows.design.df).toBe(2 * (t.rowLevels.length - 1));
    const fromColumn = await runJson(['waves', gapColumn, '--period', 'wave', ...tableArgs(t), ...DESIGN]);
    expect(fromColumn.marginDrift).toEqual(report.marginDrift);
    expect(fromColumn.waves.map((w: any) => w.tests)).toEqual(report.waves.map((w: any) => w.tests));
    expect(fromColumn.trend.design.test).toEqual(report.trend.design.test);
    expect(fromColumn.trend.slope).toBe(report.trend.slope);
  });
});

describe('waves with a design: every row its own PSU, one stratum and equal weights', () => {
  it("the design-based trend is Woolf's regression with every variance times n/(n−1) (the same slope; W times (n−1)/n)", async () => {
    // three waves of n = 80 rows each, no empty cell; derived in docs/design-based.md
    const tables = [
      [
        [20, 15],
        [18, 27],
      ],
      [
        [25, 12],
        [14, 29],
      ],
      [
        [30, 9],
        [11, 30],
      ],
    ];
    const rows = ['a,b,w,one,wave'];
    tables.forEach((t, k) => t.forEach((row, i) => row.forEach((count, j) => {
      for (let m = 0; m < count; m++) rows.push(`r${i},c${j},1,s,${k + 1}`);
    })));
    const file = tempFile('srs-waves.csv', rows.join('\n') + '\n');
    const plain = await runJson(['waves', file, '--period', 'wave', '--rows', 'a', '--cols', 'b']);
    const designed = await runJson(['waves', file, '--period', 'wave', '--rows', 'a', '--cols', 'b', '--weight', 'w', '--strata', 'one']);
    const n = 80;
    expectClose(designed.trend.slope, plain.trend.woolf.slope, 1e-10);
    expectClose(designed.trend.design.standardError, plain.trend.woolf.standardError * Math.sqrt(n / (n - 1)), 1e-10);
    expectClose(designed.trend.design.test.wald, (plain.trend.woolf.test.statistic * (n - 1)) / n, 1e-10);
    expectClose(designed.trend.design.scatter.statistic, (plain.trend.woolf.residualHeterogeneity.statistic * (n - 1)) / n, 1e-10);
    expect(designed.design.waves.map((w: any) => w.degreesOfFreedom)).toEqual([n - 1, n - 1, n - 1]);
    // the same association: W is Woolf's homogeneity Σ w (y − ȳ)² times (n − 1)/n, which is the trend W plus the scatter
    expectClose(designed.sameAssociation.design.wald, designed.trend.design.test.wald + designed.trend.design.scatter.statistic, 1e-10);
  });
});

describe('waves says in every format how the waves were weighted', () => {
  const t = reference.tables[0];
  it('with a design: text, Markdown, HTML and CSV name the design in one line', async () => {
    for (const format of ['text', 'markdown', 'html', 'csv']) {
      const out = (await run(['waves', column, '--period', 'wave', ...tableArgs(t), ...DESIGN, '--format', format, '--no-color'])).stdout.replace(/\s+/g, ' ');
      expect(out, format).toMatch(/Survey design \(--strata SDMVSTRA, --cluster SDMVPSU\): each wave is its own sample/);
      expect(out, format).not.toMatch(/clustering or stratification/);
    }
    const csv = (await run(['waves', column, '--period', 'wave', ...tableArgs(t), ...DESIGN, '--format', 'csv'])).stdout.trim().split('\n');
    const columns = csv[0].split(',');
    expect(columns.slice(-3)).toEqual(['design_df', 'mean_design_effect', 'weighting']);
    expect(csv[1].split(',')[columns.indexOf('leading_test')]).toBe('designF');
  });

  it("with --weight alone: every format says that Kish's effective sample size does not account for clustering or stratification", async () => {
    const args = ['waves', column, '--period', 'wave', ...tableArgs(t), '--weight', reference.design.weight];
    const json = await runJson(args);
    expect(json.designed).toBe(false);
    expect(json.design).toBeNull();
    expect(json.sameAssociation.test).toBe('breslow-day-tarone');
    expect(json.waves[0].warnings.find((w: any) => w.code === 'weighted').message).toMatch(/ignores clustering and stratification/);
    for (const format of ['text', 'markdown', 'html', 'csv', 'tsv']) {
      const out = (await run([...args, '--format', format, '--no-color'])).stdout.replace(/\s+/g, ' ');
      expect(out, format).toMatch(/does not account for clustering or stratification/);
    }
  });

  it('an unknown --strata column is refused in one line, as pair refuses it', async () => {
    const result = await run(['waves', column, '--period', 'wave', ...tableArgs(t), '--weight', 'WTMEC2YR', '--strata', 'SDMVSTRATA']);
    expect(result.status).toBe(2);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
    expect(result.stderr).toMatch(/--strata "SDMVSTRATA": no such column/);
  });
});

describe('waves with replicate weights: each wave its own replicate estimate, and K = 2 is compare with the same replicates', () => {
  it('BRR, 16 replicates of the NHANES extract (survey for R as.svrepdesign multipliers, recorded): waves --period RIAGENDR against compare --period RIAGENDR', async () => {
    const fixture = survey.replicates.find((r) => r.method === 'brr')!;
    const dataLines = readFileSync(join(DATA, fixture.data), 'utf8').trim().split('\n');
    const names = Array.from({ length: fixture.replicates }, (_v, r) => `repw${r + 1}`);
    const weightAt = dataLines[0].split(',').indexOf(fixture.weight);
    const out = [[dataLines[0], ...names].join(',')];
    dataLines.slice(1).forEach((line, i) => {
      const w = Number(line.split(',')[weightAt]);
      out.push([line, ...fixture.multipliers[fixture.psuOfRow[i] - 1].map((m) => String(w * m))].join(','));
    });
    const file = tempFile('waves-brr.csv', out.join('\n') + '\n');
    const args = ['--period', 'RIAGENDR', '--rows', 'agecat', '--cols', 'HI_CHOL', '--weight', fixture.weight, '--replicate-weights', 'repw*', '--replicate-method', 'brr'];
    const waves = await runJson(['waves', file, ...args]);
    const compare = await runJson(['compare', file, ...args]);
    expect(waves.design.kind).toBe('replicate');
    expect(waves.design.method).toBe('brr');
    expect(waves.design.waves.map((w: any) => w.degreesOfFreedom)).toEqual([15, 15]);
    expect(waves.waves[0].verdict.test).toBe('designF');
    expect(waves.latest).toEqual(compare);
    expectClose(waves.sameAssociation.design.wald, compare.change.wald, 1e-10);
    expectClose(waves.sameAssociation.pValue, compare.change.pValue, 1e-10);
    expectClose(waves.marginDrift.rows.design.wald, compare.rowShift.wald, 1e-10);
  });
});
