/**
 * Margin drift over waves: each variable's margin per wave and the chi-
 * square test of homogeneity.
 */
import { likelihoodRatioChiSquare, pearsonChiSquare, TestResult } from './chiSquareTests.js';
import { LayerStack } from './threeWay.js';

export interface DriftTest {
  /** Pearson's X² of the margin × wave table. */
  pearson: TestResult;
  /** G² of the same table. */
  likelihoodRatio: TestResult;
  /** The margin × wave table tested (levels × waves), after empty levels and waves are left out. */
  table: number[][];
  /** Levels with no count in any wave (left out). */
  levelsLeftOut: number[];
  /** Waves with no count at all (left out). */
  wavesLeftOut: number[];
}

export interface MarginDrift {
  /** Did the row variable's distribution change over the waves? null when fewer than two levels or waves have counts. */
  rows: DriftTest | null;
  /** The same for the column variable. */
  columns: DriftTest | null;
}

/**
 * Margin drift over K waves: for each variable of the pair, its margin in
 * each wave side by side (levels × waves) and the chi-square test of
 * homogeneity of that table (Pearson 1900; G², Wilks 1938; Agresti 2013,
 * Categorical Data Analysis, 3rd ed., §3.2), df = (levels − 1)(waves − 1)
 * after levels and waves without any count are left out (and listed).
 * A level present in some waves only stays in, with its zeros.
 *
 * @example
 * // rows margin 50/50 in both waves, columns 30/70 then 70/30: rows X² = 0, columns X² = 32
 * marginDrift([[[15, 35], [15, 35]], [[35, 15], [35, 15]]]);
 */
export function marginDrift(layers: LayerStack): MarginDrift {
  const rowMargins = layers.map((t) => t.map((row) => row.reduce((s, v) => s + v, 0)));
  const columnMargins = layers.map((t) => (t.length === 0 ? [] : t[0].map((_v, j) => t.reduce((s, row) => s + row[j], 0))));
  return { rows: driftOf(rowMargins), columns: driftOf(columnMargins) };
}

/** margins[k][level] → the level × wave table and its tests. */
function driftOf(margins: number[][]): DriftTest | null {
  const K = margins.length;
  const levels = K === 0 ? 0 : margins[0].length;
  const levelsLeftOut: number[] = [];
  const wavesLeftOut: number[] = [];
  for (let level = 0; level < levels; level++) if (margins.every((m) => !(m[level] > 0))) levelsLeftOut.push(level);
  for (let k = 0; k < K; k++) if (margins[k].every((v) => !(v > 0))) wavesLeftOut.push(k);
  const keptLevels = Array.from({ length: levels }, (_v, level) => level).filter((level) => !levelsLeftOut.includes(level));
  const keptWaves = Array.from({ length: K }, (_v, k) => k).filter((k) => !wavesLeftOut.includes(k));
  if (keptLevels.length < 2 || keptWaves.length < 2) return null;
  const table = keptLevels.map((level) => keptWaves.map((k) => margins[k][level]));
  return { pearson: pearsonChiSquare(table), likelihoodRatio: likelihoodRatioChiSquare(table), table, levelsLeftOut, wavesLeftOut };
}
