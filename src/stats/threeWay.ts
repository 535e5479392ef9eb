import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { compensatedSum } from './contingency.js';

/**
 * The model of no three-way interaction for an r×c×K table (Bartlett 1935;
 * Bishop, Fienberg & Holland 1975, Discrete Multivariate Analysis, §3.5),
 * fitted by iterative proportional fitting: starting from ones, the fitted
 * table is scaled in turn to the observed n_ij+, n_i+k and n_+jk margins
 * until no fitted cell moves by more than `tolerance` (relative).
 * The likelihood-ratio statistic G² = 2 Σ n log(n/m̂) has df (r−1)(c−1)(K−1)
 * when no fitted margin is zero.
 */
export function noThreeWayInteraction(layers: readonly (readonly (readonly number[])[])[], tolerance = 1e-12, maxIterations = 10_000): (TestResult & { iterations: number; fitted: number[][][] }) | null {
  const K = layers.length;
  if (K < 2) return null;
  const r = layers[0].length;
  const c = layers[0][0].length;
  const n = layers;
  let m = layers.map((t) => t.map((row) => row.map(() => 1)));
  const sumOver = (f: (i: number, j: number, k: number) => number, dims: 'ij' | 'ik' | 'jk') => {
    const [A, B] = dims === 'ij' ? [r, c] : dims === 'ik' ? [r, K] : [c, K];
    const out = Array.from({ length: A }, () => new Array<number>(B).fill(0));
    for (let k = 0; k < K; k++)
      for (let i = 0; i < r; i++)
        for (let j = 0; j < c; j++) {
          const v = f(i, j, k);
          if (dims === 'ij') out[i][j] += v;
          else if (dims === 'ik') out[i][k] += v;
          else out[j][k] += v;
        }
    return out;
  };
  const observedIJ = sumOver((i, j, k) => n[k][i][j], 'ij');
  const observedIK = sumOver((i, j, k) => n[k][i][j], 'ik');
  const observedJK = sumOver((i, j, k) => n[k][i][j], 'jk');
  let iterations = 0;
  for (; iterations < maxIterations; iterations++) {
    const before = m.map((t) => t.map((row) => [...row]));
    const fitIJ = sumOver((i, j, k) => m[k][i][j], 'ij');
    m = m.map((t) => t.map((row, i) => row.map((v, j) => (fitIJ[i][j] > 0 ? (v * observedIJ[i][j]) / fitIJ[i][j] : 0))));
    const fitIK = sumOver((i, j, k) => m[k][i][j], 'ik');
    m = m.map((t, k) => t.map((row, i) => row.map((v) => (fitIK[i][k] > 0 ? (v * observedIK[i][k]) / fitIK[i][k] : 0))));
    const fitJK = sumOver((i, j, k) => m[k][i][j], 'jk');
    m = m.map((t, k) => t.map((row) => row.map((v, j) => (fitJK[j][k] > 0 ? (v * observedJK[j][k]) / fitJK[j][k] : 0))));
    let change = 0;
    m.forEach((t, k) => t.forEach((row, i) => row.forEach((v, j) => (change = Math.max(change, Math.abs(v - before[k][i][j]) / Math.max(1, Math.abs(v)))))));
    if (change < tolerance) break;
  }
  const terms: number[] = [];
  n.forEach((t, k) => t.forEach((row, i) => row.forEach((v, j) => {
    if (v > 0) terms.push(v * Math.log(v / m[k][i][j]));
  })));
  const statistic = Math.max(0, 2 * compensatedSum(terms));
  const df = (r - 1) * (c - 1) * (K - 1);
  return { statistic, df, pValue: upperTailChiSquare(statistic, df), iterations, fitted: m };
}
