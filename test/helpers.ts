import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';
import fc from 'fast-check';
import { expect } from 'vitest';

export const ROOT = join(dirname(fileURLToPath(import.meta.url)), '..');

export interface ReferenceTable {
  name: string;
  counts: number[][];
  expected: number[][];
  pearson: { statistic: number; pValue: number; df: number; pValueMpmath: number };
  likelihoodRatio: { statistic: number; pValue: number };
  yates?: { statistic: number; pValue: number };
  fisher?: { pValue: number; pValueMpmath: number };
  oddsRatio?: { estimate: number; lower: number; upper: number };
  relativeRisk?: { estimate: number; lower: number; upper: number };
  cramersV: number;
  tschuprowT: number;
  contingencyC: number;
  somersDColsGivenRows?: number;
  somersDRowsGivenCols?: number;
  kendallTauB?: number;
  kendallTauC?: number;
}

export interface Reference {
  recordedWith: Record<string, string>;
  chi2Sf: { x: number; df: number; scipy: number; mpmath: number }[];
  tables: ReferenceTable[];
  exactRxC: { counts: number[][]; pValue: number }[];
  ncx2: { x: number; df: number; lambda: number; upper: number; lower: number }[];
  multipleTesting: { p: number[]; bh: number[]; holm: number[]; bonferroni: number[] }[];
  normalQuantiles: { p: number; z: number }[];
  stratified2x2: {
    name: string;
    strata: number[][][];
    cmh: { statistic: number; pValue: number };
    commonOddsRatio: { estimate: number; lower: number; upper: number };
    breslowDay: { statistic: number; pValue: number };
  };
  generalizedCmh: { strata: number[][][]; statistic: number; df: number; pValue: number }[];
  noThreeWay: { layers: number[][][]; statistic: number; df: number; pValue: number }[];
  numericalLimits: { counts: number[][]; pearson: number; pearsonP: number; likelihoodRatio: number; likelihoodRatioP: number; df: number }[];
}

/** Values recorded by scripts/record_reference.py (scipy, statsmodels, mpmath, exact fractions). */
export const reference: Reference = JSON.parse(readFileSync(join(ROOT, 'fixtures/reference/reference.json'), 'utf8'));

export interface EdgeTable {
  name: string;
  regime: 'near-independence' | 'dominant-cell' | 'moderate';
  counts: number[][];
  [statistic: string]: unknown;
}

export interface Edges {
  recordedWith: Record<string, string>;
  fisher2x2: { name: string; counts: number[][]; pValue: number }[];
  exactRxC: { counts: number[][]; pValue: number; tables: number }[];
  tables: EdgeTable[];
  noncentralLarge: { x: number; df: number; lambda: number; upper: number; lower: number }[];
  noncentralityIntervals: { x: number; df: number; confidence: number; lower: number; upper: number }[];
  chi2Df1: { x: number; p: number }[];
  layered: { name: string; strata: number[][][]; statistic: number; df: number; pValue: number; commonOddsRatio?: number; breslowDay?: { statistic: number; df: number; pValue: number } }[];
}

/** Values at the numerical edges, recorded by scripts/record_edges.py (exact fractions, mpmath, enumeration). */
export const edges: Edges = JSON.parse(readFileSync(join(ROOT, 'fixtures/reference/edges.json'), 'utf8'));

/** The p-value of an exact-test outcome, or null when it was declined or not applicable. */
export function exactP(outcome: { status: 'computed'; pValue: number } | { status: 'declined' } | null): number | null {
  return outcome !== null && outcome.status === 'computed' ? outcome.pValue : null;
}

/** |actual − expected| ≤ tolerance · |expected| (absolute near zero). */
export function expectClose(actual: number | null | undefined, expected: number, tolerance = 1e-10): void {
  expect(actual).not.toBeNull();
  expect(actual).not.toBeUndefined();
  const a = actual as number;
  const scale = Math.max(Math.abs(expected), Number.MIN_VALUE);
  const error = expected === 0 ? Math.abs(a) : Math.abs(a - expected) / scale;
  if (!(error <= tolerance)) {
    throw new Error(`expected ${a} to be within ${tolerance} (relative) of ${expected}; relative error ${error}`);
  }
}

/** expectClose with a label, so that a failure says which quantity differs. */
export function expectCloseLabelled(label: string, actual: number | null | undefined, expected: number, tolerance: number): void {
  try {
    expectClose(actual, expected, tolerance);
  } catch (error) {
    throw new Error(`${label}: ${(error as Error).message}`);
  }
}

export function expectMatrixClose(actual: readonly (readonly (number | null)[])[], expected: readonly (readonly number[])[], tolerance = 1e-10): void {
  expect(actual.length).toBe(expected.length);
  actual.forEach((row, i) => row.forEach((v, j) => expectClose(v, expected[i][j], tolerance)));
}

/** Random r×c tables of counts with no empty row or column (fast-check). */
export function contingencyTables(maxRows: number, maxCols: number, maxCount: number, minRows = 2, minCols = 2): fc.Arbitrary<number[][]> {
  return fc
    .tuple(fc.integer({ min: minRows, max: maxRows }), fc.integer({ min: minCols, max: maxCols }))
    .chain(([r, c]) => fc.array(fc.array(fc.integer({ min: 0, max: maxCount }), { minLength: c, maxLength: c }), { minLength: r, maxLength: r }))
    .filter((t) => t.every((row) => row.some((v) => v > 0)) && t[0].every((_v, j) => t.some((row) => row[j] > 0)));
}

/** A recorded fixture under fixtures/reference/ (each names its script and reference library). */
export function readReferenceFixture<T>(file: string): T {
  return JSON.parse(readFileSync(join(ROOT, 'fixtures/reference', file), 'utf8')) as T;
}

/** A copy of the values in an order drawn from the seed (Fisher–Yates with a linear congruential generator, Knuth TAOCP vol. 2, §3.4.2). */
export function shuffle<T>(values: readonly T[], seed: number): T[] {
  const shuffled = [...values];
  let s = seed >>> 0;
  for (let i = shuffled.length - 1; i > 0; i--) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    const j = s % (i + 1);
    [shuffled[i], shuffled[j]] = [shuffled[j], shuffled[i]];
  }
  return shuffled;
}
