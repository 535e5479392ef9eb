import { describe, expect, it } from 'vitest';
import { DesignTally, ReplicateCellTotals } from '../../src/stats/designTally.js';
import { denseCovariance, linearizedCovariance, replicateCovariance } from '../../src/stats/designCovariance.js';
import { expectClose } from '../helpers.js';
import { cellsOf, readSurveyData, replicateEstimate, survey, taylorEstimate } from './surveyFixtures.js';

function expectMatrixNear(actual: Float64Array, expected: ArrayLike<number>, tolerance = 1e-12): void {
  let largest = 0;
  for (let i = 0; i < expected.length; i++) largest = Math.max(largest, Math.abs(expected[i]));
  for (let i = 0; i < expected.length; i++) expect(Math.abs(actual[i] - expected[i]) / largest, `entry ${i}`).toBeLessThan(tolerance);
}

/** The linearised PSU values t_c = Σ_{i in c} w_i (y_i − p) / Σw computed row by row (no tally), one stratum. */
function psuValues(cells: number[], weights: number[], clusters: string[], K: number): { p: Float64Array; t: Map<string, Float64Array>; share: Map<string, number> } {
  let W = 0;
  const totals = new Float64Array(K);
  cells.forEach((cell, i) => {
    if (cell < 0) return;
    W += weights[i];
    totals[cell] += weights[i];
  });
  const p = totals.map((v) => v / W);
  const t = new Map<string, Float64Array>();
  const share = new Map<string, number>();
  cells.forEach((cell, i) => {
    const key = clusters[i];
    if (!t.has(key)) {
      t.set(key, new Float64Array(K));
      share.set(key, 0);
    }
    if (cell < 0) return;
    const z = t.get(key)!;
    for (let j = 0; j < K; j++) z[j] += (weights[i] * ((j === cell ? 1 : 0) - p[j])) / W;
    share.set(key, share.get(key)! + weights[i] / W);
  });
  return { p, t, share };
}

function outerSum(vectors: Float64Array[], K: number, scale: number): Float64Array {
  const V = new Float64Array(K * K);
  for (const v of vectors) for (let i = 0; i < K; i++) for (let j = 0; j < K; j++) V[i * K + j] += scale * v[i] * v[j];
  return V;
}

describe('linearised covariance: the formula of the conventions (§2), computed row by row in the test', () => {
  it('one-stage cluster sample (apiclus1, no fpc): V = n/(n−1) Σ_c t_c t_c\' (Wolter 2007, §6.11)', () => {
    const design = survey.taylor[2];
    const table = design.tables[0];
    const data = readSurveyData(design.data);
    const K = table.rowLevels.length * table.colLevels.length;
    const { t } = psuValues(cellsOf(data, table), data.pw.map(Number), data.dnum, K);
    const m = t.size;
    expectMatrixNear(denseCovariance(taylorEstimate(design.data, design.design, table).covariance), outerSum([...t.values()], K, m / (m - 1)));
  });

  it('a domain keeps its rows\' PSUs: z = 0 outside it, n_h from the whole file (Cochran 1977, §5A.13); deleting the rows instead gives a different, smaller-n_h variance', () => {
    // high schools of apiclus1: several of the 15 districts have none, so their PSUs hold no domain row
    const domain = { ...survey.domain, filter: { column: 'stype', value: 'H' } };
    const data = readSurveyData(domain.data);
    const K = domain.table.rowLevels.length * domain.table.colLevels.length;
    const cells = cellsOf(data, domain.table, domain.filter);
    const { t } = psuValues(cells, data.pw.map(Number), data.dnum, K);
    const m = t.size; // all 15 districts, also those without a high school
    const vectors = [...t.values()];
    const mean = new Float64Array(K);
    for (const v of vectors) for (let j = 0; j < K; j++) mean[j] += v[j] / m;
    const centred = vectors.map((v) => v.map((x, j) => x - mean[j]));
    const fpc = Number(data.fpc[0]);
    const expected = outerSum(centred, K, ((1 - m / fpc) * m) / (m - 1));
    const ours = taylorEstimate(domain.data, domain.design, domain.table, { filter: domain.filter });
    expectMatrixNear(denseCovariance(ours.covariance), expected);
    // the same rows deleted from the file: fewer PSUs in the design, another variance
    const keep = cells.map((cell) => cell >= 0);
    const tally = new DesignTally({ clustered: true });
    cells.forEach((cell, i) => {
      if (keep[i]) tally.add({ cell, weight: Number(data.pw[i]), cluster: data.dnum[i], fpc });
    });
    const deleted = linearizedCovariance(tally.totals, { layout: { size: K } });
    expect(deleted.psus!).toBeLessThan(m);
    const differs = Array.from(denseCovariance(deleted.covariance)).some((v, i) => Math.abs(v - expected[i]) > 1e-6 * Math.abs(expected[i]));
    expect(differs).toBe(true);
  });

  it('without clusters (Σw, Σw² per stratum and cell) equals the same design given one cluster id per row (apistrat)', () => {
    const design = survey.taylor[0];
    const table = design.tables[1];
    const rowWise = taylorEstimate(design.data, design.design, table);
    const data = readSurveyData(design.data);
    const tally = new DesignTally({ clustered: true });
    tally.addRows({ cell: cellsOf(data, table), weight: data.pw.map(Number), stratum: data.stype, cluster: data.pw.map((_w, i) => i), fpc: data.fpc.map(Number) });
    const clustered = linearizedCovariance(tally.totals, { layout: { size: 9 } });
    expectMatrixNear(denseCovariance(rowWise.covariance), denseCovariance(clustered.covariance));
    expect(rowWise.degreesOfFreedom).toBe(clustered.degreesOfFreedom);
  });

  it('a one-row stratum is treated alike without clusters and with one cluster per row, under each --lonely-psu treatment (the clustered route is the one checked against the library)', () => {
    const design = survey.taylor[0];
    const table = design.tables[1];
    const data = readSurveyData(design.data);
    const stratum = data.stype.map((s, i) => (i === 0 ? 'alone' : s));
    for (const lonelyPsu of ['certainty', 'adjust', 'average'] as const) {
      const estimates = [false, true].map((clustered) => {
        const tally = new DesignTally({ clustered });
        tally.addRows({ cell: cellsOf(data, table), weight: data.pw.map(Number), stratum, cluster: clustered ? data.pw.map((_w, i) => i) : undefined });
        return linearizedCovariance(tally.totals, { lonelyPsu, layout: { size: 9 } });
      });
      expect(estimates[0].lonelyStrata).toEqual(['alone']);
      expectMatrixNear(denseCovariance(estimates[0].covariance), denseCovariance(estimates[1].covariance));
    }
    const tally = new DesignTally({ clustered: false });
    tally.addRows({ cell: cellsOf(data, table), weight: data.pw.map(Number), stratum });
    expect(() => linearizedCovariance(tally.totals)).toThrowError('stratum "alone" has only one PSU (a single row), so its variance cannot be estimated; choose --lonely-psu certainty, adjust or average (see the methods note)');
  });

  it('--fpc as the population size F_h or as the sampling fraction n_h/F_h gives the same V (conventions §3)', () => {
    const design = survey.taylor[0];
    const table = design.tables[1];
    const data = readSurveyData(design.data);
    const counts = new Map<string, number>();
    data.stype.forEach((s) => counts.set(s, (counts.get(s) ?? 0) + 1));
    const tally = new DesignTally({ clustered: false });
    tally.addRows({ cell: cellsOf(data, table), weight: data.pw.map(Number), stratum: data.stype, fpc: data.fpc.map((F, i) => counts.get(data.stype[i])! / Number(F)) });
    const fraction = linearizedCovariance(tally.totals, { layout: { size: 9 } });
    expectMatrixNear(denseCovariance(fraction.covariance), denseCovariance(taylorEstimate(design.data, design.design, table).covariance), 1e-12);
  });

  it('bad --fpc values are one-line errors naming the stratum (and the lines)', () => {
    const tally = new DesignTally({ clustered: false });
    tally.add({ cell: 0, weight: 1, stratum: 'north', fpc: 500, line: 2 });
    expect(() => tally.add({ cell: 1, weight: 1, stratum: 'north', fpc: 400, line: 3 })).toThrowError('--fpc is not constant within stratum "north": 400 on line 3, 500 on line 2');
    const small = new DesignTally({ clustered: false });
    for (let i = 0; i < 3; i++) small.add({ cell: i % 2, weight: 1, stratum: 'south', fpc: 2 });
    expect(() => linearizedCovariance(small.totals)).toThrowError('--fpc gives 2 PSUs in the population of stratum "south", fewer than the 3 in the sample');
  });

  it('a stratum whose fpc says every PSU was taken adds nothing and is not lonely (as the reference library treats it)', () => {
    const tally = new DesignTally({ clustered: true });
    tally.add({ cell: 0, weight: 1, stratum: 'census', cluster: 'a', fpc: 1 });
    for (let i = 0; i < 6; i++) tally.add({ cell: i % 2, weight: 1 + i, stratum: 'sampled', cluster: String(i % 3) });
    const estimate = linearizedCovariance(tally.totals, { lonelyPsu: 'fail' });
    expect(estimate.lonelyStrata).toEqual([]);
    expect(estimate.degreesOfFreedom).toBe(4 - 2);
  });
});

describe('replicate covariance', () => {
  // Known difference (Wolter 2007, §4.2; exact algebra): deleting cluster c and weighting the others by
  // m/(m−1) gives p_(c) − p = −t_c / (1 − a_c), t_c the linearised value of the cluster and a_c its share of
  // the complete-row weight. So the JK1 covariance is (m−1)/m Σ (d_c − d̄)(d_c − d̄)' with d_c = −t_c/(1 − a_c),
  // the linearised n/(n−1) Σ t_c t_c' with each cluster's value inflated by 1/(1 − a_c).
  it('jackknife replicates of a cluster design (apiclus1 JK1, weights recorded from the library) agree with the linearised values to within that known difference', () => {
    const fixture = survey.replicates.find((f) => f.method === 'jk1')!;
    const table = fixture.tables[0];
    const K = table.rowLevels.length * table.colLevels.length;
    const data = readSurveyData(fixture.data);
    const { t, share } = psuValues(cellsOf(data, table), data.pw.map(Number), data.dnum, K);
    const m = t.size;
    const d = [...t.keys()].map((key) => t.get(key)!.map((v) => -v / (1 - share.get(key)!)));
    const mean = new Float64Array(K);
    for (const v of d) for (let j = 0; j < K; j++) mean[j] += v[j] / m;
    const expected = outerSum(d.map((v) => v.map((x, j) => x - mean[j])), K, (m - 1) / m);
    const jackknife = denseCovariance(replicateEstimate(fixture, table).covariance);
    expectMatrixNear(jackknife, expected, 1e-10);
    const linearised = denseCovariance(taylorEstimate(fixture.data, { strata: null, cluster: 'dnum', weight: 'pw', fpc: null }, table).covariance);
    const largestShare = Math.max(...share.values());
    for (let j = 0; j < K; j++) {
      const ratio = jackknife[j * K + j] / linearised[j * K + j];
      expect(ratio).toBeGreaterThan(((m - 1) / m) ** 2);
      expect(ratio).toBeLessThan(1 / (1 - largestShare) ** 2);
    }
  });

  it('centring at the full-sample estimate adds scale · Σ s_r (p̄ − p)(p̄ − p)\' (BRR, NHANES)', () => {
    const fixture = survey.replicates.find((f) => f.method === 'brr')!;
    const table = fixture.tables[0];
    const atMean = replicateEstimate(fixture, table);
    const atFull = replicateEstimate(fixture, table, 'full-sample');
    const K = atMean.size;
    const shift = new Float64Array(K); // p̄ − p
    for (const u of atFull.covariance.factors) for (let j = 0; j < K; j++) shift[j] += u[j] / fixture.replicates;
    const extra = outerSum([shift], K, fixture.scale * fixture.replicates);
    const mean = denseCovariance(atMean.covariance);
    expectMatrixNear(denseCovariance(atFull.covariance), mean.map((v, i) => v + extra[i]), 1e-12);
    expect(atFull.centre).toBe('full-sample');
  });

  it('method scales (conventions §5) and usage errors', () => {
    const totals = new ReplicateCellTotals(4);
    totals.add(0, 1, [1, 0, 2, 1]);
    totals.add(1, 1, [1, 2, 0, 1]);
    totals.add(1, 2, [2, 2, 2, 2]);
    const v = (method: 'jk1' | 'brr' | 'fay' | 'bootstrap', rho?: number): number => replicateCovariance(totals, { method, rho }).covariance.weights[0];
    expectClose(v('jk1'), 3 / 4, 1e-15);
    expectClose(v('brr'), 1 / 4, 1e-15);
    expectClose(v('fay', 0.5), 1 / (4 * 0.25), 1e-15);
    expectClose(v('bootstrap'), 1 / 3, 1e-15);
    expect(() => replicateCovariance(totals, { method: 'jkn' })).toThrowError('--replicate-method jkn needs one scale factor per replicate (4), none given');
    expect(() => replicateCovariance(totals, { method: 'fay', rho: 1 })).toThrowError('--fay-rho must be at least 0 and below 1, not 1');
    expect(replicateCovariance(totals, { method: 'jk1' }).degreesOfFreedom).toBe(3);
  });
});
