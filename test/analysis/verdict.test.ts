import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeTable, AnalysisOptions, cellThresholdFor, DEFAULT_ANALYSIS_OPTIONS, evidenceOf } from '../../src/analysis/analyzeTable.js';
import { contingencyTables } from '../helpers.js';

const table = (counts: number[][]) => ({
  rowName: 'r',
  colName: 'c',
  rowLevels: counts.map((_r, i) => `r${i}`),
  colLevels: counts[0].map((_c, j) => `c${j}`),
  counts,
});
const options: AnalysisOptions = { ...DEFAULT_ANALYSIS_OPTIONS, ordinal: true, simulations: 300, exactWorkLimit: 20_000 };
// direction with rounding noise of the log-scale odds ratio (about 1e-16) taken as none
const sign = (x: number) => (x > 1e-12 ? 1 : x < -1e-12 ? -1 : 0);

describe('the verdict of the analysis record (property tests on random tables)', () => {
  it('every interval brackets the estimate printed beside it: the V interval its median-unbiased point, odds and risk ratios theirs', () => {
    fc.assert(
      fc.property(contingencyTables(5, 5, 30), fc.constantFrom(0.8, 0.9, 0.95, 0.99), (counts, confidence) => {
        const m = analyzeTable(table(counts), 0, { ...options, confidence, ordinal: false }).measures;
        const vi = m.cramersVInterval;
        if (vi) {
          expect(vi.lower).toBeLessThanOrEqual(vi.estimate + 1e-12);
          expect(vi.estimate).toBeLessThanOrEqual(vi.upper + 1e-12);
        }
        for (const x of [m.oddsRatio, m.relativeRisk]) {
          if (!x) continue;
          expect(x.lower).toBeLessThanOrEqual(x.estimate * (1 + 1e-12));
          expect(x.estimate).toBeLessThanOrEqual(x.upper * (1 + 1e-12));
        }
      }),
      { numRuns: 120 },
    );
  });

  it('measures that describe a direction agree: odds ratio, risk ratio, Yule’s Q and Y, gamma and the diagonal (zero cells included)', () => {
    fc.assert(
      fc.property(contingencyTables(2, 2, 15), (counts) => {
        const record = analyzeTable(table(counts), 0, options);
        const m = record.measures;
        if (!m.oddsRatio || m.yulesQ === null) return;
        const direction = sign(Math.log(m.oddsRatio.estimate));
        expect(sign(m.yulesQ)).toBe(direction);
        expect(sign(m.yulesY ?? 0)).toBe(direction);
        if (m.relativeRisk) expect(sign(Math.log(m.relativeRisk.estimate))).toBe(direction);
        const diagonal = record.findings.diagonal;
        expect(diagonal === 'main' ? 1 : diagonal === 'off' ? -1 : 0).toBe(direction);
        if (!m.zeroCellCorrection && record.ordinal?.gamma.estimate != null) expect(sign(record.ordinal.gamma.estimate)).toBe(direction);
      }),
      { numRuns: 400 },
    );
  });

  it('the deciding p-value is the leading test’s, and pass means at most alpha (any alpha)', () => {
    fc.assert(
      fc.property(contingencyTables(4, 4, 20), fc.constantFrom(0.001, 0.01, 0.05, 0.1), (counts, alpha) => {
        const record = analyzeTable(table(counts), 0, { ...options, alpha });
        const v = record.verdict;
        const lead = record.findings.primaryTest;
        const p = { pearson: record.tests.pearson.pValue, fisher: record.tests.fisher?.pValue, monteCarlo: record.tests.monteCarlo?.pValue }[lead.test];
        expect(v.pValue).toBe(p);
        expect(v.decidingPValue).toBe(p);
        expect(v.passes).toBe((p as number) <= alpha);
        expect(v.alpha).toBe(alpha);
        // the rule: the chi-square p-value leads exactly when the expected counts pass Cochran's rule
        expect(lead.test === 'pearson').toBe(record.expectedCountRule.passes || (record.tests.fisher === null && record.tests.monteCarlo === null));
        // cell claims only when the decision passes
        if (!v.passes) expect(record.findings.statements.some((s) => s.kind === 'cell')).toBe(false);
      }),
      { numRuns: 200 },
    );
  });

  it('evidence words are scaled to alpha: α/50, α/5, α (common practice: 0.001, 0.01, 0.05 at α 0.05)', () => {
    expect([0.0005, 0.005, 0.03, 0.2].map((p) => evidenceOf(p, 0.05))).toEqual(['strong', 'clear', 'some', 'none']);
    expect([0.0001, 0.001, 0.009, 0.02].map((p) => evidenceOf(p, 0.01))).toEqual(['strong', 'clear', 'some', 'none']);
  });

  it('cells are judged at the Bonferroni-adjusted critical value (Beasley & Schumacker 1995; Sharpe 2015): z 3.0233 for 20 cells at α 0.05', () => {
    const t = cellThresholdFor(5, 4, 0.05);
    expect(t.cells).toBe(20);
    expect(t.single).toBeCloseTo(1.959964, 5); // z at 0.975 (normal table)
    expect(t.adjusted).toBeCloseTo(3.023341, 5); // z at 1 − 0.05/40
    // two rows: the cells of each column mirror each other, so 4 distinct cells
    expect(cellThresholdFor(2, 4, 0.05).cells).toBe(4);
    expect(cellThresholdFor(2, 2, 0.05).cells).toBe(1);
  });

  it('a zero cell: [[0,1],[2,13]] gives an odds ratio, Q and the diagonal that agree, and says 0.5 was added (Haldane 1956)', () => {
    const record = analyzeTable(table([[0, 1], [2, 13]]), 0, options);
    const m = record.measures;
    expect(m.zeroCellCorrection).toBe(true);
    expect(m.oddsRatio?.haldaneCorrection).toBe(true);
    // (0.5·13.5)/(1.5·2.5) = 1.8; Q = (1.8 − 1)/(1.8 + 1)
    expect(m.oddsRatio?.estimate).toBeCloseTo(1.8, 12);
    expect(m.yulesQ).toBeCloseTo(0.8 / 2.8, 12);
    expect(record.warnings.map((w) => w.code)).toContain('zero-cell');
  });

  it('no cell claims in a table with two rows are repeated for the mirrored row', () => {
    // Two rows, four columns, a clear association (invented for the check of wording only).
    const record = analyzeTable(table([[60, 20, 20, 20], [20, 20, 20, 60]]), 0, options);
    const cells = record.findings.statements.filter((s) => s.kind === 'cell');
    expect(cells.length).toBeGreaterThan(0);
    for (const s of cells) if (s.kind === 'cell') expect(s.direction).toBe('more');
    expect(record.findings.statements.some((s) => s.kind === 'mirror-cells')).toBe(true);
  });
});
