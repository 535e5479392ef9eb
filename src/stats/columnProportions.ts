/**
 * Column-proportion tests of a banner: pooled two-proportion z tests between
 * columns on effective bases, with multiple-testing control within a row.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { adjustPValues } from './multipleTesting.js';

/** One column of a break variable for one row (answer) of a question. */
export interface ProportionColumn {
  /** Respondents in the column giving this answer (weighted count with weights). */
  count: number;
  /** Respondents in the column (weighted base with weights). */
  base: number;
  /**
   * Kish's effective base (Σw)²/Σw² of the column (Kish 1965, Survey Sampling,
   * §11.7); defaults to `base` (unweighted data).
   */
  effectiveBase?: number;
  /** Respondents counted without weights, for the small-base rule; defaults to the effective base. */
  unweightedBase?: number;
}

export interface ColumnProportionOptions {
  /** Confidence levels to mark, e.g. [0.95, 0.90]. Default [0.95]. */
  confidenceLevels?: readonly number[];
  /** Multiple-comparison adjustment within the row's comparisons. Default 'none' (common practice). */
  adjustment?: 'none' | 'bonferroni' | 'holm';
  /** Columns whose unweighted base is below this are shown but not tested. Default 30 (common practice). */
  minimumBase?: number;
}

export interface ColumnComparison {
  /** The two columns compared (first < second). */
  first: number;
  second: number;
  /** z = (p₁ − p₂)/SE; null when the pooled proportion is 0 or 1 (nothing to compare). */
  z: number | null;
  /** Two-sided p-value, before adjustment. */
  pValue: number | null;
  /** After the chosen adjustment over the row's comparisons (equal to pValue for 'none'). */
  adjustedPValue: number | null;
}

export interface ColumnProportionResult {
  /** p_i = count/base per column; null for an empty base. */
  proportions: (number | null)[];
  /** Whether each column was tested (base at or above the minimum and not empty). */
  tested: boolean[];
  comparisons: ColumnComparison[];
  /**
   * For each column, the columns it is significantly higher than, each with the
   * highest confidence level met (adjusted p < 1 − level).
   */
  higherThan: { column: number; level: number }[][];
  /** The comparisons in the family the adjustment was made over. */
  familySize: number;
  adjustment: 'none' | 'bonferroni' | 'holm';
  confidenceLevels: number[];
  minimumBase: number;
}

/**
 * Column-proportion tests within one break variable for one row of a banner
 * table: every pair of tested columns is compared with the pooled
 * two-proportion z-test,
 *   p̂ = (n₁p₁ + n₂p₂)/(n₁ + n₂),  z = (p₁ − p₂) / √(p̂(1 − p̂)(1/n₁ + 1/n₂)),
 * two-sided p = P(χ²₁ ≥ z²) (Fleiss, Levin & Paik 2003, Statistical Methods
 * for Rates and Proportions, 3rd ed., §9.1; the statistic of
 * statsmodels' proportions_ztest). With weights, p_i is the weighted share and
 * n_i the column's Kish effective base (Kish 1965, §11.7; using it in the
 * pooled test is common practice). Columns whose unweighted base is below
 * `minimumBase` (default 30, common practice) are not tested. The p-values of
 * the row's comparisons are adjusted together (Bonferroni, Holm) when asked;
 * a column is marked higher than another at the highest confidence level
 * whose α = 1 − level exceeds the adjusted p.
 * Columns of one break variable hold different respondents; columns of
 * overlapping groups (a total against its parts) need another test.
 *
 * @example
 * // 45 of 100 against 30 of 100: p̂ = 0.375, z = 0.15/√(0.375·0.625·0.02) = 2.1909, p = 0.0285
 * columnProportionTests([{ count: 45, base: 100 }, { count: 30, base: 100 }]).higherThan[0]; // [{ column: 1, level: 0.95 }]
 */
export function columnProportionTests(columns: readonly ProportionColumn[], options: ColumnProportionOptions = {}): ColumnProportionResult {
  const confidenceLevels = [...(options.confidenceLevels ?? [0.95])].sort((a, b) => b - a);
  const adjustment = options.adjustment ?? 'none';
  const minimumBase = options.minimumBase ?? 30;
  const proportions = columns.map((col) => (col.base > 0 ? col.count / col.base : null));
  const effective = columns.map((col) => col.effectiveBase ?? col.base);
  const tested = columns.map((col, i) => col.base > 0 && effective[i] > 0 && (col.unweightedBase ?? effective[i]) >= minimumBase);

  const comparisons: ColumnComparison[] = [];
  for (let a = 0; a < columns.length; a++) {
    for (let b = a + 1; b < columns.length; b++) {
      if (!tested[a] || !tested[b]) continue;
      const z = pooledTwoProportionZ(proportions[a]!, effective[a], proportions[b]!, effective[b]);
      comparisons.push({ first: a, second: b, z, pValue: z === null ? null : upperTailChiSquare(z * z, 1), adjustedPValue: null });
    }
  }
  const family = comparisons.filter((c) => c.pValue !== null);
  const adjusted = adjustPValues(family.map((c) => c.pValue as number), adjustment);
  family.forEach((c, x) => (c.adjustedPValue = adjusted[x]));

  const higherThan: { column: number; level: number }[][] = columns.map(() => []);
  for (const c of family) {
    const level = confidenceLevels.find((l) => (c.adjustedPValue as number) < 1 - l);
    if (level === undefined || c.z === 0) continue;
    const [high, low] = (c.z as number) > 0 ? [c.first, c.second] : [c.second, c.first];
    higherThan[high].push({ column: low, level });
  }
  higherThan.forEach((list) => list.sort((x, y) => x.column - y.column));
  return { proportions, tested, comparisons, higherThan, familySize: family.length, adjustment, confidenceLevels, minimumBase };
}

/** The pooled two-proportion z (see columnProportionTests); null when p̂ is 0 or 1. */
export function pooledTwoProportionZ(p1: number, n1: number, p2: number, n2: number): number | null {
  const pooled = (n1 * p1 + n2 * p2) / (n1 + n2);
  const variance = pooled * (1 - pooled) * (1 / n1 + 1 / n2);
  if (!(variance > 0)) return null;
  return (p1 - p2) / Math.sqrt(variance);
}
