/**
 * The test of no three-way interaction across layers (iterative proportional
 * fitting), and each layer's departure from it.
 */
import { upperTailChiSquare } from './chiSquareDistribution.js';
import { TestResult } from './chiSquareTests.js';
import { compensatedSum } from '../numerics/compensatedSum.js';
import { devianceTerm } from './gamma.js';

/** A stack of K two-way tables with the same r row and c column levels: layers[k][i][j]. */
export type LayerStack = readonly (readonly (readonly number[])[])[];

export interface NoThreeWayOptions {
  /** Stop when no fitted cell moves by more than this in a sweep (relative, absolute below 1). Default 1e-12. */
  tolerance?: number;
  /** The most sweeps of the three margins before giving up. Default 10 000. */
  maxIterations?: number;
  /**
   * Cells that cannot occur (structural zeros), structuralZeros[k][i][j] = true.
   * They start and stay at zero in the fit and are not counted in the df.
   * An observed count in such a cell is a caller's error and throws.
   */
  structuralZeros?: readonly (readonly (readonly boolean[])[])[];
  /**
   * Fitted counts to start from instead of ones, start[k][i][j]: a table
   * without three-way interaction itself (the layers of another fit of this
   * model, say), from which the sweeps reach the same fit in fewer steps;
   * its zeros must be cells that are zero in the fit (see layerDepartures).
   */
  start?: LayerStack;
}

export interface NoThreeWayInteractionFit extends TestResult {
  /** Pearson's X² = Σ (n − m̂)²/m̂ over the cells with m̂ > 0, on the same df. */
  pearson: TestResult;
  /** Sweeps used. */
  iterations: number;
  /** False when `maxIterations` sweeps ended before the fit settled: the statistic is then provisional. */
  converged: boolean;
  /** Fitted counts m̂[k][i][j]. */
  fitted: number[][][];
  /** (K−1)(r−1)(c−1), the df when no fitted cell is zero. */
  nominalDf: number;
  /** Cells whose fitted value is zero: a zero observed margin (n_ij+, n_i+k or n_+jk) or a structural zero. */
  zeroFittedCells: number;
  /** True when `df` differs from `nominalDf` because of zero fitted cells. */
  dfAdjusted: boolean;
}

/**
 * The model of no three-way interaction for a K×r×c table (Bartlett 1935,
 * J. R. Stat. Soc. Suppl. 2, 248–252; Bishop, Fienberg & Holland 1975,
 * Discrete Multivariate Analysis, §3.5): the association of rows and columns
 * (every odds ratio) is the same in all K layers, log m_ijk = λ_ij + λ_ik + λ_jk.
 * Fitted by iterative proportional fitting (Deming & Stephan 1940): starting
 * from ones (or from `start`), the fitted table is scaled in turn to the observed n_ij+, n_i+k
 * and n_+jk margins until no fitted cell moves by more than `tolerance`
 * (relative; absolute below 1), or `maxIterations` sweeps have been made
 * (then `converged` is false).
 *
 *   G² = 2 Σ n log(n/m̂)  (as 2 Σ [n log(n/m̂) − n + m̂], the same sum since
 *   the fit keeps the total), X² = Σ (n − m̂)²/m̂,
 *   df = (K−1)(r−1)(c−1) when every fitted cell is positive.
 *
 * A zero observed margin (a level absent from one layer, a level pair never
 * seen) forces its cells' fitted values to zero; with such cells, and with
 * structural zeros, the df is the number of cells with a positive fit minus
 * the number of parameters that can still be estimated (Bishop, Fienberg &
 * Holland 1975, §3.8; Fienberg 1980, The Analysis of Cross-Classified
 * Categorical Data, §8.1), the latter found as the rank of the model's design
 * restricted to those cells. `dfAdjusted` says when that happened.
 * null for fewer than two layers, fewer than two rows or columns, or no df left.
 *
 * @example
 * // two layers with the same odds ratio fit exactly: G² = 0 on 1 df
 * noThreeWayInteraction([[[10, 20], [30, 40]], [[20, 40], [60, 80]]])?.statistic; // 0
 */
export function noThreeWayInteraction(
  layers: LayerStack,
  toleranceOrOptions: number | NoThreeWayOptions = {},
  maxIterationsArgument?: number,
): NoThreeWayInteractionFit | null {
  const options: NoThreeWayOptions = typeof toleranceOrOptions === 'number' ? { tolerance: toleranceOrOptions, maxIterations: maxIterationsArgument } : toleranceOrOptions;
  const tolerance = options.tolerance ?? 1e-12;
  const maxIterations = options.maxIterations ?? maxIterationsArgument ?? 10_000;
  const K = layers.length;
  if (K < 2) return null;
  const r = layers[0].length;
  const c = r === 0 ? 0 : layers[0][0].length;
  if (r < 2 || c < 2) return null;
  const cells = K * r * c;
  const at = (k: number, i: number, j: number) => (k * r + i) * c + j;

  const n = new Float64Array(cells);
  const structural = new Uint8Array(cells);
  for (let k = 0; k < K; k++)
    for (let i = 0; i < r; i++)
      for (let j = 0; j < c; j++) {
        n[at(k, i, j)] = layers[k][i][j];
        if (options.structuralZeros?.[k]?.[i]?.[j]) {
          if (layers[k][i][j] !== 0) throw new Error(`structural zero at layer ${k}, row ${i}, column ${j} holds a count of ${layers[k][i][j]}`);
          structural[at(k, i, j)] = 1;
        }
      }

  // Observed margins n_ij+, n_i+k, n_+jk.
  const observedIJ = new Float64Array(r * c);
  const observedIK = new Float64Array(r * K);
  const observedJK = new Float64Array(c * K);
  marginsInto(n, K, r, c, observedIJ, observedIK, observedJK);

  // Start from ones (zeros at structural zeros), or from the table given; zero margins zero their cells at the first sweep.
  const m = new Float64Array(cells);
  const start = options.start;
  for (let k = 0; k < K; k++)
    for (let i = 0; i < r; i++)
      for (let j = 0; j < c; j++) {
        const x = at(k, i, j);
        m[x] = structural[x] ? 0 : start ? start[k][i][j] : 1;
      }
  const previous = new Float64Array(cells);
  const fitIJ = new Float64Array(r * c);
  const fitIK = new Float64Array(r * K);
  const fitJK = new Float64Array(c * K);
  let iterations = 0;
  let converged = false;
  while (iterations < maxIterations) {
    iterations++;
    const change = sweep(m, previous, K, r, c, observedIJ, observedIK, observedJK, fitIJ, fitIK, fitJK);
    if (change < tolerance) {
      converged = true;
      break;
    }
  }

  // Cells with a positive fit: not structural, all three observed margins positive.
  const positive = new Uint8Array(cells);
  let zeroFittedCells = 0;
  for (let k = 0; k < K; k++)
    for (let i = 0; i < r; i++)
      for (let j = 0; j < c; j++) {
        const x = at(k, i, j);
        const ok = !structural[x] && observedIJ[i * c + j] > 0 && observedIK[i * K + k] > 0 && observedJK[j * K + k] > 0;
        positive[x] = ok ? 1 : 0;
        if (!ok) {
          zeroFittedCells++;
          m[x] = 0;
        }
      }

  const nominalDf = (K - 1) * (r - 1) * (c - 1);
  const df = zeroFittedCells === 0 ? nominalDf : zeroFittedCells === cells ? 0 : positiveCellCount(positive) - designRank(positive, K, r, c);
  if (df <= 0) return null;

  const devianceTerms: number[] = [];
  const pearsonTerms: number[] = [];
  for (let x = 0; x < cells; x++) {
    if (!positive[x]) continue;
    const observed = n[x];
    const expected = m[x];
    devianceTerms.push(observed === 0 ? expected : devianceTerm(observed, expected));
    pearsonTerms.push(((observed - expected) * (observed - expected)) / expected);
  }
  const statistic = Math.max(0, 2 * compensatedSum(devianceTerms));
  const pearsonStatistic = compensatedSum(pearsonTerms);
  const fitted: number[][][] = [];
  for (let k = 0; k < K; k++) {
    const layer: number[][] = [];
    for (let i = 0; i < r; i++) layer.push(Array.from({ length: c }, (_v, j) => m[at(k, i, j)]));
    fitted.push(layer);
  }
  return {
    statistic,
    df,
    pValue: upperTailChiSquare(statistic, df),
    pearson: { statistic: pearsonStatistic, df, pValue: upperTailChiSquare(pearsonStatistic, df) },
    iterations,
    converged,
    fitted,
    nominalDf,
    zeroFittedCells,
    dfAdjusted: df !== nominalDf,
  };
}

/**
 * One sweep of IPF: the fitted table m scaled to n_ij+, then n_i+k, then
 * n_+jk, in flat index arithmetic (cell x = (k·r + i)·c + j) and in the same
 * order of additions as the margins' definitions; returns the largest move
 * of a cell (relative, absolute below 1; Infinity for a cell that is not a
 * number, which never settles). A function of its own, small enough that
 * the engine compiles it to machine code after the first few sweeps.
 */
function sweep(m: Float64Array, previous: Float64Array, K: number, r: number, c: number, observedIJ: Float64Array, observedIK: Float64Array, observedJK: Float64Array, fitIJ: Float64Array, fitIK: Float64Array, fitJK: Float64Array): number {
  previous.set(m);
  // scale to n_ij+
  fitIJ.fill(0);
  for (let k = 0, x = 0; k < K; k++) for (let ij = 0; ij < r * c; ij++, x++) fitIJ[ij] += m[x];
  for (let k = 0, x = 0; k < K; k++) for (let ij = 0; ij < r * c; ij++, x++) m[x] = scaled(m[x], observedIJ[ij], fitIJ[ij]);
  // scale to n_i+k
  fitIK.fill(0);
  for (let k = 0, x = 0; k < K; k++) for (let i = 0; i < r; i++) for (let j = 0; j < c; j++, x++) fitIK[i * K + k] += m[x];
  for (let k = 0, x = 0; k < K; k++) for (let i = 0; i < r; i++) for (let j = 0; j < c; j++, x++) m[x] = scaled(m[x], observedIK[i * K + k], fitIK[i * K + k]);
  // scale to n_+jk
  fitJK.fill(0);
  for (let k = 0, x = 0; k < K; k++) for (let i = 0; i < r; i++) for (let j = 0; j < c; j++, x++) fitJK[j * K + k] += m[x];
  for (let k = 0, x = 0; k < K; k++) for (let i = 0; i < r; i++) for (let j = 0; j < c; j++, x++) m[x] = scaled(m[x], observedJK[j * K + k], fitJK[j * K + k]);
  let change = 0;
  for (let x = 0; x < m.length; x++) {
    const size = Math.abs(m[x]);
    const moved = Math.abs(m[x] - previous[x]) / (size > 1 ? size : 1);
    if (moved > change || Number.isNaN(moved)) change = Number.isNaN(moved) ? Infinity : moved;
  }
  return change;
}

/** m · observed/fitted, with a zero observed or fitted margin giving zero. */
function scaled(value: number, observed: number, fitted: number): number {
  return fitted > 0 && observed > 0 ? (value * observed) / fitted : 0;
}

function marginsInto(values: Float64Array, K: number, r: number, c: number, ij: Float64Array, ik: Float64Array, jk: Float64Array): void {
  for (let k = 0; k < K; k++)
    for (let i = 0; i < r; i++)
      for (let j = 0; j < c; j++) {
        const v = values[(k * r + i) * c + j];
        ij[i * c + j] += v;
        ik[i * K + k] += v;
        jk[j * K + k] += v;
      }
}

function positiveCellCount(positive: Uint8Array): number {
  let count = 0;
  for (const p of positive) count += p;
  return count;
}

/**
 * Rank of the design of log m = λ_ij + λ_ik + λ_jk restricted to the cells
 * marked positive: each such cell is a row with a one in its ij, ik and jk
 * columns. The rank of X equals that of the Gram matrix XᵀX, found by
 * Cholesky factorisation with diagonal pivoting (rank-revealing for a
 * positive semi-definite matrix; Higham 2002, Accuracy and Stability of
 * Numerical Algorithms, §10.3), stopping when the largest remaining pivot is
 * below 1e-9 of the largest diagonal entry.
 */
export function designRank(positive: Uint8Array, K: number, r: number, c: number): number {
  const columnsIJ = r * c;
  const columnsIK = r * K;
  const p = columnsIJ + columnsIK + c * K;
  const gram = Array.from({ length: p }, () => new Float64Array(p));
  for (let k = 0; k < K; k++)
    for (let i = 0; i < r; i++)
      for (let j = 0; j < c; j++) {
        if (!positive[(k * r + i) * c + j]) continue;
        const ones = [i * c + j, columnsIJ + i * K + k, columnsIJ + columnsIK + j * K + k];
        for (const a of ones) for (const b of ones) gram[a][b] += 1;
      }
  // Keep only the columns some positive cell touches.
  const used: number[] = [];
  for (let a = 0; a < p; a++) if (gram[a][a] > 0) used.push(a);
  const size = used.length;
  const A = used.map((a) => Float64Array.from(used, (b) => gram[a][b]));
  const scale = Math.max(0, ...used.map((_a, x) => A[x][x]));
  const order = Array.from({ length: size }, (_v, x) => x);
  let rank = 0;
  for (let step = 0; step < size; step++) {
    let best = step;
    for (let x = step + 1; x < size; x++) if (A[order[x]][order[x]] > A[order[best]][order[best]]) best = x;
    const pivotIndex = order[best];
    const pivot = A[pivotIndex][pivotIndex];
    if (!(pivot > 1e-9 * scale)) break;
    [order[step], order[best]] = [order[best], order[step]];
    rank++;
    // Schur complement of the remaining block.
    for (let x = step + 1; x < size; x++) {
      const row = order[x];
      const factor = A[row][pivotIndex] / pivot;
      if (factor === 0) continue;
      for (let y = step + 1; y < size; y++) {
        const col = order[y];
        A[row][col] -= factor * A[pivotIndex][col];
      }
    }
  }
  return rank;
}

export interface LayerDeparture extends TestResult {
  /** The layer (wave) index k. */
  layer: number;
}

/**
 * Which layer stands out: for each layer k, the likelihood-ratio test of the
 * model in which layer k keeps an association of its own while the other
 * layers share one, against no three-way interaction in all K layers. Layer k
 * is then fitted exactly, so the statistic is
 *   G²(all K layers) − G²(the K−1 other layers),
 * on df(all) − df(others) (= (r−1)(c−1) without zero margins) — a
 * leave-one-layer-out comparison of nested log-linear models (Bishop,
 * Fienberg & Holland 1975, §4.2 on partitioning G²). An entry is null when
 * either fit is undefined (e.g. only two layers with information).
 * The K tests are K looks at the data: adjust them (e.g. Holm) before
 * naming a layer.
 *
 * `all` is the fit of all K layers when the caller has it already. Each fit
 * of K − 1 layers starts from that fit's other layers: a table without
 * three-way interaction, so IPF carries it to the same maximum-likelihood
 * fit as from ones (Bishop, Fienberg & Holland 1975, §3.5: the sweeps keep
 * the interaction structure of the start), in fewer sweeps; a cell it holds
 * at zero has a zero margin (or is a structural zero) in every subset of
 * layers too.
 */
export function layerDepartures(layers: LayerStack, options: NoThreeWayOptions = {}, all: NoThreeWayInteractionFit | null = noThreeWayInteraction(layers, options)): (LayerDeparture | null)[] | null {
  if (all === null) return null;
  return layers.map((_layer, k) => {
    const others = layers.filter((_t, x) => x !== k);
    const structuralZeros = options.structuralZeros?.filter((_t, x) => x !== k);
    const start = all.fitted.filter((_t, x) => x !== k);
    const rest = others.length >= 2 ? noThreeWayInteraction(others, { ...options, structuralZeros, start }) : null;
    const restStatistic = rest?.statistic ?? 0;
    const restDf = rest?.df ?? 0;
    const df = all.df - restDf;
    if (df <= 0) return null;
    const statistic = Math.max(0, all.statistic - restStatistic);
    return { layer: k, statistic, df, pValue: upperTailChiSquare(statistic, df) };
  });
}
