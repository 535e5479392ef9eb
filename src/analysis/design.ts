/**
 * The design-based part of a table's analysis: from the design totals
 * counted beside the table to the covariance of its cell proportions, the
 * Rao–Scott tests, the design effects, the percentages with their
 * intervals and the design-scaled V, as the plain record fields every
 * renderer reads.
 */
import { dataError, TabsightError } from '../errors.js';
import { linearizedCovariance, replicateCovariance, type DesignEstimate, type LonelyPsuTreatment, type ReplicateMethod } from '../stats/designCovariance.js';
import { designCramersV, designPercentages, type DesignProportion } from '../stats/designPercentages.js';
import { PsuCellTotals, type SampleDesignIndex } from '../stats/designTally.js';
import { designTests, type DesignChiSquare, type DesignFTest, type DesignTests } from '../stats/raoScott.js';
import { layoutFor, type DesignCells } from '../table/surveyDesign.js';
import type { TwoWayTable } from '../table/twoWayTable.js';

/** The design totals of a table and the --other merge its levels went through. */
export interface DesignInput {
  cells: DesignCells;
  other: { label: string } | null;
}

/** The survey design of a record, as the JSON `design` field gives it. */
export interface DesignSummary {
  kind: 'taylor' | 'replicate';
  /** Strata (Taylor; 1 without --strata), null for replicate weights. */
  strata: number | null;
  /** PSUs (Taylor): clusters, or rows when every row is its own PSU; null for replicate weights. */
  clusters: number | null;
  /** Taylor: PSUs − strata; replicate weights: R − 1. */
  degreesOfFreedom: number;
  replicates: number | null;
  method: ReplicateMethod | null;
  lonelyPsu: LonelyPsuTreatment | null;
  /** The columns that describe the design. */
  columns: { strata: string | null; cluster: string | null; fpc: string | null; weight: string | null; replicates: string[] };
  /** Fay's ρ (fay only). */
  rho: number | null;
  /** Replicate variance centred at the mean of the replicates or at the full-sample estimate. */
  centre: 'replicate-mean' | 'full-sample' | null;
  /** Strata with a single PSU, treated by `lonelyPsu`. */
  lonelyStrata: string[];
  /** Replicates left out because their weights sum to zero on the table's rows. */
  droppedReplicates: number;
  /** Unweighted rows in the table (n of the tests). */
  n: number;
  /** n / mean design effect: the sample size a simple random sample with the same evidence would have. */
  effectiveSampleSize: number;
  /** The generalized design effects of the independence test (eigenvalues of Rao & Scott's Δ). */
  designEffects: { mean: number; min: number | null; max: number | null; coefficientOfVariation: number; eigenvalues: number[] | null };
  /** X² and G² of the weighted table rescaled to n, before the design correction. */
  uncorrected: { pearson: number; likelihoodRatio: number };
}

/** A weighted percentage with its design-based standard error and interval, all in percent (0–100). */
export interface DesignShare {
  estimate: number;
  standardError: number;
  lower: number | null;
  upper: number | null;
  /** The interval given: "logit" or "korn-graubard". */
  method: 'logit' | 'korn-graubard';
  /** Kish's design effect of this share (its variance over p(1 − p)/m), null at 0 or 1. */
  designEffect: number | null;
}

export interface DesignPercentageRecord {
  confidence: number;
  degreesOfFreedom: number;
  row: DesignShare[][];
  col: DesignShare[][];
  total: DesignShare[][];
  rowMargins: DesignShare[];
  colMargins: DesignShare[];
}

export interface DesignAnalysis {
  summary: DesignSummary;
  designPearson: DesignChiSquare;
  designLikelihoodRatio: DesignChiSquare;
  designF: DesignFTest;
  /** Kish's design effect of each cell's proportion (r × c), null where it is 0 or 1. */
  cellDesignEffects: (number | null)[][];
  percentages: DesignPercentageRecord | null;
  cramersV: { value: number; effectiveSampleSize: number };
  estimate: DesignEstimate;
}

/** The design estimate of a table's cells (conventions: docs/design-based.md). */
export function designEstimate(input: DesignInput, table: Pick<TwoWayTable, 'rowLevels' | 'colLevels'>): DesignEstimate {
  const { cells } = input;
  const layout = layoutFor(cells, table, input.other);
  const design = cells.design;
  if (design.kind === 'taylor') return linearizedCovariance(cells.totals as PsuCellTotals, { lonelyPsu: design.lonelyPsu, layout });
  return replicateCovariance(cells.totals as never, { method: design.method, rho: design.rho ?? undefined, scaleFactors: design.scales ?? undefined, centre: design.centre, layout });
}

/**
 * Checks what belongs to the design as a whole, before any table: a stratum
 * with a single PSU under --lonely-psu fail, --fpc values that contradict the
 * sample, every stratum lonely under average. The same code as every table's
 * covariance runs (linearizedCovariance), on one weighted cell, so that a
 * scan stops once with the one message instead of failing every pair.
 */
export function checkDesign(index: SampleDesignIndex, lonelyPsu: LonelyPsuTreatment): void {
  if (index.unitCount === 0) return;
  const probe = new PsuCellTotals(index);
  probe.add(0, 0, 1);
  linearizedCovariance(probe, { lonelyPsu, layout: { size: 1 } });
}

function share(x: DesignProportion): DesignShare {
  return {
    estimate: 100 * x.proportion,
    standardError: 100 * x.standardError,
    lower: x.lower === null ? null : 100 * x.lower,
    upper: x.upper === null ? null : 100 * x.upper,
    method: x.method,
    designEffect: x.designEffect,
  };
}

/**
 * The design-based analysis of a table (at least two levels a side, levels
 * with weight only): the covariance, the Rao–Scott tests, the design
 * effects and, when asked, the percentages with intervals. A design that
 * gives the table no variance or no degrees of freedom is refused in one
 * line naming the table and the reason.
 */
export function analyzeDesign(input: DesignInput, table: TwoWayTable, options: { confidence: number; percentages: boolean }): DesignAnalysis {
  const r = table.rowLevels.length;
  const c = table.colLevels.length;
  const estimate = designEstimate(input, table);
  const where = `the table of ${table.rowName} by ${table.colName}`;
  const tests: DesignTests = designTests(estimate, r, c);
  if (!tests.designPearson || !tests.designLikelihoodRatio || !tests.designF) throw dataError(`${where}: no design-based test, because ${tests.reason}`);
  const effects = tests.designEffects;
  const cramersV = designCramersV(tests, r, c);
  if (cramersV === null) throw new Error('analyzeDesign: the design-scaled V is defined whenever the tests are');
  const cells = input.cells;
  const design = cells.design;
  const summary: DesignSummary = {
    kind: estimate.kind,
    strata: estimate.strata,
    clusters: estimate.psus,
    degreesOfFreedom: estimate.degreesOfFreedom,
    replicates: estimate.replicates,
    method: estimate.method,
    lonelyPsu: estimate.lonelyPsu,
    columns: {
      strata: design.kind === 'taylor' ? design.strata : null,
      cluster: design.kind === 'taylor' ? design.cluster : null,
      fpc: design.kind === 'taylor' ? design.fpc : null,
      weight: cells.weightColumn,
      replicates: cells.replicateColumns,
    },
    rho: design.kind === 'replicate' && design.method === 'fay' ? design.rho : null,
    centre: estimate.centre,
    lonelyStrata: estimate.lonelyStrata,
    droppedReplicates: estimate.droppedReplicates,
    n: estimate.n,
    effectiveSampleSize: cramersV.effectiveSampleSize,
    designEffects: {
      mean: effects.mean,
      min: effects.min,
      max: effects.max,
      coefficientOfVariation: effects.coefficientOfVariation,
      eigenvalues: effects.eigenvalues ? Array.from(effects.eigenvalues) : null,
    },
    uncorrected: { pearson: tests.pearson, likelihoodRatio: tests.likelihoodRatio },
  };
  const cellDesignEffects = Array.from({ length: r }, (_x, i) => effects.cellDesignEffects.slice(i * c, (i + 1) * c));
  let percentages: DesignPercentageRecord | null = null;
  if (options.percentages) {
    const shares = designPercentages(estimate, r, c, options.confidence);
    percentages = {
      confidence: options.confidence,
      degreesOfFreedom: shares.degreesOfFreedom,
      row: shares.row.map((row) => row.map(share)),
      col: shares.column.map((row) => row.map(share)),
      total: shares.cell.map((row) => row.map(share)),
      rowMargins: shares.rowMargins.map(share),
      colMargins: shares.columnMargins.map(share),
    };
  }
  return { summary, designPearson: tests.designPearson, designLikelihoodRatio: tests.designLikelihoodRatio, designF: tests.designF, cellDesignEffects, percentages, cramersV, estimate };
}

/** Whether an error is the one-line refusal of a design-based analysis of one table (not of the design as a whole). */
export function isTableRefusal(error: unknown): error is TabsightError {
  return error instanceof TabsightError;
}
