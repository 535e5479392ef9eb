import { describe, expect, it } from 'vitest';
import { denseCovariance, type DesignEstimate } from '../../src/stats/designCovariance.js';
import { designTests } from '../../src/stats/raoScott.js';
import { expectClose, expectCloseLabelled as close } from '../helpers.js';
import { replicateEstimate, survey, taylorEstimate, type TableReference } from './surveyFixtures.js';

// Reference library: the survey package for R (Debian r-cran-survey 4.1-1-1), recorded by
// scripts/record_survey_reference.R; differences of convention are handled as that script describes.
const LIBRARY = 'survey for R (r-cran-survey 4.1-1-1)';

function compareWithLibrary(estimate: DesignEstimate, ref: TableReference): void {
  const r = ref.rowLevels.length;
  const c = ref.colLevels.length;
  const K = r * c;
  expect(estimate.n).toBe(ref.n);
  ref.proportions.forEach((p, j) => close('estimate.proportions[j]', estimate.proportions[j], p, 1e-12));
  // the whole covariance matrix, entry by entry, relative to its largest entry
  const V = denseCovariance(estimate.covariance);
  const largest = Math.max(...ref.covariance.map(Math.abs));
  for (let i = 0; i < K * K; i++) expect(Math.abs(V[i] - ref.covariance[i]) / largest, `V entry ${i}`).toBeLessThan(1e-10);
  expect(estimate.degreesOfFreedom).toBe(ref.designDf);
  const tests = designTests(estimate, r, c);
  close('tests.pearson', tests.pearson, ref.X2, 1e-10);
  close('tests.likelihoodRatio', tests.likelihoodRatio, ref.G2, 1e-10);
  const effects = tests.designEffects;
  close('effects.trace', effects.trace, ref.trace, 1e-10);
  close('effects.traceOfSquare', effects.traceOfSquare, ref.traceOfSquare, 1e-10);
  close('effects.mean', effects.mean, ref.meanDesignEffect, 1e-10);
  expect(effects.eigenvalues).not.toBeNull();
  ref.eigenvalues.forEach((v, i) => expect(Math.abs(effects.eigenvalues![i] - v) / ref.eigenvalues[ref.eigenvalues.length - 1]).toBeLessThan(1e-10));
  close('effects.min', effects.min, ref.eigenvalues[0], 1e-9);
  close('effects.max', effects.max, ref.eigenvalues[ref.eigenvalues.length - 1], 1e-10);
  // second order F
  close('tests.designF!.statistic', tests.designF!.statistic, ref.F, 1e-10);
  close('tests.designF!.numDf', tests.designF!.numDf, ref.ndf, 1e-10);
  close('tests.designF!.pValue', tests.designF!.pValue, ref.pFWithOurDf, 1e-9);
  if (ref.libraryDesignDf === ref.designDf || Math.abs(ref.libraryDesignDf - ref.designDf) < 1e-9) {
    close('tests.designF!.denDf', tests.designF!.denDf, ref.ddf, 1e-10);
    close('tests.designF!.pValue', tests.designF!.pValue, ref.pF, 1e-9);
  }
  // first order
  close('tests.designPearson!.statistic', tests.designPearson!.statistic, ref.chisq, 1e-10);
  close('tests.designPearson!.pValue', tests.designPearson!.pValue, ref.pChisq, 1e-9);
  expect(tests.designPearson!.df).toBe((r - 1) * (c - 1));
  close('tests.designLikelihoodRatio!.statistic', tests.designLikelihoodRatio!.statistic, ref.chisqG2, 1e-10);
  close('tests.designLikelihoodRatio!.pValue', tests.designLikelihoodRatio!.pValue, ref.pChisqG2, 1e-9);
  // cell design effects: the library divides by p(1−p)/(n−1), Kish by p(1−p)/n
  ref.cellDeffReplace.forEach((d, j) => {
    if (d === null) expect(effects.cellDesignEffects[j], `cell ${j} is empty`).toBeNull();
    else close(`design effect of cell ${j}`, effects.cellDesignEffects[j], (d * ref.n) / (ref.n - 1), 1e-10);
  });
  // identity of the conventions (§7)
  close('tests.designPearson!.statistic', tests.designPearson!.statistic, effects.k * tests.designF!.statistic, 1e-13);
}

describe(`Rao–Scott tests on Taylor-linearised designs agree with ${LIBRARY} (recorded)`, () => {
  for (const design of survey.taylor) {
    for (const table of design.tables) {
      it(`${design.name}: ${table.rowVariable} × ${table.colVariable} (n = ${table.n}): V, X², G², Δ's eigenvalues, first and second order`, () => {
        compareWithLibrary(taylorEstimate(design.data, design.design, table), table);
      });
    }
  }

  it(`${survey.domain.name}: rows outside the domain stay in the design (the library's subset())`, () => {
    const { domain } = survey;
    const estimate = taylorEstimate(domain.data, domain.design, domain.table, { filter: domain.filter });
    compareWithLibrary(estimate, domain.table);
  });
});

describe(`Rao–Scott tests on replicate-weight designs agree with ${LIBRARY} (recorded replicate weights)`, () => {
  for (const fixture of survey.replicates) {
    for (const table of fixture.tables) {
      it(`${fixture.method}, ${fixture.replicates} replicates, ${fixture.source}: ${table.rowVariable} × ${table.colVariable}`, () => {
        const estimate = replicateEstimate(fixture, table);
        expect(estimate.kind).toBe('replicate');
        expect(estimate.replicates).toBe(fixture.replicates);
        compareWithLibrary(estimate, table);
      });
    }
  }
});

describe('lonely PSU treatments (NHANES with stratum 89 left one PSU)', () => {
  const { lonely } = survey;
  const table = lonely.certainty;
  it('fail: one line naming the stratum and the option (the library also stops: "' + lonely.failMessage + '")', () => {
    expect(() => taylorEstimate(lonely.data, lonely.design, table, { lonelyPsu: 'fail' })).toThrowError(/^stratum "89" has only one PSU.*--lonely-psu certainty, adjust or average/);
    try {
      taylorEstimate(lonely.data, lonely.design, table, { lonelyPsu: 'fail' });
    } catch (error) {
      expect((error as Error).message).not.toContain('\n');
      expect((error as { exitStatus?: number }).exitStatus).toBe(1);
    }
  });
  for (const treatment of ['certainty', 'adjust', 'average'] as const) {
    it(`${treatment} agrees with ${LIBRARY} (options(survey.lonely.psu = "${treatment}"))`, () => {
      const estimate = taylorEstimate(lonely.data, lonely.design, lonely[treatment], { lonelyPsu: treatment });
      expect(estimate.lonelyStrata).toEqual(['89']);
      compareWithLibrary(estimate, lonely[treatment]);
    });
  }
});

describe('published worked example', () => {
  // Lumley, T., documentation of the survey package for R, worked example "chi-squared tests" on the one-stage
  // cluster sample apiclus1 (fpc): the weighted table of sch.wide by stype, then F = 5.1934 on ndf 1.495 and
  // ddf 20.925, p = 0.02175 (second order), and "X-squared = 11.9409, df = 2, p-value = 0.005553" for the first
  // order, as printed. The printed X-squared there is the Pearson X² of the table rescaled to n (not yet divided
  // by δ̄); its p-value is that of X²/δ̄ (= k·F = 10.387 here).
  it('apiclus1, sch.wide × stype: the printed weighted table and both Rao–Scott tests, to the printed digits', () => {
    const design = survey.taylor[1];
    const table = design.tables[0];
    expect(table.rowLevels).toEqual(['No', 'Yes']);
    expect(table.colLevels).toEqual(['E', 'H', 'M']);
    const estimate = taylorEstimate(design.data, design.design, table);
    const printed = [406.164, 101.541, 270.776, 4467.8035, 372.317, 575.3989];
    printed.forEach((total, j) => expect(Math.abs(estimate.proportions[j] * estimate.weightTotal - total)).toBeLessThan(5e-4));
    const tests = designTests(estimate, 2, 3);
    expect(Math.abs(tests.designF!.statistic - 5.1934)).toBeLessThan(5e-5);
    expect(Math.abs(tests.designF!.numDf - 1.495)).toBeLessThan(5e-4);
    expect(Math.abs(tests.designF!.denDf - 20.925)).toBeLessThan(5e-4);
    expect(Math.abs(tests.designF!.pValue - 0.02175)).toBeLessThan(5e-6);
    expect(Math.abs(tests.pearson - 11.9409)).toBeLessThan(5e-5);
    expect(Math.abs(tests.designPearson!.statistic - 11.9409 / tests.designEffects.mean)).toBeLessThan(1e-3);
    expect(tests.designPearson!.df).toBe(2);
    expect(Math.abs(tests.designPearson!.pValue - 0.005553)).toBeLessThan(5e-7);
  });
});

describe('Rao–Scott identities (design-based-tests conventions §7)', () => {
  it('for a 2 × 2 table numDf = 1 and the first-order statistic is k × F', () => {
    const design = survey.taylor[0];
    const table = design.tables[0]; // sch.wide × awards, 2 × 2
    const tests = designTests(taylorEstimate(design.data, design.design, table), 2, 2);
    expectClose(tests.designF!.numDf, 1, 1e-13);
    expectClose(tests.designPearson!.statistic, tests.designF!.statistic, 1e-13);
  });

  it('a design without degrees of freedom gives no test, with the reason', () => {
    const design = survey.taylor[1];
    const table = design.tables[0];
    const estimate = taylorEstimate(design.data, design.design, table);
    const tests = designTests({ ...estimate, degreesOfFreedom: 0 }, 2, 3);
    expect(tests.designF).toBeNull();
    expect(tests.reason).toMatch(/0 degrees of freedom/);
  });
});
