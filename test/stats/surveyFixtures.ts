import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { DesignTally, ReplicateCellTotals } from '../../src/stats/designTally.js';
import { linearizedCovariance, replicateCovariance, type DesignEstimate, type LonelyPsuTreatment, type ReplicateMethod } from '../../src/stats/designCovariance.js';
import { ROOT, readReferenceFixture } from '../helpers.js';

/**
 * fixtures/reference/survey-reference.json and survey-data/*.csv, recorded by
 * scripts/record_survey_reference.R with the survey package for R (Debian
 * r-cran-survey 4.1-1-1) on data sets it ships (apistrat, apiclus1, apiclus2:
 * California Academic Performance Index samples; nhanes: NHANES 2009–2010).
 * Cells are row-major; levels sorted as the script lists them.
 */
export interface TableReference {
  rowVariable: string;
  colVariable: string;
  rowLevels: string[];
  colLevels: string[];
  n: number;
  proportions: number[];
  covariance: number[];
  cellDeffReplace: number[];
  X2: number;
  G2: number;
  eigenvalues: number[];
  trace: number;
  traceOfSquare: number;
  meanDesignEffect: number;
  F: number;
  ndf: number;
  ddf: number;
  pF: number;
  libraryDesignDf: number;
  designDf: number;
  pFWithOurDf: number;
  chisq: number;
  pChisq: number;
  chisqG2: number;
  pChisqG2: number;
}

export interface DesignSpec {
  strata: string | null;
  cluster: string | null;
  weight: string;
  fpc: string | null;
}

export interface ProportionReference {
  proportion: number;
  standardError: number;
  domainSize: number;
  logit: [number, number];
  kornGraubardLibrary: [number, number];
  kornGraubardLibraryDf: number;
  kornGraubardOurDf: [number, number];
}

export interface SurveyReference {
  recordedWith: Record<string, string>;
  taylor: { name: string; data: string; design: DesignSpec; tables: TableReference[] }[];
  domain: { name: string; data: string; filter: { column: string; value: string }; design: DesignSpec; table: TableReference };
  lonely: { data: string; design: DesignSpec; failMessage: string; certainty: TableReference; adjust: TableReference; average: TableReference };
  percentages: { name: string; data: string; design: DesignSpec; ref: { rowVariable: string; colVariable: string; rowLevels: string[]; colLevels: string[]; designDf: number; level: number; cell: ProportionReference[]; row: ProportionReference[]; column: ProportionReference[]; rowMargins: ProportionReference[]; columnMargins: ProportionReference[] } }[];
  replicates: {
    method: ReplicateMethod;
    rho: number | null;
    data: string;
    weight: string;
    source: string;
    replicates: number;
    scale: number;
    rscales: number[];
    libraryDegf: number;
    psuOfRow: number[];
    multipliers: number[][];
    tables: TableReference[];
  }[];
}

export const survey = readReferenceFixture<SurveyReference>('survey-reference.json');

/** A CSV of fixtures/reference/survey-data (no quoting: the script writes none), as columns by name. */
export function readSurveyData(file: string): Record<string, string[]> {
  const lines = readFileSync(join(ROOT, 'fixtures/reference/survey-data', file), 'utf8').trim().split('\n');
  const header = lines[0].split(',');
  const columns: Record<string, string[]> = Object.fromEntries(header.map((h) => [h, []]));
  for (const line of lines.slice(1)) line.split(',').forEach((v, i) => columns[header[i]].push(v));
  return columns;
}

/** The cell of every row (row-major over the recorded levels), −1 when a value is missing or the row is filtered out. */
export function cellsOf(data: Record<string, string[]>, table: { rowVariable: string; colVariable: string; rowLevels: string[]; colLevels: string[] }, filter?: { column: string; value: string }): number[] {
  const rows = data[table.rowVariable];
  const cols = data[table.colVariable];
  return rows.map((rv, k) => {
    if (filter && data[filter.column][k] !== filter.value) return -1;
    const i = table.rowLevels.indexOf(rv);
    const j = table.colLevels.indexOf(cols[k]);
    return i < 0 || j < 0 ? -1 : i * table.colLevels.length + j;
  });
}

export function taylorEstimate(
  file: string,
  design: DesignSpec,
  table: { rowVariable: string; colVariable: string; rowLevels: string[]; colLevels: string[] },
  options: { lonelyPsu?: LonelyPsuTreatment; filter?: { column: string; value: string } } = {},
): DesignEstimate {
  const data = readSurveyData(file);
  const tally = new DesignTally({ clustered: design.cluster !== null });
  tally.addRows({
    cell: cellsOf(data, table, options.filter),
    weight: data[design.weight].map(Number),
    stratum: design.strata ? data[design.strata] : undefined,
    cluster: design.cluster ? data[design.cluster] : undefined,
    fpc: design.fpc ? data[design.fpc].map(Number) : undefined,
  });
  return linearizedCovariance(tally.totals, { lonelyPsu: options.lonelyPsu ?? 'fail', layout: { size: table.rowLevels.length * table.colLevels.length } });
}

export function replicateEstimate(fixture: SurveyReference['replicates'][number], table: TableReference, centre?: 'replicate-mean' | 'full-sample'): DesignEstimate {
  const data = readSurveyData(fixture.data);
  const cells = cellsOf(data, table);
  const weights = data[fixture.weight].map(Number);
  const totals = new ReplicateCellTotals(fixture.replicates);
  const repWeights = new Float64Array(fixture.replicates);
  cells.forEach((cell, i) => {
    const multipliers = fixture.multipliers[fixture.psuOfRow[i] - 1];
    for (let r = 0; r < fixture.replicates; r++) repWeights[r] = weights[i] * multipliers[r];
    totals.add(cell, weights[i], repWeights);
  });
  return replicateCovariance(totals, {
    method: fixture.method,
    rho: fixture.rho ?? undefined,
    scaleFactors: fixture.method === 'jkn' ? fixture.rscales : undefined,
    centre,
    layout: { size: table.rowLevels.length * table.colLevels.length },
  });
}
