/**
 * Sequential simulation for a family of records: draws the simulated
 * p-values a scan left pending, only as far as its decisions need.
 */
import type { Adjustment } from '../stats/multipleTesting.js';
import { DEFAULT_SEQUENTIAL, GrowingSimulation, sequentialDecisions } from '../stats/sequentialMonteCarlo.js';
import { abandonSimulation, AnalysisRecord, completeSimulation, simulationPending } from './analyzeTable.js';

/**
 * Draws the simulated p-values a family of records left pending, each only
 * as far as the family's decision at `alpha` under `adjustment` needs
 * (sequentialDecisions), up to `maxDraws` tables. Records that do not wait
 * for a simulation take part with their leading p-value.
 */
export function simulateSequentially(records: readonly AnalysisRecord[], adjustment: Adjustment, alpha: number, maxDraws: number, seed: number): void {
  const simulations = records.map((record) =>
    simulationPending(record) ? new GrowingSimulation(record.counts, seed) : null,
  );
  if (simulations.every((s) => s === null)) return;
  const fixed = records.map((record) => (simulationPending(record) ? null : record.findings.primaryTest.pValue));
  const outcomes = sequentialDecisions(fixed, simulations, adjustment, alpha, { ...DEFAULT_SEQUENTIAL, maxDraws: Math.max(DEFAULT_SEQUENTIAL.firstLook, maxDraws) });
  records.forEach((record, k) => {
    const sim = simulations[k];
    const outcome = outcomes[k];
    if (sim && outcome) completeSimulation(record, sim.result(), outcome.stop);
    else if (sim) abandonSimulation(record);
  });
}
