/** How a table's rows were weighted (none, sampling weights, frequencies), Kish's effective sample size, and the table rescaled to it. */
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
  // Σw · (Σw / Σw²): (Σw)² itself would overflow for weights near 1e155.
  return w.sumSquaredWeights > 0 ? w.sumWeights * (w.sumWeights / w.sumSquaredWeights) : 0;
}

/**
 * A sampling-weighted table rescaled to Kish's effective sample size, the
 * table every test of a weighted analysis uses; other tables come back as they are.
 */
export function rescaleToEffectiveSize(counts: readonly (readonly number[])[], w: Weighting): number[][] {
  const copy = counts.map((row) => [...row]);
  if (w.kind !== 'weight') return copy;
  const total = copy.reduce((s, row) => s + row.reduce((t, v) => t + v, 0), 0);
  if (!(total > 0)) return copy;
  const scale = effectiveSampleSize(w) / total;
  return copy.map((row) => row.map((v) => v * scale));
}
