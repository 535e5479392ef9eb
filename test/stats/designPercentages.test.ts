import { describe, expect, it } from 'vitest';
import { designCramersV, designPercentages } from '../../src/stats/designPercentages.js';
import { designTests } from '../../src/stats/raoScott.js';
import { cramersV } from '../../src/stats/strength.js';
import { expectClose } from '../helpers.js';
import { survey, taylorEstimate, type ProportionReference } from './surveyFixtures.js';
import type { DesignProportion } from '../../src/stats/designPercentages.js';

// Reference library: the survey package for R (Debian r-cran-survey 4.1-1-1): svymean for the estimate and
// its variance (domains by subset(), which keeps the design), svyciprop(method = "logit", df = design df) and
// svyciprop(method = "beta"), recorded by scripts/record_survey_reference.R.
function compare(label: string, ours: DesignProportion, ref: ProportionReference, df: number): void {
  const where = (what: string): string => `${label}: ${what}`;
  expectClose(ours.proportion, ref.proportion, 1e-12);
  if (ref.standardError === 0) expect(ours.standardError, where('se')).toBeLessThan(1e-15);
  else expectClose(ours.standardError, ref.standardError, 1e-10);
  expect(ours.domainSize, where('domain size')).toBe(ref.domainSize);
  if (ref.proportion > 0 && ref.proportion < 1) {
    // the library's logit interval comes from an iterated glm fit (converged to ~1e-9)
    expectClose(ours.logit?.lower, ref.logit[0], 1e-7);
    expectClose(ours.logit?.upper, ref.logit[1], 1e-7);
  } else {
    expect(ours.logit, where('no logit interval at 0 or 1')).toBeNull();
    expect(ours.method).toBe('korn-graubard');
  }
  const kornGraubard = ref.kornGraubardLibraryDf === df ? ref.kornGraubardLibrary : ref.kornGraubardOurDf;
  if (ref.proportion > 0 && ref.proportion < 1) {
    expectClose(ours.kornGraubard?.lower, kornGraubard[0], 1e-9);
    expectClose(ours.kornGraubard?.upper, kornGraubard[1], 1e-9);
  }
}

describe('weighted percentages with design-based standard errors and intervals agree with survey for R (r-cran-survey 4.1-1-1, recorded)', () => {
  for (const fixture of survey.percentages) {
    const { ref } = fixture;
    it(`${fixture.name}: ${ref.rowVariable} × ${ref.colVariable}, cell, row and column proportions (delta method through V) and margins`, () => {
      const r = ref.rowLevels.length;
      const c = ref.colLevels.length;
      const estimate = taylorEstimate(fixture.data, fixture.design, ref);
      const result = designPercentages(estimate, r, c, ref.level);
      expect(result.degreesOfFreedom).toBe(ref.designDf);
      for (let i = 0; i < r; i++) {
        for (let j = 0; j < c; j++) {
          const at = i * c + j;
          compare(`cell ${at}`, result.cell[i][j], ref.cell[at], ref.designDf);
          compare(`row ${at}`, result.row[i][j], ref.row[at], ref.designDf);
          compare(`column ${at}`, result.column[i][j], ref.column[at], ref.designDf);
        }
      }
      ref.rowMargins.forEach((margin, i) => compare(`row margin ${i}`, result.rowMargins[i], margin, ref.designDf));
      ref.columnMargins.forEach((margin, j) => compare(`column margin ${j}`, result.columnMargins[j], margin, ref.designDf));
    });
  }

  it('the reported interval follows the stated rule: Korn–Graubard when n_eff · min(p, 1 − p) < 10 or p is 0 or 1, logit otherwise', () => {
    let both = { logit: 0, kornGraubard: 0 };
    const lines = survey.percentages.flatMap(({ data, design, ref }) => {
      const result = designPercentages(taylorEstimate(data, design, ref), ref.rowLevels.length, ref.colLevels.length);
      return [...result.cell, ...result.row, ...result.column];
    });
    for (const line of lines) {
      for (const cell of line) {
        const effective = (cell.proportion * (1 - cell.proportion)) / (cell.standardError * cell.standardError);
        const expected = cell.proportion > 0 && cell.proportion < 1 && effective * Math.min(cell.proportion, 1 - cell.proportion) >= 10 ? 'logit' : 'korn-graubard';
        expect(cell.method).toBe(expected);
        const chosen = expected === 'logit' ? cell.logit : cell.kornGraubard;
        expect([cell.lower, cell.upper]).toEqual([chosen!.lower, chosen!.upper]);
        both = { logit: both.logit + (expected === 'logit' ? 1 : 0), kornGraubard: both.kornGraubard + (expected === 'logit' ? 0 : 1) };
      }
    }
    expect(both.logit).toBeGreaterThan(0);
    expect(both.kornGraubard).toBeGreaterThan(0);
  });
});

describe("Cramér's V of the design-scaled statistic", () => {
  it('equals the V of the weighted proportions: X²/δ̄ over the effective size n/δ̄ (NHANES agecat × race)', () => {
    const design = survey.taylor[4];
    const table = design.tables[1];
    const tests = designTests(taylorEstimate(design.data, design.design, table), 4, 4);
    const v = designCramersV(tests, 4, 4)!;
    expectClose(v.value, cramersV(table.X2, table.n, 4, 4)!, 1e-12);
    expectClose(v.effectiveSampleSize, table.n / table.meanDesignEffect, 1e-10);
  });
});
