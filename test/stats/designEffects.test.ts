import { describe, expect, it } from 'vitest';
import { DesignTally } from '../../src/stats/designTally.js';
import { denseCovariance, linearizedCovariance } from '../../src/stats/designCovariance.js';
import { generalizedDesignEffects } from '../../src/stats/designEffects.js';
import { designTests } from '../../src/stats/raoScott.js';
import { expectClose, reference } from '../helpers.js';
import { survey, taylorEstimate } from './surveyFixtures.js';

/** Rows of a table of counts, every row its own PSU, one stratum, weight w. */
function simpleRandomSample(counts: number[][], weight = 1): DesignTally {
  const tally = new DesignTally({ clustered: false });
  const c = counts[0].length;
  counts.forEach((row, i) => row.forEach((m, j) => {
    for (let q = 0; q < m; q++) tally.add({ cell: i * c + j, weight });
  }));
  return tally;
}

// Derivation (design-based-tests conventions §2, §6). Every row its own PSU, one stratum, no fpc, equal
// weights w: z_i = w (y_i − p)/(n w) = (y_i − p)/n, their mean is 0 (Σ y_i = n p), so
//   V = n/(n−1) Σ z_i z_i' = n/(n−1) · (diag(p) − p p')/n.
// With C'D⁻¹p = C'1 = 0 for interaction contrasts, C'D⁻¹VD⁻¹C = n/(n−1) · C'D⁻¹C/n, hence
//   Δ = n/(n−1) · I_k: every generalized design effect is n/(n−1),
// each cell's deff V_jj / (p_j(1−p_j)/n) is n/(n−1) too, and X²/δ̄ = X² (n−1)/n.
// (This needs every cell occupied: with an empty cell D⁻¹ is a generalized inverse, C'D⁻¹p is no longer 0,
// and one eigenvalue falls below n/(n−1) — the reference library behaves the same way.)
describe('with every row its own PSU, one stratum and equal weights (derived in the comment above)', () => {
  for (const table of reference.tables.filter((t) => t.counts.length * t.counts[0].length <= 30 && t.counts.every((row) => row.every((v) => v > 0))).slice(0, 4)) {
    it(`${table.name}: every design effect is n/(n−1) and X²/δ̄ is scipy's Pearson X² times (n−1)/n`, () => {
      const r = table.counts.length;
      const c = table.counts[0].length;
      const estimate = linearizedCovariance(simpleRandomSample(table.counts, 3.5).totals, { layout: { size: r * c } });
      const n = estimate.n;
      const tests = designTests(estimate, r, c);
      const effects = tests.designEffects;
      expectClose(effects.mean, n / (n - 1), 1e-12);
      for (const value of effects.eigenvalues!) expectClose(value, n / (n - 1), 1e-10);
      for (const deff of effects.cellDesignEffects) if (deff !== null) expectClose(deff, n / (n - 1), 1e-12);
      expectClose(tests.designPearson!.statistic, (table.pearson.statistic * (n - 1)) / n, 1e-10);
      expect(estimate.degreesOfFreedom).toBe(n - 1);
    });
  }

  it('holds beyond the size where all eigenvalues are computed (26 × 26, k = 625): mean n/(n−1), trace(Δ²) = k (n/(n−1))², extremes n/(n−1) by Lanczos', () => {
    const counts = Array.from({ length: 26 }, (_r, i) => Array.from({ length: 26 }, (_c, j) => 1 + ((i * 7 + j * 3) % 4)));
    const estimate = linearizedCovariance(simpleRandomSample(counts).totals, { layout: { size: 676 } });
    const n = estimate.n;
    const effects = generalizedDesignEffects(estimate.proportions, estimate.covariance, n, 26, 26);
    expect(effects.k).toBe(625);
    expectClose(effects.mean, n / (n - 1), 1e-10);
    expectClose(effects.traceOfSquare, 625 * (n / (n - 1)) ** 2, 1e-10);
    expect(effects.eigenvalueMethod).toBe('lanczos');
    expect(effects.eigenvalues).toBeNull();
    expectClose(effects.min, n / (n - 1), 1e-10);
    expectClose(effects.max, n / (n - 1), 1e-10);
  });
});

// The Lanczos route (used where the full eigen decomposition would be too large) forced on small tables,
// against the eigenvalues of Δ recorded from the survey package for R (r-cran-survey 4.1-1-1).
describe('extreme design effects by the Lanczos method agree with the library\'s eigenvalues', () => {
  const cases = [
    ...survey.taylor.flatMap((design) => design.tables.map((table) => ({ name: design.name, file: design.data, design: design.design, table }))),
  ].filter(({ table }) => table.eigenvalues.length >= 2);
  for (const { name, file, design, table } of cases) {
    it(`${name}: ${table.rowVariable} × ${table.colVariable}, smallest and largest of ${table.eigenvalues.length}`, () => {
      const estimate = taylorEstimate(file, design, table);
      const r = table.rowLevels.length;
      const c = table.colLevels.length;
      const effects = generalizedDesignEffects(estimate.proportions, estimate.covariance, estimate.n, r, c, { factors: 0, dense: 0 });
      expect(effects.eigenvalueMethod).toBe('lanczos');
      const largest = table.eigenvalues[table.eigenvalues.length - 1];
      expect(Math.abs(effects.max! - largest) / largest).toBeLessThan(1e-10);
      expect(Math.abs(effects.min! - table.eigenvalues[0]) / largest).toBeLessThan(1e-10);
      expectClose(effects.mean, table.meanDesignEffect, 1e-10);
    });
  }
});

/** Helmert contrasts of size m: m × (m−1), column q = (1, …, 1, −q, 0, …) over the first q + 1 levels. */
function helmert(m: number): number[][] {
  return Array.from({ length: m }, (_x, i) => Array.from({ length: m - 1 }, (_y, q) => (i < q + 1 ? 1 : i === q + 1 ? -(q + 1) : 0)));
}

/** Solves A X = B (A k × k) by Gaussian elimination with partial pivoting. */
function solve(A: number[][], B: number[][]): number[][] {
  const k = A.length;
  const M = A.map((row, i) => [...row, ...B[i]]);
  for (let col = 0; col < k; col++) {
    let pivot = col;
    for (let i = col + 1; i < k; i++) if (Math.abs(M[i][col]) > Math.abs(M[pivot][col])) pivot = i;
    [M[col], M[pivot]] = [M[pivot], M[col]];
    for (let i = 0; i < k; i++) {
      if (i === col) continue;
      const factor = M[i][col] / M[col][col];
      for (let j = col; j < M[i].length; j++) M[i][j] -= factor * M[col][j];
    }
  }
  return M.map((row, i) => row.slice(k).map((v) => v / M[i][i]));
}

// Conventions §6, literally: Δ = (C'D⁻¹C/n)⁻¹ (C'D⁻¹VD⁻¹C) with C the Kronecker product of Helmert contrasts,
// and with that basis mixed by an arbitrary invertible matrix; trace(Δ) and trace(Δ²) must not change.
describe('the projector form of Δ equals the contrast-basis definition', () => {
  for (const [d, t] of [[4, 1], [1, 1], [0, 1]]) {
    const design = survey.taylor[d];
    const table = design.tables[t];
    it(`${design.name}: ${table.rowVariable} × ${table.colVariable}, Kronecker–Helmert basis and a mixed basis`, () => {
      const r = table.rowLevels.length;
      const c = table.colLevels.length;
      const K = r * c;
      const estimate = taylorEstimate(design.data, design.design, table);
      const V = denseCovariance(estimate.covariance);
      const p = estimate.proportions;
      const n = estimate.n;
      const hr = helmert(r);
      const hc = helmert(c);
      const k = (r - 1) * (c - 1);
      const helmertBasis = Array.from({ length: K }, (_x, cell) => {
        const i = Math.floor(cell / c);
        const j = cell % c;
        return Array.from({ length: k }, (_y, q) => hr[i][Math.floor(q / (c - 1))] * hc[j][q % (c - 1)]);
      });
      const mixing = Array.from({ length: k }, (_x, a) => Array.from({ length: k }, (_y, b) => (a === b ? 2 : 0) + Math.sin(1 + a * k + b)));
      const mixed = helmertBasis.map((row) => mixing[0].map((_z, b) => row.reduce((s, v, a) => s + v * mixing[a][b], 0)));
      for (const C of [helmertBasis, mixed]) {
        const A = Array.from({ length: k }, (_x, a) => Array.from({ length: k }, (_y, b) => C.reduce((s, row, j) => s + (row[a] * row[b]) / p[j], 0) / n));
        const B = Array.from({ length: k }, (_x, a) =>
          Array.from({ length: k }, (_y, b) => {
            let s = 0;
            for (let i = 0; i < K; i++) for (let j = 0; j < K; j++) s += (C[i][a] / p[i]) * V[i * K + j] * (C[j][b] / p[j]);
            return s;
          }),
        );
        const delta = solve(A, B);
        const trace = delta.reduce((s, row, a) => s + row[a], 0);
        const traceOfSquare = delta.reduce((s, row, a) => s + row.reduce((u, v, b) => u + v * delta[b][a], 0), 0);
        const effects = generalizedDesignEffects(p, estimate.covariance, n, r, c);
        expectClose(effects.trace, trace, 1e-9);
        expectClose(effects.traceOfSquare, traceOfSquare, 1e-9);
      }
    });
  }
});
