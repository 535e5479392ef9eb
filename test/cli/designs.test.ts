// Survey designs through the commands (pair, scan, compare), against values
// recorded from the survey package for R (Debian r-cran-survey 4.1-1-1) on
// public design data it ships: fixtures/reference/survey-reference.json
// (scripts/record_survey_reference.R) and survey-commands.json
// (scripts/record_survey_commands.R). Differences of convention (which df,
// Kish's cell design effect) are handled as those scripts describe.
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { expectClose, expectCloseLabelled as close, readReferenceFixture, ROOT } from '../helpers.js';
import { survey, type DesignSpec, type ProportionReference, type TableReference } from '../stats/surveyFixtures.js';
import { run, runJson, tempFile } from './cliHelpers.js';

const LIBRARY = 'survey for R (r-cran-survey 4.1-1-1)';
const DATA = join(ROOT, 'fixtures', 'reference', 'survey-data');
const data = (file: string) => join(DATA, file);

function designArgs(design: DesignSpec): string[] {
  return [
    '--weight',
    design.weight,
    ...(design.strata ? ['--strata', design.strata] : []),
    ...(design.cluster ? ['--cluster', design.cluster] : []),
    ...(design.fpc ? ['--fpc', design.fpc] : []),
  ];
}

function tableArgs(file: string, table: { rowVariable: string; colVariable: string; rowLevels: string[]; colLevels: string[] }): string[] {
  return ['pair', data(file), '--rows', table.rowVariable, '--cols', table.colVariable, '--row-order', table.rowLevels.join(','), '--col-order', table.colLevels.join(',')];
}

/** The design-based fields of a pair report against a recorded table. */
function expectLibraryTable(report: any, ref: TableReference): void {
  const k = (ref.rowLevels.length - 1) * (ref.colLevels.length - 1);
  expect(report.rows.levels).toEqual(ref.rowLevels);
  expect(report.cols.levels).toEqual(ref.colLevels);
  expect(report.design.n).toBe(ref.n);
  expect(report.design.degreesOfFreedom).toBe(ref.designDf);
  const t = report.tests;
  close('designF.statistic', t.designF.statistic, ref.F, 1e-10);
  close('designF.numDf', t.designF.numDf, ref.ndf, 1e-10);
  close('designF.denDf', t.designF.denDf, ref.ndf * ref.designDf, 1e-10);
  close('designF.pValue', t.designF.pValue, ref.pFWithOurDf, 1e-9);
  close('designPearson.statistic', t.designPearson.statistic, ref.chisq, 1e-10);
  close('designPearson.pValue', t.designPearson.pValue, ref.pChisq, 1e-9);
  expect(t.designPearson.df).toBe(k);
  close('designPearson.uncorrected', t.designPearson.uncorrected, ref.X2, 1e-10);
  close('designLikelihoodRatio.statistic', t.designLikelihoodRatio.statistic, ref.chisqG2, 1e-10);
  close('designLikelihoodRatio.pValue', t.designLikelihoodRatio.pValue, ref.pChisqG2, 1e-9);
  close('designLikelihoodRatio.uncorrected', t.designLikelihoodRatio.uncorrected, ref.G2, 1e-10);
  const effects = report.design.designEffects;
  close('designEffects.mean', effects.mean, ref.meanDesignEffect, 1e-10);
  close('designPearson.meanDesignEffect', t.designPearson.meanDesignEffect, ref.meanDesignEffect, 1e-10);
  const largest = ref.eigenvalues[ref.eigenvalues.length - 1];
  ref.eigenvalues.forEach((v, i) => expect(Math.abs(effects.eigenvalues[i] - v) / largest, `eigenvalue ${i}`).toBeLessThan(1e-10));
  close('designEffects.max', effects.max, largest, 1e-10);
  // cell design effects: the library divides by p(1 − p)/(n − 1), Kish by p(1 − p)/n
  const c = ref.colLevels.length;
  ref.cellDeffReplace.forEach((d, j) => {
    const ours = report.designEffects[Math.floor(j / c)][j % c];
    if (d === null) expect(ours, `cell ${j} is empty`).toBeNull();
    else close(`design effect of cell ${j}`, ours, (d * ref.n) / (ref.n - 1), 1e-10);
  });
  // the decision rests on the second-order F
  expect(report.verdict.test).toBe('designF');
  expect(report.verdict.reason).toBe('survey-design');
  expect(report.verdict.route).toBe('design-based');
  expect(report.verdict.pValue).toBe(t.designF.pValue);
  expect(report.verdict.passes).toBe(t.designF.pValue <= report.verdict.alpha);
  expect(report.tests.fisher).toBeNull();
  expect(report.tests.monteCarlo).toBeNull();
  // the design-effective sample: n / δ̄, the size every other test and interval uses
  close('effectiveN', report.effectiveN, ref.n / ref.meanDesignEffect, 1e-10);
  close("design-scaled Cramér's V", report.measures.designCramersV.value, Math.sqrt(ref.X2 / (ref.n * (Math.min(ref.rowLevels.length, ref.colLevels.length) - 1))), 1e-10);
}

describe(`pair with strata, clusters and fpc agrees with ${LIBRARY} (svychisq, svymean; recorded)`, () => {
  for (const design of survey.taylor) {
    for (const table of design.tables) {
      it(`${design.name}: ${table.rowVariable} × ${table.colVariable}`, async () => {
        const report = await runJson([...tableArgs(design.data, table), ...designArgs(design.design)]);
        expectLibraryTable(report, table);
        expect(report.design.kind).toBe('taylor');
        expect(report.design.columns.strata).toBe(design.design.strata);
        expect(report.design.columns.cluster).toBe(design.design.cluster);
      });
    }
  }

  it(`${survey.domain.name}: rows left out by --where stay in the design (the library's subset())`, async () => {
    const { domain } = survey;
    const report = await runJson([...tableArgs(domain.data, domain.table), ...designArgs(domain.design), '--where', `${domain.filter.column}=${domain.filter.value}`]);
    expectLibraryTable(report, domain.table);
    expect(report.input.filtered).toBeGreaterThan(0);
  });

  it('NHANES HI_CHOL × race: the 745 rows with HI_CHOL missing are a domain, left out of the table but not of the design (15 strata, 31 PSUs)', async () => {
    const design = survey.taylor[4];
    const table = design.tables[0];
    const report = await runJson([...tableArgs(design.data, table), ...designArgs(design.design)]);
    expect(report.excluded).toBe(745);
    expect(report.design.strata).toBe(15);
    expect(report.design.clusters).toBe(31);
  });
});

describe(`design-based percentages through pair agree with ${LIBRARY} (svymean, svyciprop; recorded)`, () => {
  const share = (label: string, ours: any, ref: ProportionReference, df: number) => {
    close(`${label} estimate`, ours.estimate, 100 * ref.proportion, 1e-12);
    if (ref.standardError === 0) expect(ours.standardError).toBeLessThan(1e-13);
    else close(`${label} se`, ours.standardError, 100 * ref.standardError, 1e-10);
    const kornGraubard = ref.kornGraubardLibraryDf === df ? ref.kornGraubardLibrary : ref.kornGraubardOurDf;
    if (ours.method === 'logit') {
      // the library's logit interval comes from an iterated fit (converged to about 1e-9)
      close(`${label} lower`, ours.lower, 100 * ref.logit[0], 1e-7);
      close(`${label} upper`, ours.upper, 100 * ref.logit[1], 1e-7);
    } else if (ref.proportion > 0 && ref.proportion < 1) {
      close(`${label} lower`, ours.lower, 100 * kornGraubard[0], 1e-9);
      close(`${label} upper`, ours.upper, 100 * kornGraubard[1], 1e-9);
    }
  };
  for (const fixture of survey.percentages) {
    it(`${fixture.name}: ${fixture.ref.rowVariable} × ${fixture.ref.colVariable}, row, column and cell shares and margins`, async () => {
      const { ref } = fixture;
      const report = await runJson([...tableArgs(fixture.data, ref), ...designArgs(fixture.design)]);
      const p = report.designPercentages;
      expect(p.degreesOfFreedom).toBe(ref.designDf);
      expect(p.confidence).toBe(0.95);
      const c = ref.colLevels.length;
      ref.cell.forEach((x, at) => share(`cell ${at}`, p.total[Math.floor(at / c)][at % c], x, ref.designDf));
      ref.row.forEach((x, at) => share(`row ${at}`, p.row[Math.floor(at / c)][at % c], x, ref.designDf));
      ref.column.forEach((x, at) => share(`column ${at}`, p.col[Math.floor(at / c)][at % c], x, ref.designDf));
      ref.rowMargins.forEach((x, i) => share(`row margin ${i}`, p.rowMargins[i], x, ref.designDf));
      ref.columnMargins.forEach((x, j) => share(`column margin ${j}`, p.colMargins[j], x, ref.designDf));
    });
  }
});

describe(`lonely PSU treatments through pair agree with ${LIBRARY} (NHANES with stratum 89 left one PSU; recorded)`, () => {
  const { lonely } = survey;
  const args = [...tableArgs(lonely.data, lonely.certainty), ...designArgs(lonely.design)];

  it(`fail (the default): exit 1, one line naming the stratum and the option (the library: "${lonely.failMessage}")`, async () => {
    const result = await run(args);
    expect(result.status).toBe(1);
    expect(result.stdout).toBe('');
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
    expect(result.stderr).toMatch(/stratum "89" has only one PSU.*--lonely-psu certainty, adjust or average/);
  });

  for (const treatment of ['certainty', 'adjust', 'average'] as const) {
    it(`--lonely-psu ${treatment} (options(survey.lonely.psu = "${treatment}")), with a warning naming the stratum`, async () => {
      const report = await runJson([...args, '--lonely-psu', treatment]);
      expectLibraryTable(report, lonely[treatment]);
      expect(report.design.lonelyPsu).toBe(treatment);
      expect(report.design.lonelyStrata).toEqual(['89']);
      expect(report.warnings.find((w: any) => w.code === 'lonely-psu').message).toMatch(/"89".*--lonely-psu/);
    });
  }
});

/** A CSV of a recorded replicate design: the data with one full replicate weight column per replicate (weight × the recorded multiplier of the row's PSU). */
function replicateFile(fixture: (typeof survey.replicates)[number]): string {
  const lines = readFileSync(data(fixture.data), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  const weightAt = header.indexOf(fixture.weight);
  const names = Array.from({ length: fixture.replicates }, (_v, r) => `repw${r + 1}`);
  const out = [[...header, ...names].join(',')];
  lines.slice(1).forEach((line, i) => {
    const w = Number(line.split(',')[weightAt]);
    const multipliers = fixture.multipliers[fixture.psuOfRow[i] - 1];
    out.push([line, ...multipliers.map((m) => String(w * m))].join(','));
  });
  return tempFile(`replicates-${fixture.method}.csv`, out.join('\n') + '\n');
}

describe(`pair with replicate weights agrees with ${LIBRARY} (as.svrepdesign replicates, recorded)`, () => {
  for (const fixture of survey.replicates) {
    for (const table of fixture.tables) {
      it(`--replicate-method ${fixture.method}, ${fixture.replicates} replicates (${fixture.source}): ${table.rowVariable} × ${table.colVariable}`, async () => {
        const file = replicateFile(fixture);
        const extra =
          fixture.method === 'fay'
            ? ['--fay-rho', String(fixture.rho)]
            : fixture.method === 'jkn'
              ? ['--replicate-scales', tempFile('jkn-scales.txt', fixture.rscales.join('\n') + '\n')]
              : [];
        const report = await runJson([
          'pair',
          file,
          '--rows',
          table.rowVariable,
          '--cols',
          table.colVariable,
          '--row-order',
          table.rowLevels.join(','),
          '--col-order',
          table.colLevels.join(','),
          '--weight',
          fixture.weight,
          '--replicate-weights',
          'repw*',
          '--replicate-method',
          fixture.method,
          ...extra,
        ]);
        expectLibraryTable(report, table);
        expect(report.design.kind).toBe('replicate');
        expect(report.design.replicates).toBe(fixture.replicates);
        expect(report.design.method).toBe(fixture.method);
        expect(report.design.columns.replicates).toHaveLength(fixture.replicates);
        expect(report.design.strata).toBeNull();
      });
    }
  }

  it('a comma list of replicate columns, and jkn scale factors as a comma list, give the same record as a pattern and a file', async () => {
    const fixture = survey.replicates.find((r) => r.method === 'jkn')!;
    const table = fixture.tables[0];
    const file = replicateFile(fixture);
    const base = ['pair', file, '--rows', table.rowVariable, '--cols', table.colVariable, '--weight', fixture.weight, '--replicate-method', 'jkn'];
    const names = Array.from({ length: fixture.replicates }, (_v, r) => `repw${r + 1}`).join(',');
    const listed = await runJson([...base, '--replicate-weights', names, '--replicate-scales', fixture.rscales.join(',')]);
    const patterned = await runJson([...base, '--replicate-weights', 'repw*', '--replicate-scales', tempFile('scales.txt', fixture.rscales.join(' '))]);
    expect(listed.tests).toEqual(patterned.tests);
    expect(listed.design).toEqual(patterned.design);
  });
});

describe('usage errors of the design options (exit 2, one line naming the clash)', () => {
  const nhanes = ['pair', data('nhanes.csv'), '--rows', 'agecat', '--cols', 'race'];
  const cases: [string, string[], RegExp][] = [
    ['replicate weights with --strata', ['--weight', 'WTMEC2YR', '--replicate-weights', 'x*', '--replicate-method', 'brr', '--strata', 'SDMVSTRA'], /--replicate-weights cannot be combined with --strata/],
    ['replicate weights with --cluster', ['--weight', 'WTMEC2YR', '--replicate-weights', 'x*', '--replicate-method', 'brr', '--cluster', 'SDMVPSU'], /--replicate-weights cannot be combined with --cluster/],
    ['replicate weights without a method', ['--weight', 'WTMEC2YR', '--replicate-weights', 'x*'], /needs --replicate-method/],
    ['replicate weights without --weight', ['--replicate-weights', 'x*', '--replicate-method', 'jk1'], /needs --weight/],
    ['--fay-rho with another method', ['--weight', 'WTMEC2YR', '--replicate-weights', 'x*', '--replicate-method', 'brr', '--fay-rho', '0.3'], /--fay-rho applies to --replicate-method fay/],
    ['--fay-rho out of range', ['--weight', 'WTMEC2YR', '--replicate-weights', 'x*', '--replicate-method', 'fay', '--fay-rho', '1'], /--fay-rho "1"/],
    ['jkn without scale factors', ['--weight', 'WTMEC2YR', '--replicate-weights', 'x*', '--replicate-method', 'jkn'], /needs --replicate-scales/],
    ['a replicate option without replicate weights', ['--replicate-method', 'jk1'], /--replicate-method needs --replicate-weights/],
    ['--lonely-psu without a design', ['--lonely-psu', 'adjust'], /--lonely-psu needs a survey design/],
    ['a design with --freq', ['--freq', 'WTMEC2YR', '--strata', 'SDMVSTRA'], /--freq cannot be combined/],
    ['a design with --by', ['--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--by', 'RIAGENDR'], /--by cannot be combined/],
    ['an unknown stratum column', ['--weight', 'WTMEC2YR', '--strata', 'SDMVSTRATA'], /--strata "SDMVSTRATA": no such column.*did you mean "SDMVSTRA"/],
    ['a pattern that matches no column', ['--weight', 'WTMEC2YR', '--replicate-weights', 'nothing*', '--replicate-method', 'jk1'], /matches no column/],
    ['--fpc that is also the weight', ['--weight', 'WTMEC2YR', '--fpc', 'WTMEC2YR'], /--fpc "WTMEC2YR" is also the --weight column/],
  ];
  for (const [name, args, message] of cases) {
    it(name, async () => {
      const result = await run([...nhanes, ...args]);
      expect(result.status, result.stderr).toBe(2);
      expect(result.stderr.trim().split('\n')).toHaveLength(1);
      expect(result.stderr).toMatch(message);
    });
  }

  it('jkn scale factors that do not match the replicate columns one for one', async () => {
    const fixture = survey.replicates.find((r) => r.method === 'jkn')!;
    const result = await run(['pair', replicateFile(fixture), '--rows', 'sch.wide', '--cols', 'awards', '--weight', 'pw', '--replicate-weights', 'repw*', '--replicate-method', 'jkn', '--replicate-scales', '0.5,0.5']);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/--replicate-scales gives 2 scale factors for 200 replicate weight columns/);
  });

  it('scan and compare take the same options and refuse the same clashes', async () => {
    for (const command of [
      ['scan', data('nhanes.csv')],
      ['compare', data('nhanes.csv'), data('nhanes.csv'), '--rows', 'agecat', '--cols', 'race'],
    ]) {
      const result = await run([...command, '--weight', 'WTMEC2YR', '--replicate-weights', 'x*', '--replicate-method', 'brr', '--strata', 'SDMVSTRA']);
      expect(result.status).toBe(2);
      expect(result.stderr).toMatch(/--replicate-weights cannot be combined with --strata/);
    }
  });
});

describe('rows without a usable design value: one line naming the file, line and column, or counted with --skip-bad-rows', () => {
  const csv = 'a,b,s,c,w,f\nx,p,1,1,2,10\ny,q,1,2,1,10\nx,q,,1,1,10\ny,p,2,1,3,10\nx,p,2,2,1,10\ny,q,2,3,2,10\n';
  const file = tempFile('bad-design.csv', csv);
  const base = ['pair', file, '--rows', 'a', '--cols', 'b', '--weight', 'w', '--strata', 's', '--cluster', 'c'];

  it('a missing stratum stops the run (exit 1) naming line 4 and the column', async () => {
    const result = await run(base);
    expect(result.status).toBe(1);
    expect(result.stderr).toMatch(/bad-design\.csv, line 4: --strata column "s" has no value.*--skip-bad-rows/);
  });

  it('with --skip-bad-rows the row is counted, reported and left out of the design', async () => {
    const report = await runJson([...base, '--skip-bad-rows']);
    expect(report.input.badDesignSkipped).toBe(1);
    expect(report.unweightedN).toBe(5);
    expect(report.design.clusters).toBe(5);
    const text = (await run([...base, '--skip-bad-rows'])).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/1 row without a usable stratum, cluster, fpc or replicate weight skipped/);
  });

  it('an --fpc that is not a number, and one that varies within a stratum, name the value', async () => {
    const text = tempFile('bad-fpc.csv', csv.replace(',,1,1,10', ',1,1,1,ten'));
    const bad = await run(['pair', text, '--rows', 'a', '--cols', 'b', '--weight', 'w', '--strata', 's', '--cluster', 'c', '--fpc', 'f']);
    expect(bad.status).toBe(1);
    expect(bad.stderr).toMatch(/line 4: --fpc column "f" "ten" is not a number/);
    const varying = tempFile('varying-fpc.csv', csv.replace(',,1,1,10', ',1,1,1,12'));
    const result = await run(['pair', varying, '--rows', 'a', '--cols', 'b', '--weight', 'w', '--strata', 's', '--cluster', 'c', '--fpc', 'f']);
    expect(result.status).toBe(1);
    expect(result.stderr).toMatch(/--fpc is not constant within stratum "1": 12 on line 4, 10 on line 2/);
  });

  it('an empty replicate weight names its line and column', async () => {
    const replicate = tempFile('bad-replicate.csv', 'a,b,w,r1,r2\nx,p,1,1,2\ny,q,1,2,\nx,q,1,1,1\ny,p,1,2,1\n');
    const result = await run(['pair', replicate, '--rows', 'a', '--cols', 'b', '--weight', 'w', '--replicate-weights', 'r*', '--replicate-method', 'jk1']);
    expect(result.status).toBe(1);
    expect(result.stderr).toMatch(/line 3: --replicate-weights column "r2" is empty/);
  });
});

describe('one decision in every format and in the exit status, from the design-based F (NHANES, recorded by the survey package)', () => {
  const design = survey.taylor[4];
  // HI_CHOL × race: F p = 0.0587 (not associated at 0.05, associated at 0.1); agecat × race: p = 1.1e−12
  const cases = [
    { table: design.tables[0], alpha: '0.05', passes: false },
    { table: design.tables[0], alpha: '0.1', passes: true },
    { table: design.tables[1], alpha: '0.05', passes: true },
  ];
  for (const { table, alpha, passes } of cases) {
    it(`${table.rowVariable} × ${table.colVariable} at α ${alpha}: ${passes ? 'associated' : 'not shown to be associated'} in text, JSON, CSV, TSV, Markdown, HTML and --exit-status`, async () => {
      const args = [...tableArgs(design.data, table), ...designArgs(design.design), '--alpha', alpha];
      expect(passes).toBe(table.pFWithOurDf <= Number(alpha));
      const json = await runJson(args);
      expect(json.verdict.passes).toBe(passes);
      const text = (await run([...args, '--no-color'])).stdout.replace(/\s+/g, ' ');
      expect(text).toMatch(passes ? /■ Associated/ : /□ Not shown to be associated/);
      expect(text).toMatch(/design-based F test \(Rao–Scott\)/);
      for (const [format, sep] of [
        ['csv', ','],
        ['tsv', '\t'],
      ] as const) {
        const lines = (await run([...args, '--format', format])).stdout.split('\n');
        expect(lines).toContain(['verdict', 'passes', '', '', passes ? '1' : '0', '', '', '', String(passes)].join(sep));
        expect(lines).toContain(['verdict', 'leading_p_value', '', '', '', '', String(json.verdict.pValue), '', 'designF'].join(sep));
      }
      const markdown = (await run([...args, '--format', 'markdown'])).stdout;
      expect(markdown).toMatch(passes ? /\*\*Associated/ : /\*\*Not shown to be associated/);
      const html = (await run([...args, '--format', 'html'])).stdout;
      expect(html).toMatch(passes ? /<p class="lead">Associated/ : /<p class="lead">Not shown to be associated/);
      expect((await run([...args, '--exit-status'])).status).toBe(passes ? 0 : 3);
    });
  }

  it('the text report says what the design does to the evidence, each cell\'s design effect, the shares with their interval, and the V\'s meaning', async () => {
    const text = (await run([...tableArgs(design.data, design.tables[1]), ...designArgs(design.design), '--no-color'])).stdout.replace(/\s+/g, ' ');
    expect(text).toMatch(/15 strata, 31 PSUs, 16 degrees of freedom \(--strata SDMVSTRA, --cluster SDMVPSU\)/);
    expect(text).toMatch(/mean design effect 1\.458 \(from 0\.122 to 4\.684\): the 8,591 rows in the table are worth about as much as 5,894 from a simple random sample \(a mean design effect of 2 halves the evidence\)/);
    expect(text).toMatch(/Design effect of each cell/);
    expect(text).toMatch(/95% intervals: logit, with t on 16 df; Korn–Graubard/);
    expect(text).toMatch(/the design changes how sure one can be of it, not how strong it is/);
    expect(text).toMatch(/the design has 16 degrees of freedom/);
    expect(text).not.toMatch(/clustering and stratification/);
  });
});

describe("without a design, --weight keeps Kish's rescaling and every format says in one line that clustering and stratification are not accounted for", () => {
  const args = ['pair', data('nhanes.csv'), '--rows', 'agecat', '--cols', 'race', '--weight', 'WTMEC2YR'];
  it('pair: text, JSON, CSV, Markdown, HTML', async () => {
    const json = await runJson(args);
    expect(json.design).toBeNull();
    expect(json.tests.designF).toBeNull();
    expect(json.verdict.test).toBe('pearson');
    expect(json.warnings.find((w: any) => w.code === 'weighted').message).toMatch(/ignores clustering and stratification/);
    for (const format of ['text', 'csv', 'tsv', 'markdown', 'html']) {
      const out = (await run([...args, '--format', format])).stdout.replace(/\s+/g, ' ');
      expect(out, format).toMatch(/clustering (and|or) stratification/);
    }
  });
  it('scan: text, CSV (the weights-only flag), Markdown, HTML', async () => {
    const scan = ['scan', data('nhanes.csv'), '--columns', 'agecat,race,HI_CHOL', '--weight', 'WTMEC2YR'];
    for (const format of ['text', 'markdown', 'html']) expect((await run([...scan, '--format', format])).stdout.replace(/\s+/g, ' '), format).toMatch(/clustering or stratification/);
    const csv = (await run([...scan, '--format', 'csv'])).stdout.trim().split('\n');
    for (const line of csv.slice(1)) expect(line).toMatch(/weights-only/);
  });
});

describe('exact tests are not defined under a design', () => {
  it('a sparse table keeps the design-based F as its leading test, says so and advises merging levels (apiclus1 meals3 × stype: an expected count under 5)', async () => {
    const design = survey.taylor[1];
    const table = design.tables[1];
    const report = await runJson([...tableArgs(design.data, table), ...designArgs(design.design)]);
    expect(report.expectedCountRule.passes).toBe(false);
    expect(report.verdict.test).toBe('designF');
    expect(report.tests.fisher).toBeNull();
    const warning = report.warnings.find((w: any) => w.code === 'low-expected');
    expect(warning.message).toMatch(/exact tests are not defined under a survey design.*merge sparse levels/i);
  });
});

describe('scan with a design: every pair gets the design-based leading test in one read, the same record as pair', () => {
  it('NHANES, 15 strata × 31 PSUs: each pair of scan equals pair on the same two columns, field for field (survey for R values checked above)', async () => {
    const design = survey.taylor[4];
    const scan = await runJson(['scan', data('nhanes.csv'), '--exclude', 'psu_brr', '--full', ...designArgs(design.design)]);
    expect(scan.design.kind).toBe('taylor');
    expect(scan.design.degreesOfFreedom).toBe(16);
    expect(scan.pairsTested).toBe(6);
    for (const pair of scan.pairs) {
      const single = await runJson(['pair', data('nhanes.csv'), '--rows', pair.rows.name, '--cols', pair.cols.name, ...designArgs(design.design)]);
      for (const key of ['rows', 'cols', 'n', 'excluded', 'effectiveN', 'tests', 'measures', 'design', 'designEffects', 'designPercentages', 'expectedCountRule']) expect(pair[key], key).toEqual(single[key]);
      expect(pair.verdict.pValue).toBe(single.verdict.pValue);
      expect(pair.verdict.test).toBe('designF');
    }
    const recorded = design.tables.find((t) => t.rowVariable === 'agecat' || t.colVariable === 'agecat')!;
    const agecat = scan.pairs.find((p: any) => [p.rows.name, p.cols.name].sort().join() === ['agecat', 'race'].sort().join());
    expectClose(agecat.tests.designF.statistic, recorded.F, 1e-10);
  });

  it('replicate weights in scan: the same record as pair (BRR, NHANES, 16 replicates)', async () => {
    const fixture = survey.replicates.find((r) => r.method === 'brr')!;
    const file = replicateFile(fixture);
    const options = ['--weight', fixture.weight, '--replicate-weights', 'repw*', '--replicate-method', 'brr'];
    const scan = await runJson(['scan', file, '--columns', 'agecat,race,HI_CHOL', ...options]);
    expect(scan.pairsTested).toBe(3);
    for (const pair of scan.pairs) {
      const single = await runJson(['pair', file, '--rows', pair.rows.name, '--cols', pair.cols.name, ...options]);
      expect(pair.tests).toEqual(single.tests);
      expect(pair.design).toEqual(single.design);
    }
  });

  it('a lone PSU stops the scan once, with the same line as pair', async () => {
    const result = await run(['scan', data('nhanes-lonely.csv'), ...designArgs(survey.lonely.design)]);
    expect(result.status).toBe(1);
    expect(result.stderr.trim().split('\n')).toHaveLength(1);
    expect(result.stderr).toMatch(/stratum "89" has only one PSU/);
  });
});

interface CompareReference {
  compare: {
    data: string;
    split: { column: string; atMost: number; labels: string[] };
    rowVariable: string;
    colVariable: string;
    rowLevels: string[];
    colLevels: string[];
    degreesOfFreedom: number[];
    change: { wald: number; waldPValue: number; statistic: number; numDf: number; denDf: number; pValue: number };
    rowShift: CompareReference['compare']['change'];
    colShift: CompareReference['compare']['change'];
  };
}

describe(`compare with a design: the two periods as independent samples, against ${LIBRARY} (svyby with covmat, svycontrast; recorded)`, () => {
  const { compare } = readReferenceFixture<CompareReference>('survey-commands.json');
  const lines = readFileSync(data(compare.data), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  const at = header.indexOf(compare.split.column);
  const half = (line: string) => (Number(line.split(',')[at]) <= compare.split.atMost ? 'a' : 'b');
  const both = tempFile('nhanes-halves.csv', [`${lines[0]},half`, ...lines.slice(1).map((l) => `${l},${half(l)}`)].join('\n') + '\n');
  const first = tempFile('nhanes-a.csv', [lines[0], ...lines.slice(1).filter((l) => half(l) === 'a')].join('\n') + '\n');
  const second = tempFile('nhanes-b.csv', [lines[0], ...lines.slice(1).filter((l) => half(l) === 'b')].join('\n') + '\n');
  const design = ['--weight', 'WTMEC2YR', '--strata', 'SDMVSTRA', '--cluster', 'SDMVPSU'];
  const table = ['--rows', compare.rowVariable, '--cols', compare.colVariable];

  const expectWald = (label: string, ours: any, ref: CompareReference['compare']['change']) => {
    expect(ours.method).toBe('design-wald');
    close(`${label} F`, ours.statistic, ref.statistic, 1e-10);
    expect(ours.df).toBe(ref.numDf);
    expect(ours.denDf).toBe(ref.denDf);
    close(`${label} p`, ours.pValue, ref.pValue, 1e-9);
    close(`${label} W`, ours.wald, ref.wald, 1e-10);
    close(`${label} p of W`, ours.waldPValue, ref.waldPValue, 1e-9);
  };

  for (const [mode, args] of [
    ['one file, --period half', ['compare', both, '--period', 'half']],
    ['two files', ['compare', first, second]],
  ] as const) {
    it(`${mode}: the change in the log odds ratios and the shifts of both margins (NHANES strata ≤ 82 against the rest)`, async () => {
      const report = await runJson([...args, ...table, ...design]);
      expect(report.designed).toBe(true);
      expect(report.before.design.degreesOfFreedom).toBe(compare.degreesOfFreedom[0]);
      expect(report.after.design.degreesOfFreedom).toBe(compare.degreesOfFreedom[1]);
      expectWald('change', report.change, compare.change);
      expectWald('row shift', report.rowShift, compare.rowShift);
      expectWald('column shift', report.colShift, compare.colShift);
      expect(report.interaction).toBeNull();
      expect(report.verdict.changed).toBe(compare.change.pValue <= 0.05);
      expect(report.before.verdict.test).toBe('designF');
      const text = (await run([...args, ...table, ...design, '--no-color'])).stdout.replace(/\s+/g, ' ');
      expect(text).toMatch(/Each period is its own sample under the survey design/);
      expect(text).toMatch(/design-based Wald test of equal log odds ratios/);
      expect((await run([...args, ...table, ...design, '--exit-status'])).status).toBe(report.verdict.changed ? 0 : 3);
    });
  }
});

describe('a design without its own variation', () => {
  it('with every row its own PSU, one stratum and equal weights, every design effect is n/(n−1) and the first-order statistic is X² (n−1)/n (derived in docs/design-based.md)', async () => {
    const counts = [
      [12, 5, 9],
      [4, 14, 7],
    ];
    const rows = ['a,b,s,w'];
    counts.forEach((row, i) => row.forEach((v, j) => {
      for (let k = 0; k < v; k++) rows.push(`r${i},c${j},one,1`);
    }));
    const file = tempFile('srs-design.csv', rows.join('\n') + '\n');
    const plain = await runJson(['pair', file, '--rows', 'a', '--cols', 'b']);
    const report = await runJson(['pair', file, '--rows', 'a', '--cols', 'b', '--weight', 'w', '--strata', 's']);
    const n = 51;
    for (const value of report.design.designEffects.eigenvalues) expectClose(value, n / (n - 1), 1e-12);
    expectClose(report.tests.designPearson.statistic, (plain.tests.pearson.statistic * (n - 1)) / n, 1e-12);
    expect(report.design.clusters).toBe(n);
    expect(report.design.degreesOfFreedom).toBe(n - 1);
  });
});

describe('who counts a design: the built-in reader (the engine route, io/counting.ts)', () => {
  const design = survey.taylor[4];
  const args = [...tableArgs(design.data, design.tables[1]), ...designArgs(design.design)];

  it('--engine duckdb on a CSV file: the built-in reader counts it, one note says so, the report is the same', async () => {
    const builtin = await runJson(args);
    const viaOption = await run([...args, '--engine', 'duckdb', '--format', 'json']);
    expect(viaOption.status, viaOption.stderr).toBe(0);
    expect(viaOption.stderr.trim().split('\n')).toHaveLength(1);
    expect(viaOption.stderr).toMatch(/a survey design is counted by the built-in reader/);
    const report = JSON.parse(viaOption.stdout);
    expect(report.input.engine).toBe('builtin');
    expect(report.tests).toEqual(builtin.tests);
  });

  it('a Parquet file with a design is refused in one line (exit 2), before anything is read', async () => {
    const parquet = tempFile('design.parquet', 'PAR1 not really parquet');
    const result = await run(['pair', parquet, '--rows', 'a', '--cols', 'b', '--weight', 'w', '--strata', 's']);
    expect(result.status).toBe(2);
    expect(result.stderr).toMatch(/a survey design .* is counted by the built-in reader, which reads one CSV file .*not Parquet files or patterns/);
  });
});
