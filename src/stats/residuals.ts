/**
 * Residuals of a two-way table (Pearson, adjusted), each cell's share of X²,
 * and percentages.
 */
import { CountMatrix, deviationsFromIndependence, margins } from './contingency.js';
import { complementsInSum } from '../numerics/doubleDouble.js';

/**
 * Pearson residuals e_ij = (n_ij − E_ij) / √E_ij (Agresti 2013 §2.4.5).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * pearsonResiduals([[189, 10845], [104, 10933]]) // [[3.513, −0.408], [−3.513, 0.407]]
 */
export function pearsonResiduals(counts: CountMatrix): number[][] {
  const { deviation, expected } = deviationsFromIndependence(counts);
  return deviation.map((row, i) => row.map((d, j) => d / Math.sqrt(expected[i][j])));
}

/**
 * Adjusted (standardised) residuals
 *   r_ij = (n_ij − E_ij) / √(E_ij (1 − n_i./n)(1 − n_.j/n)),
 * approximately standard normal under independence (Haberman 1973,
 * Biometrics 29, 205–220; Agresti 2013 §2.4.5). null where a margin is the
 * whole sample (the variance is zero).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): ±5.00 in every cell of a 2×2 table (the square is X²)
 * adjustedResiduals([[189, 10845], [104, 10933]]) // [[5.001, −5.001], [−5.001, 5.001]]
 */
export function adjustedResiduals(counts: CountMatrix): (number | null)[][] {
  const { rowTotals, colTotals, total } = margins(counts);
  const { deviation, expected } = deviationsFromIndependence(counts);
  // 1 − n_i./n as (n − n_i.)/n with n − n_i. summed from the other rows, so a
  // dominant row (10⁹ beside single digits) keeps the digits of its complement.
  const otherRows = complementsInSum(rowTotals);
  const otherCols = complementsInSum(colTotals);
  return deviation.map((row, i) =>
    row.map((d, j) => {
      const variance = expected[i][j] * (otherRows[i] / total) * (otherCols[j] / total);
      return variance > 0 ? d / Math.sqrt(variance) : null;
    }),
  );
}

/**
 * Each cell's share of Pearson's X²: ((n_ij − E_ij)²/E_ij) / X². Zero everywhere when X² = 0.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): the infarction column carries 99% of X²
 * chiSquareContributions([[189, 10845], [104, 10933]], 25.0139) // [[0.4934, 0.0066], [0.4933, 0.0066]]
 */
export function chiSquareContributions(counts: CountMatrix, chiSquare: number): number[][] {
  const { deviation, expected } = deviationsFromIndependence(counts);
  return deviation.map((row, i) => row.map((d, j) => (chiSquare > 0 ? (d * d) / expected[i][j] / chiSquare : 0)));
}

export interface Percentages {
  row: number[][];
  col: number[][];
  total: number[][];
}

/**
 * Row, column and total percentages (0–100); a zero margin gives 0.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): 1.71% infarctions on placebo, 0.94% on aspirin
 * percentages([[189, 10845], [104, 10933]]).row // [[1.713, 98.287], [0.942, 99.058]]
 */
export function percentages(counts: CountMatrix): Percentages {
  const { rowTotals, colTotals, total } = margins(counts);
  const share = (v: number, d: number) => (d > 0 ? (100 * v) / d : 0);
  return {
    row: counts.map((row, i) => row.map((v) => share(v, rowTotals[i]))),
    col: counts.map((row) => row.map((v, j) => share(v, colTotals[j]))),
    total: counts.map((row) => row.map((v) => share(v, total))),
  };
}
