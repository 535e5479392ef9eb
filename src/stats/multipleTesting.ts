// Adjusted p-values for a family of m tests. Each function returns the
// adjusted values in the order of the input; NaN inputs stay NaN and are not
// counted in m.

/** The adjustments on offer: Benjamini–Hochberg, Holm, Bonferroni, or none. */
export type Adjustment = 'bh' | 'holm' | 'bonferroni' | 'none';

function order(pValues: readonly number[]): number[] {
  return pValues
    .map((p, i) => [p, i] as const)
    .filter(([p]) => !Number.isNaN(p))
    .sort((x, y) => x[0] - y[0] || x[1] - y[1])
    .map(([, i]) => i);
}

/**
 * Bonferroni: min(1, m·p) (Dunn 1961, J. Am. Stat. Assoc. 56, 52–64).
 *
 * @example
 * // the 15 p-values of Benjamini & Hochberg's (1995) worked example, §4
 * bonferroni([0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.3240, 0.4262, 0.5719, 0.6528, 0.7590, 1]) // [0.0015, 0.006, 0.0285, 0.1425, …]: three below 0.05
 */
export function bonferroni(pValues: readonly number[]): number[] {
  const m = order(pValues).length;
  return pValues.map((p) => (Number.isNaN(p) ? p : Math.min(1, m * p)));
}

/**
 * Holm's step-down: with p_(1) ≤ … ≤ p_(m),
 * p̃_(i) = max_{k ≤ i} min(1, (m − k + 1) p_(k)) (Holm 1979, Scand. J. Stat. 6, 65–70).
 *
 * @example
 * // the 15 p-values of Benjamini & Hochberg's (1995) worked example, §4
 * holm([0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.3240, 0.4262, 0.5719, 0.6528, 0.7590, 1]) // [0.0015, 0.0056, 0.0247, 0.114, …]: three below 0.05
 */
export function holm(pValues: readonly number[]): number[] {
  const idx = order(pValues);
  const m = idx.length;
  const out = [...pValues];
  let running = 0;
  idx.forEach((i, k) => {
    running = Math.max(running, Math.min(1, (m - k) * pValues[i]));
    out[i] = running;
  });
  return out;
}

/**
 * Benjamini–Hochberg step-up: p̃_(i) = min_{k ≥ i} min(1, m p_(k) / k)
 * (Benjamini & Hochberg 1995, J. R. Stat. Soc. B 57, 289–300).
 *
 * @example
 * // the 15 p-values of Benjamini & Hochberg's (1995) worked example, §4: four discoveries at q = 0.05, as the paper finds
 * benjaminiHochberg([0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.3240, 0.4262, 0.5719, 0.6528, 0.7590, 1]) // [0.0015, 0.003, 0.0095, 0.0356, 0.0603, …]
 */
export function benjaminiHochberg(pValues: readonly number[]): number[] {
  const idx = order(pValues);
  const m = idx.length;
  const out = [...pValues];
  let running = 1;
  for (let k = m - 1; k >= 0; k--) {
    const i = idx[k];
    running = Math.min(running, (m * pValues[i]) / (k + 1));
    out[i] = Math.min(1, running);
  }
  return out;
}

/**
 * The adjusted p-values of a family by the chosen method: Benjamini–Hochberg
 * (false discovery rate), Holm or Bonferroni (family-wise error rate), or the
 * p-values unchanged ('none'). Order of the input kept; NaN stays NaN and is
 * not counted in m.
 *
 * @example
 * // the 15 p-values of Benjamini & Hochberg's (1995) worked example, §4
 * adjustPValues([0.0001, 0.0004, 0.0019, 0.0095, 0.0201, 0.0278, 0.0298, 0.0344, 0.0459, 0.3240, 0.4262, 0.5719, 0.6528, 0.7590, 1], 'bh')
 * // [0.0015, 0.003, 0.0095, 0.0356, 0.0603, …]: four discoveries at q = 0.05, as the paper finds
 */
export function adjustPValues(pValues: readonly number[], method: Adjustment): number[] {
  switch (method) {
    case 'bh':
      return benjaminiHochberg(pValues);
    case 'holm':
      return holm(pValues);
    case 'bonferroni':
      return bonferroni(pValues);
    case 'none':
      return [...pValues];
  }
}
