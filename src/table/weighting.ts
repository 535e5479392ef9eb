/** How a table's counts were weighted, so that tests use the right sample size. */
export interface Weighting {
  kind: 'none' | 'weight' | 'freq';
  /** Σw (the table total). */
  sumWeights: number;
  /** Σw², for Kish's effective sample size (Σw)²/Σw². */
  sumSquaredWeights: number;
  /** Data rows that entered the table. */
  unweightedN: number;
}

export function unweighted(n: number): Weighting {
  return { kind: 'none', sumWeights: n, sumSquaredWeights: n, unweightedN: n };
}

/**
 * Kish's effective sample size n_eff = (Σw)² / Σw² (Kish 1965, Survey
 * Sampling, §11.7): the size of a simple random sample with the same
 * precision, ignoring clustering and stratification of the design.
 */
export function effectiveSampleSize(w: Weighting): number {
  if (w.kind !== 'weight') return w.sumWeights;
  return w.sumSquaredWeights > 0 ? (w.sumWeights * w.sumWeights) / w.sumSquaredWeights : 0;
}
