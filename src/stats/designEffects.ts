/** Generalized design effects of the test of independence (Rao & Scott). */
import { cellVariance, denseCovariance, type CellCovariance } from './designCovariance.js';
import { dot, extremeEigenvalues, orthonormalBasis, symmetricEigenvalues } from './linearAlgebra.js';

/**
 * Generalized design effects of the test of independence in an r × c table
 * (Rao & Scott 1981, JASA 76, 221–230; Rao & Scott 1984, Ann. Statist. 12,
 * 46–60), with the conventions of design-based-tests.md §6:
 *
 *   Δ = (C' D⁻¹ C / n)⁻¹ (C' D⁻¹ V D⁻¹ C),
 *
 * C an rc × k basis of the k = (r−1)(c−1) interaction contrasts (orthogonal
 * to the constant and to every row and column indicator), D = diag(p) of the
 * estimated cell proportions, V their design covariance, n the unweighted
 * complete rows. The eigenvalues δ_1..δ_k of Δ do not depend on the basis;
 * the tests use their mean δ̄ = trace(Δ)/k and trace(Δ²).
 *
 * Computation, without forming C. With G = D^(−1/2) C and
 * S = n D^(−1/2) V D^(−1/2), Δ = (G'G)⁻¹ G' S G has the eigenvalues of
 * Q' S Q for an orthonormal basis Q of span(G). Because C is orthogonal to
 * the main-effect space M (constant, row and column indicators), span(G) is
 * exactly the orthogonal complement of D^(1/2) M (same dimension
 * rc − (r + c − 1) = k), so Q Q' = P = I − H H' with H an orthonormal basis
 * of the r + c − 1 vectors √p ∘ (row or column indicator). Hence
 *
 *   trace(Δ) = trace(P S P),   trace(Δ²) = trace((P S P)²),
 *
 * and the eigenvalues of Δ are those of P S P after the r + c − 1 zeros that
 * belong to H. V arrives as diag(d) + Σ_l λ_l u_l u_l' (designCovariance.ts);
 * with E = n diag(d/p), z_l = P (√n u_l/√p) and h_j = ‖row j of H‖²:
 *
 *   trace(PSP)     = Σ_j e_j (1 − h_j) + Σ_l λ_l ‖z_l‖²
 *   trace((PSP)²)  = Σ e_j² − 2 Σ e_j² h_j + ‖H'EH‖²_F + 2 Σ_l λ_l z_l'E z_l + Σ_{l,m} λ_l λ_m (z_l·z_m)²
 *
 * in O(L K (r + c) + L² K) for L factors and K = rc cells; when L exceeds K
 * the dense K × K form of S is used instead (O(L K² + K²(r + c))).
 * Eigenvalues: with clusters or replicates (no diagonal part) they are the
 * non-zero eigenvalues of the L × L matrix Λ^½ Z Z' Λ^½ (padded with zeros
 * up to k), computed when L ≤ 600; otherwise all of them from the dense P S P
 * when K ≤ 500. Beyond both (e.g. a 25 × 25 table without clusters) only the
 * smallest and largest are found, by the Lanczos method on P S P
 * (linearAlgebra.ts, to 1e-12 of the largest), and the list of eigenvalues is
 * null; the mean and the F test are exact in every case.
 *
 * Empty cells (p_j = 0): D⁻¹ is replaced by its generalized inverse (1/p_j,
 * and 0 on empty cells), as the reference library does, so the contrasts are
 * C restricted to the occupied cells. Then span(G) is the orthogonal
 * complement, within the vectors that vanish on the empty cells (N), of
 * D^(1/2)(M ∩ N), where M ∩ N are the main-effect vectors a_i + b_j with
 * a_i + b_j = 0 on every empty cell; H is a basis of that. Its dimension is
 * still k unless the empty cells cover a whole interaction contrast (a
 * rectangle of empty cells), in which case the missing eigenvalues are 0.
 *
 * The design effect of one cell's proportion is Kish's
 * deff_j = V_jj / (p_j (1 − p_j) / n) (Kish 1965, Survey Sampling, §8.2).
 */

export interface GeneralizedDesignEffects {
  /** k = (r − 1)(c − 1) */
  k: number;
  trace: number;
  traceOfSquare: number;
  /** δ̄ = trace(Δ)/k */
  mean: number;
  /** a = √(trace(Δ²)/(k δ̄²) − 1), the coefficient of variation of the eigenvalues */
  coefficientOfVariation: number;
  /** the k eigenvalues ascending, or null when not computed or only the extremes were (see method) */
  eigenvalues: Float64Array | null;
  min: number | null;
  max: number | null;
  /** how the eigenvalues were found: from the factors, from the dense matrix, or not at all */
  eigenvalueMethod: 'factors' | 'dense' | 'lanczos' | 'not computed';
  /** deff of each cell's proportion (row-major), null where p is 0 or 1 */
  cellDesignEffects: (number | null)[];
}

const GRAM_EIGEN_LIMIT = 600;
const DENSE_EIGEN_LIMIT = 500;

/**
 * The projector H H' onto D^(1/2)(M ∩ N), where M is the main-effect space (vectors a_i + b_j over
 * the cells) and N the vectors that vanish on the empty cells (p = 0).
 */
interface MainEffectProjector {
  /** dim D^(1/2)(M ∩ N): r + c − 1 without empty cells */
  dimension: number;
  /** h_j = (H H')_jj */
  leverage: Float64Array;
  /** (I − H H') v */
  remove(v: Float64Array): Float64Array;
  /** ‖H' E H‖²_F = Σ_(x,y) (H H')_xy² e_x e_y for a diagonal E = diag(e) */
  squaredNormOfProjected(e: Float64Array): number;
  /** an orthonormal basis H (for the dense route) */
  basis(): Float64Array[];
}

function mainEffectProjector(p: Float64Array, rows: number, cols: number): MainEffectProjector {
  return p.every((pj) => pj > 0) ? weightedFitProjector(p, rows, cols) : orthonormalProjector(orthonormalMainEffects(p, rows, cols));
}

/**
 * With empty cells: an orthonormal basis of D^(1/2)(M ∩ N), where (a, b) must satisfy a_i + b_j = 0
 * on every empty cell (i, j); Gram–Schmidt on the images of the allowed (a, b).
 */
function orthonormalMainEffects(p: Float64Array, rows: number, cols: number): Float64Array[] {
  const K = rows * cols;
  const m = rows + cols;
  const constraints: Float64Array[] = [];
  for (let i = 0; i < rows; i++) {
    for (let j = 0; j < cols; j++) {
      if (p[i * cols + j] > 0) continue;
      const v = new Float64Array(m);
      v[i] = 1;
      v[rows + j] = 1;
      constraints.push(v);
    }
  }
  const constraintBasis = orthonormalBasis(constraints);
  // the (a, b) allowed: the standard basis of R^(r+c) with the constraint directions removed
  const free = orthonormalBasis(
    Array.from({ length: m }, (_x, t) => {
      const v = new Float64Array(m);
      v[t] = 1;
      return removeComponents(v, constraintBasis);
    }),
  );
  const vectors = free.map((ab) => {
    const v = new Float64Array(K);
    for (let i = 0; i < rows; i++) for (let j = 0; j < cols; j++) v[i * cols + j] = Math.sqrt(p[i * cols + j]) * (ab[i] + ab[rows + j]);
    return v;
  });
  return orthonormalBasis(vectors);
}

function removeComponents(v: Float64Array, basis: Float64Array[]): Float64Array {
  const out = Float64Array.from(v);
  for (const h of basis) {
    const a = dot(h, out);
    for (let j = 0; j < out.length; j++) out[j] -= a * h[j];
  }
  return out;
}

function orthonormalProjector(H: Float64Array[]): MainEffectProjector {
  const K = H.length ? H[0].length : 0;
  const leverage = new Float64Array(K);
  for (const h of H) for (let j = 0; j < K; j++) leverage[j] += h[j] * h[j];
  return {
    dimension: H.length,
    leverage,
    remove: (v) => removeComponents(v, H),
    squaredNormOfProjected: (e) => {
      let total = 0;
      for (let a = 0; a < H.length; a++) {
        for (let b = 0; b < H.length; b++) {
          let s = 0;
          for (let j = 0; j < K; j++) s += H[a][j] * e[j] * H[b][j];
          total += s * s;
        }
      }
      return total;
    },
    basis: () => H,
  };
}

/**
 * Without empty cells the projection onto D^(1/2) M is a weighted least-squares fit: for x, the
 * (a, b) minimising Σ p_ij (x_ij/√p_ij − a_i − b_j)², fitted √p_ij (a_i + b_j). Its normal equations
 * N θ = X'(√p ∘ x) have N = [[diag(p_i+), P], [P', diag(p_+j)]] (the last level of the shorter side
 * fixed at 0 to remove the constant's double count), solved through the Schur complement
 * S = diag(p_+j) − P' diag(1/p_i+) P on the shorter side (Golub & Van Loan 2013, Matrix Computations,
 * 4th ed., §3.2.11). Cost O(K + c²) per vector after O(K c + c³) once, instead of O(K (r + c)).
 */
function weightedFitProjector(p: Float64Array, rows: number, cols: number): MainEffectProjector {
  // long side (index i, R levels) and short side (index j, C levels); cell(i, j) in the row-major vector
  const transposed = cols > rows;
  const R = transposed ? cols : rows;
  const C = transposed ? rows : cols;
  const cell = transposed ? (i: number, j: number): number => j * cols + i : (i: number, j: number): number => i * cols + j;
  const K = rows * cols;
  const longTotals = new Float64Array(R);
  const shortTotals = new Float64Array(C);
  for (let i = 0; i < R; i++) {
    for (let j = 0; j < C; j++) {
      longTotals[i] += p[cell(i, j)];
      shortTotals[j] += p[cell(i, j)];
    }
  }
  const c1 = C - 1;
  // Schur complement S (c1 × c1) and its inverse
  const S = new Float64Array(c1 * c1);
  for (let j = 0; j < c1; j++) S[j * c1 + j] = shortTotals[j];
  for (let i = 0; i < R; i++) {
    for (let j = 0; j < c1; j++) {
      const pij = p[cell(i, j)] / longTotals[i];
      if (pij === 0) continue;
      for (let l = 0; l < c1; l++) S[j * c1 + l] -= pij * p[cell(i, l)];
    }
  }
  const Sinv = invertSymmetricPositive(S, c1);
  // W = diag(1/p_i+) P S⁻¹ (R × c1): G_ab = −W, G_bb = S⁻¹, G_aa = diag(1/p_i+) + W P' diag(1/p_i+)
  const W = new Float64Array(R * c1);
  for (let i = 0; i < R; i++) {
    for (let l = 0; l < c1; l++) {
      let s = 0;
      for (let j = 0; j < c1; j++) s += p[cell(i, j)] * Sinv[j * c1 + l];
      W[i * c1 + l] = s / longTotals[i];
    }
  }
  const Gaa = (i: number, k: number): number => {
    let s = i === k ? 1 / longTotals[i] : 0;
    for (let j = 0; j < c1; j++) s += (W[i * c1 + j] * p[cell(k, j)]) / longTotals[k];
    return s;
  };
  const Gab = (i: number, j: number): number => (j < c1 ? -W[i * c1 + j] : 0);
  const Gbb = (j: number, l: number): number => (j < c1 && l < c1 ? Sinv[j * c1 + l] : 0);
  // projector entry between cells (i, j) and (k, l): √p √p' (G_aa[i][k] + G_ab[i][l] + G_ab[k][j] + G_bb[j][l])
  const leverage = new Float64Array(K);
  const gaaDiagonal = Float64Array.from({ length: R }, (_x, i) => Gaa(i, i));
  for (let i = 0; i < R; i++) for (let j = 0; j < C; j++) leverage[cell(i, j)] = p[cell(i, j)] * (gaaDiagonal[i] + 2 * Gab(i, j) + Gbb(j, j));
  let basis: Float64Array[] | undefined;
  const remove = (v: Float64Array): Float64Array => {
    const rho = new Float64Array(R);
    const kappa = new Float64Array(c1);
    for (let i = 0; i < R; i++) {
      for (let j = 0; j < C; j++) {
        const t = Math.sqrt(p[cell(i, j)]) * v[cell(i, j)];
        rho[i] += t;
        if (j < c1) kappa[j] += t;
      }
    }
    // b = S⁻¹ (κ − P' diag(1/p_i+) ρ), a_i = (ρ_i − Σ_j p_ij b_j)/p_i+
    const rhs = Float64Array.from(kappa);
    for (let i = 0; i < R; i++) {
      const ratio = rho[i] / longTotals[i];
      for (let j = 0; j < c1; j++) rhs[j] -= p[cell(i, j)] * ratio;
    }
    const b = new Float64Array(C);
    for (let j = 0; j < c1; j++) {
      let s = 0;
      for (let l = 0; l < c1; l++) s += Sinv[j * c1 + l] * rhs[l];
      b[j] = s;
    }
    const out = Float64Array.from(v);
    for (let i = 0; i < R; i++) {
      let s = rho[i];
      for (let j = 0; j < c1; j++) s -= p[cell(i, j)] * b[j];
      const a = s / longTotals[i];
      for (let j = 0; j < C; j++) out[cell(i, j)] -= Math.sqrt(p[cell(i, j)]) * (a + b[j]);
    }
    return out;
  };
  return {
    dimension: R + C - 1,
    leverage,
    remove,
    squaredNormOfProjected: (e) => {
      const gaa = new Float64Array(R * R);
      for (let i = 0; i < R; i++) for (let k = 0; k <= i; k++) gaa[i * R + k] = gaa[k * R + i] = Gaa(i, k);
      let total = 0;
      for (let i = 0; i < R; i++) {
        for (let j = 0; j < C; j++) {
          const x = cell(i, j);
          if (e[x] === 0) continue;
          for (let k = 0; k < R; k++) {
            for (let l = 0; l < C; l++) {
              const y = cell(k, l);
              const entry = Math.sqrt(p[x] * p[y]) * (gaa[i * R + k] + Gab(i, l) + Gab(k, j) + Gbb(j, l));
              total += entry * entry * e[x] * e[y];
            }
          }
        }
      }
      return total;
    },
    basis: () => (basis ??= orthonormalMainEffects(p, rows, cols)),
  };
}

/** The inverse of a symmetric positive definite n × n matrix by Cholesky factorisation. */
function invertSymmetricPositive(A: Float64Array, n: number): Float64Array {
  const L = new Float64Array(n * n);
  for (let j = 0; j < n; j++) {
    let d = A[j * n + j];
    for (let k = 0; k < j; k++) d -= L[j * n + k] * L[j * n + k];
    const root = Math.sqrt(d);
    L[j * n + j] = root;
    for (let i = j + 1; i < n; i++) {
      let s = A[i * n + j];
      for (let k = 0; k < j; k++) s -= L[i * n + k] * L[j * n + k];
      L[i * n + j] = s / root;
    }
  }
  // columns of the inverse: solve L L' x = e_c
  const inverse = new Float64Array(n * n);
  const y = new Float64Array(n);
  for (let c = 0; c < n; c++) {
    for (let i = 0; i < n; i++) {
      let s = i === c ? 1 : 0;
      for (let k = 0; k < i; k++) s -= L[i * n + k] * y[k];
      y[i] = s / L[i * n + i];
    }
    for (let i = n - 1; i >= 0; i--) {
      let s = y[i];
      for (let k = i + 1; k < n; k++) s -= L[k * n + i] * inverse[k * n + c];
      inverse[i * n + c] = s / L[i * n + i];
    }
  }
  return inverse;
}

/**
 * Generalized design effects of the independence contrasts of an r × c
 * table with cell proportions p (row-major), design covariance V and n
 * unweighted complete rows (see the module comment).
 * @example With every row its own PSU, one stratum and equal weights, V = n/(n−1) · (diag(p) − pp')/n,
 *          so every eigenvalue and every cell design effect is n/(n − 1) (test/stats/designEffects.test.ts).
 */
export function generalizedDesignEffects(
  p: Float64Array,
  covariance: CellCovariance,
  n: number,
  rows: number,
  cols: number,
  limits: { factors?: number; dense?: number } = {},
): GeneralizedDesignEffects {
  const gramLimit = limits.factors ?? GRAM_EIGEN_LIMIT;
  const denseLimit = limits.dense ?? DENSE_EIGEN_LIMIT;
  const K = rows * cols;
  if (p.length !== K || covariance.size !== K) throw new Error(`generalizedDesignEffects: ${p.length} proportions for a ${rows} × ${cols} table`);
  const k = (rows - 1) * (cols - 1);
  const scale = p.map((pj) => (pj > 0 ? Math.sqrt(n / pj) : 0)); // √n / √p, 0 on empty cells
  const projector = mainEffectProjector(p, rows, cols);
  const emptyCells = p.reduce((count, pj) => count + (pj > 0 ? 0 : 1), 0);
  // dimension of span(D^(+1/2) C): k unless empty cells make some contrast vanish
  const kEffective = K - emptyCells - projector.dimension;
  const leverage = projector.leverage;
  const e = new Float64Array(K);
  if (covariance.diagonal) for (let j = 0; j < K; j++) e[j] = covariance.diagonal[j] * scale[j] * scale[j];
  const L = covariance.factors.length;

  let trace: number;
  let traceOfSquare: number;
  let applyPSP: (v: Float64Array) => Float64Array; // P S P on the range of P, for the Lanczos route
  let eigenvalues: Float64Array | null = null;
  let eigenvalueMethod: GeneralizedDesignEffects['eigenvalueMethod'] = 'not computed';

  if (L <= K) {
    const Z = covariance.factors.map((u) => projector.remove(u.map((v, j) => v * scale[j])));
    const lambda = covariance.weights;
    applyPSP = (v) => {
      const out = covariance.diagonal ? projector.remove(v.map((x, j) => x * e[j])) : new Float64Array(K);
      Z.forEach((z, l) => {
        const c = lambda[l] * dot(z, v);
        for (let j = 0; j < K; j++) out[j] += c * z[j];
      });
      return out;
    };
    // diagonal part
    let traceE = 0;
    let eSquares = 0;
    let eSquaresLeverage = 0;
    for (let j = 0; j < K; j++) {
      traceE += e[j] * (1 - leverage[j]);
      eSquares += e[j] * e[j];
      eSquaresLeverage += e[j] * e[j] * leverage[j];
    }
    const hEh = covariance.diagonal ? projector.squaredNormOfProjected(e) : 0;
    trace = traceE;
    traceOfSquare = eSquares - 2 * eSquaresLeverage + hEh;
    const gram = new Float64Array(L * L);
    for (let l = 0; l < L; l++) {
      trace += lambda[l] * dot(Z[l], Z[l]);
      if (covariance.diagonal) {
        let s = 0;
        for (let j = 0; j < K; j++) s += e[j] * Z[l][j] * Z[l][j];
        traceOfSquare += 2 * lambda[l] * s;
      }
      for (let m = 0; m <= l; m++) {
        const g = dot(Z[l], Z[m]);
        gram[l * L + m] = g;
        gram[m * L + l] = g;
        traceOfSquare += (m === l ? 1 : 2) * lambda[l] * lambda[m] * g * g;
      }
    }
    if (!covariance.diagonal && lambda.every((w) => w >= 0) && L <= gramLimit) {
      const weighted = new Float64Array(L * L);
      for (let l = 0; l < L; l++) for (let m = 0; m < L; m++) weighted[l * L + m] = Math.sqrt(lambda[l] * lambda[m]) * gram[l * L + m];
      const values = symmetricEigenvalues(weighted, L);
      eigenvalues = padToK(values, kEffective, k);
      eigenvalueMethod = 'factors';
    }
  } else {
    const S = denseScaled(covariance, scale);
    const H = projector.basis();
    const SH = H.map((h) => multiply(S, h, K));
    applyPSP = (v) => projector.remove(multiply(S, v, K));
    trace = 0;
    traceOfSquare = 0;
    for (let j = 0; j < K; j++) trace += S[j * K + j];
    for (let i = 0; i < K * K; i++) traceOfSquare += S[i] * S[i];
    H.forEach((h, a) => {
      trace -= dot(h, SH[a]);
      traceOfSquare -= 2 * dot(SH[a], SH[a]);
      H.forEach((_g, b) => {
        const v = dot(H[b], SH[a]);
        traceOfSquare += v * v;
      });
    });
  }

  if (eigenvalues === null && K <= denseLimit) {
    const S = denseScaled(covariance, scale);
    const PSP = projectBothSides(S, projector.basis(), K);
    const values = symmetricEigenvalues(PSP, K);
    // the K − kEffective smallest are the zeros of the H directions and of the empty cells (all eigenvalues are ≥ 0)
    eigenvalues = padToK(values.slice(K - kEffective), kEffective, k);
    eigenvalueMethod = 'dense';
  }

  let min: number | null = eigenvalues ? eigenvalues[0] : null;
  let max: number | null = eigenvalues ? eigenvalues[k - 1] : null;
  if (eigenvalues === null && kEffective >= 1) {
    // only the extremes, by Lanczos on P S P from a start vector in the range of P
    const start = projector.remove(Float64Array.from({ length: K }, (_x, j) => (p[j] > 0 ? 1.3 + Math.sin(0.7 * j + 0.1) : 0)));
    const extremes = extremeEigenvalues(applyPSP, start, kEffective, { tolerance: 1e-12, maxSteps: 400 });
    if (extremes) {
      const clamp = (v: number): number => (Math.abs(v) <= 1e-12 * Math.abs(extremes.max) ? 0 : v);
      min = kEffective < k ? 0 : clamp(extremes.min);
      max = extremes.max;
      eigenvalueMethod = 'lanczos';
    }
  }

  const mean = trace / k;
  const coefficientOfVariation = Math.sqrt(Math.max(0, traceOfSquare / (k * mean * mean) - 1));
  const cellDesignEffects = Array.from(p, (pj, j) => (pj > 0 && pj < 1 ? (cellVariance(covariance, j) * n) / (pj * (1 - pj)) : null));
  return {
    k,
    trace,
    traceOfSquare,
    mean,
    coefficientOfVariation,
    eigenvalues,
    min,
    max,
    eigenvalueMethod,
    cellDesignEffects,
  };
}

/** The kEffective largest of the values (the rest are zeros of a lower-rank V), padded with zeros to k. */
function padToK(values: Float64Array, kEffective: number, k: number): Float64Array {
  const out = new Float64Array(k);
  const take = Math.min(kEffective, values.length);
  for (let i = 0; i < take; i++) out[k - 1 - i] = values[values.length - 1 - i];
  return clampNoise(out);
}

/** Rounding leaves eigenvalues that are exactly 0 in theory at ±1e-16 of the largest: set them to 0. */
function clampNoise(values: Float64Array): Float64Array {
  const largest = values.length ? Math.abs(values[values.length - 1]) : 0;
  return values.map((v) => (Math.abs(v) <= 1e-12 * largest ? 0 : v)).sort();
}

/** S = diag(s) V diag(s) as a dense K × K matrix (s = √n/√p; its diagonal part is e = s² d). */
function denseScaled(covariance: CellCovariance, scale: Float64Array): Float64Array {
  const K = covariance.size;
  const S = denseCovariance(covariance);
  for (let i = 0; i < K; i++) for (let j = 0; j < K; j++) S[i * K + j] *= scale[i] * scale[j];
  return S;
}

function multiply(S: Float64Array, v: Float64Array, K: number): Float64Array {
  const out = new Float64Array(K);
  for (let i = 0; i < K; i++) {
    let s = 0;
    const row = i * K;
    for (let j = 0; j < K; j++) s += S[row + j] * v[j];
    out[i] = s;
  }
  return out;
}

/** P S P with P = I − Σ h h'. */
function projectBothSides(S: Float64Array, H: Float64Array[], K: number): Float64Array {
  const out = Float64Array.from(S);
  // S ← (I − hh') S (I − hh') for each orthonormal h in turn (they commute)
  for (const h of H) {
    const Sh = multiply(out, h, K);
    const hSh = dot(h, Sh);
    for (let i = 0; i < K; i++) {
      const row = i * K;
      for (let j = 0; j < K; j++) out[row + j] += -h[i] * Sh[j] - Sh[i] * h[j] + h[i] * h[j] * hSh;
    }
  }
  return out;
}
