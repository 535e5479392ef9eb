import { CountMatrix, margins, transpose } from './contingency.js';

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
 */
export function lambdaColsGivenRows(counts: CountMatrix): number | null {
  const { colTotals, total } = margins(counts);
  const maxCol = Math.max(...colTotals);
  if (total - maxCol <= 0) return null;
  const sumRowMax = counts.reduce((s, row) => s + Math.max(...row), 0);
  return (sumRowMax - maxCol) / (total - maxCol);
}

export function lambdaRowsGivenCols(counts: CountMatrix): number | null {
  return lambdaColsGivenRows(transpose(counts));
}

/**
 * Symmetric lambda (Goodman & Kruskal 1954):
 *   λ = (Σ_i max_j n_ij + Σ_j max_i n_ij − max n_.j − max n_i.) / (2n − max n_.j − max n_i.).
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
 * (Goodman & Kruskal 1954; Agresti 2013 §2.4.7).
 */
export function goodmanKruskalTauColsGivenRows(counts: CountMatrix): number | null {
  const { rowTotals, colTotals, total } = margins(counts);
  const sumColSquares = colTotals.reduce((s, v) => s + v * v, 0);
  const denominator = total * total - sumColSquares;
  if (denominator <= 0) return null;
  let within = 0;
  counts.forEach((row, i) => {
    if (rowTotals[i] > 0) for (const v of row) within += (v * v) / rowTotals[i];
  });
  return (total * within - sumColSquares) / denominator;
}

export function goodmanKruskalTauRowsGivenCols(counts: CountMatrix): number | null {
  return goodmanKruskalTauColsGivenRows(transpose(counts));
}

/** Shannon entropy −Σ p log p of a list of counts (natural log; 0·log 0 = 0). */
function entropy(values: Iterable<number>, total: number): number {
  let h = 0;
  for (const v of values) if (v > 0) h -= (v / total) * Math.log(v / total);
  return h;
}

interface Entropies {
  rows: number;
  cols: number;
  joint: number;
}

function entropies(counts: CountMatrix): Entropies {
  const { rowTotals, colTotals, total } = margins(counts);
  return { rows: entropy(rowTotals, total), cols: entropy(colTotals, total), joint: entropy(counts.flat(), total) };
}

/**
 * Theil's uncertainty coefficient, predicting columns from rows:
 *   U(C|R) = (H(R) + H(C) − H(R,C)) / H(C)
 * (Theil 1970, Am. J. Sociology 76, 103–154; Press et al., Numerical Recipes §14.4).
 */
export function uncertaintyColsGivenRows(counts: CountMatrix): number | null {
  const h = entropies(counts);
  if (h.cols <= 0) return null;
  return Math.max(0, (h.rows + h.cols - h.joint) / h.cols);
}

export function uncertaintyRowsGivenCols(counts: CountMatrix): number | null {
  return uncertaintyColsGivenRows(transpose(counts));
}

/** Symmetric uncertainty coefficient U = 2 (H(R) + H(C) − H(R,C)) / (H(R) + H(C)). */
export function uncertaintySymmetric(counts: CountMatrix): number | null {
  const h = entropies(counts);
  if (h.rows + h.cols <= 0) return null;
  return Math.max(0, (2 * (h.rows + h.cols - h.joint)) / (h.rows + h.cols));
}
