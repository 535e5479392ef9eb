/**
 * Predictive (proportional-reduction-in-error) measures: Goodman–Kruskal
 * lambda and tau, Theil's uncertainty coefficient.
 */
import { likelihoodRatioChiSquare } from './chiSquareTests.js';
import { compensatedSum } from '../numerics/compensatedSum.js';
import { CountMatrix, deviationsFromIndependence, margins, transpose } from './contingency.js';
import { complementsInSum } from '../numerics/doubleDouble.js';

/**
 * Proportional-reduction-in-error measures of association, in both
 * directions. "ColsGivenRows" predicts the column variable from the row
 * variable. Each is null when the predicted variable has a single level
 * (there is no error to reduce).
 */

/**
 * Goodman–Kruskal lambda, predicting columns from rows:
 *   λ(C|R) = (Σ_i max_j n_ij − max_j n_.j) / (n − max_j n_.j)
 * (Goodman & Kruskal 1954, J. Am. Stat. Assoc. 49, 732–764).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135): the modal outcome (no infarction) is the same in both rows
 * lambdaColsGivenRows([[189, 10845], [104, 10933]]) // 0
 */
export function lambdaColsGivenRows(counts: CountMatrix): number | null {
  const { colTotals, total } = margins(counts);
  const maxCol = Math.max(...colTotals);
  if (total - maxCol <= 0) return null;
  const sumRowMax = counts.reduce((s, row) => s + Math.max(...row), 0);
  return (sumRowMax - maxCol) / (total - maxCol);
}

/**
 * Goodman–Kruskal lambda predicting rows from columns, λ(R|C): λ(C|R) of the
 * transposed table.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * lambdaRowsGivenCols([[189, 10845], [104, 10933]]) // 0.0077
 */
export function lambdaRowsGivenCols(counts: CountMatrix): number | null {
  return lambdaColsGivenRows(transpose(counts));
}

/**
 * Symmetric lambda (Goodman & Kruskal 1954):
 *   λ = (Σ_i max_j n_ij + Σ_j max_i n_ij − max n_.j − max n_i.) / (2n − max n_.j − max n_i.).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * lambdaSymmetric([[189, 10845], [104, 10933]]) // 0.0075
 */
export function lambdaSymmetric(counts: CountMatrix): number | null {
  const { rowTotals, colTotals, total } = margins(counts);
  const maxCol = Math.max(...colTotals);
  const maxRow = Math.max(...rowTotals);
  const denominator = 2 * total - maxCol - maxRow;
  if (denominator <= 0) return null;
  const sumRowMax = counts.reduce((s, row) => s + Math.max(...row), 0);
  const sumColMax = transpose(counts).reduce((s, col) => s + Math.max(...col), 0);
  return (sumRowMax + sumColMax - maxCol - maxRow) / denominator;
}

/**
 * Goodman–Kruskal tau, predicting columns from rows:
 *   τ(C|R) = (n Σ_ij n_ij²/n_i. − Σ_j n_.j²) / (n² − Σ_j n_.j²)
 * (Goodman & Kruskal 1954; Agresti 2013, Categorical Data Analysis, 3rd ed., §2.4.7).
 * With d_ij = n_ij − n_i. n_.j / n the departures from independence, the
 * numerator equals n Σ_ij d_ij²/n_i. (the cross terms vanish because each
 * column of d sums to 0), and the denominator Σ_j n_.j (n − n_.j): sums of
 * non-negative terms, so a tau near 0 keeps its relative accuracy (and is
 * never negative) at any n. null when one column holds everything.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * goodmanKruskalTauColsGivenRows([[189, 10845], [104, 10933]]) // 0.00113
 */
export function goodmanKruskalTauColsGivenRows(counts: CountMatrix): number | null {
  const { rowTotals, colTotals, total } = margins(counts);
  const others = complementsInSum(colTotals);
  const denominator = compensatedSum(colTotals.map((v, j) => v * others[j]));
  if (!(denominator > 0)) return null;
  const { deviation } = deviationsFromIndependence(counts);
  const terms: number[] = [];
  deviation.forEach((row, i) => {
    if (rowTotals[i] > 0) for (const d of row) terms.push((d * d) / rowTotals[i]);
  });
  return (total * compensatedSum(terms)) / denominator;
}

/**
 * Goodman–Kruskal tau predicting rows from columns, τ(R|C): τ(C|R) of the
 * transposed table (for a 2×2 table both equal φ²).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * goodmanKruskalTauRowsGivenCols([[189, 10845], [104, 10933]]) // 0.00113
 */
export function goodmanKruskalTauRowsGivenCols(counts: CountMatrix): number | null {
  return goodmanKruskalTauColsGivenRows(transpose(counts));
}

/**
 * Shannon entropy −Σ p log p of a list of counts (natural log; 0·log 0 = 0).
 * A share near 1 takes its log as log1p(−(others)/n), the others summed
 * directly, so a dominant level does not lose the digits of its complement.
 */
function entropy(values: readonly number[], total: number): number {
  const others = complementsInSum(values);
  const terms: number[] = [];
  values.forEach((v, k) => {
    if (v > 0) terms.push(-(v / total) * (v > total / 2 ? Math.log1p(-others[k] / total) : Math.log(v / total)));
  });
  return compensatedSum(terms);
}

/**
 * The mutual information I(R; C) = H(R) + H(C) − H(R, C) = Σ p_ij log(p_ij/(p_i. p_.j)),
 * which is G²/(2n): taken from the likelihood-ratio statistic, whose terms are
 * formed from the exact departures from independence, so that it keeps its
 * relative accuracy where the entropies nearly cancel.
 */
function mutualInformation(counts: CountMatrix): number {
  const { total } = margins(counts);
  return likelihoodRatioChiSquare(counts).statistic / (2 * total);
}

/**
 * Theil's uncertainty coefficient, predicting columns from rows:
 *   U(C|R) = (H(R) + H(C) − H(R,C)) / H(C) = I(R; C) / H(C)
 * (Theil 1970, Am. J. Sociology 76, 103–154; Press et al., Numerical Recipes,
 * 3rd ed., §14.7.4). null when one column holds everything.
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * uncertaintyColsGivenRows([[189, 10845], [104, 10933]]) // 0.00815
 */
export function uncertaintyColsGivenRows(counts: CountMatrix): number | null {
  const { colTotals, total } = margins(counts);
  const hCols = entropy(colTotals, total);
  if (!(hCols > 0)) return null;
  return Math.min(1, mutualInformation(counts) / hCols);
}

/**
 * Theil's uncertainty coefficient predicting rows from columns, U(R|C) = I(R; C)/H(R).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * uncertaintyRowsGivenCols([[189, 10845], [104, 10933]]) // 0.00083
 */
export function uncertaintyRowsGivenCols(counts: CountMatrix): number | null {
  return uncertaintyColsGivenRows(transpose(counts));
}

/**
 * Symmetric uncertainty coefficient U = 2 I(R; C) / (H(R) + H(C)) (Theil 1970).
 *
 * @example
 * // aspirin and myocardial infarction, Physicians' Health Study (Steering Committee 1989, N. Engl. J. Med. 321, 129–135)
 * uncertaintySymmetric([[189, 10845], [104, 10933]]) // 0.00151
 */
export function uncertaintySymmetric(counts: CountMatrix): number | null {
  const { rowTotals, colTotals, total } = margins(counts);
  const h = entropy(rowTotals, total) + entropy(colTotals, total);
  if (!(h > 0)) return null;
  return Math.min(1, (2 * mutualInformation(counts)) / h);
}
