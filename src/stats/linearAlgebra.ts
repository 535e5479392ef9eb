/**
 * The small dense linear algebra the design-based tests need: eigenvalues of
 * a symmetric matrix, and an orthonormal basis of a few vectors. Matrices are
 * row-major Float64Arrays of n × n entries.
 */

/**
 * Eigenvalues of a real symmetric n × n matrix, ascending. Householder
 * reduction to tridiagonal form, then the QL algorithm with implicit shifts
 * (Wilkinson & Reinsch 1971, Handbook for Automatic Computation II,
 * procedures tred1 and tql1; Press et al. 2007, Numerical Recipes 3rd ed.,
 * §11.3–11.4, tred2 and tqli without eigenvectors). About (4/3) n³
 * operations. Only the lower triangle of `matrix` is read; it is not changed.
 * @example symmetricEigenvalues(Float64Array.of(2, 1, 1, 2), 2) → [1, 3]
 */
export function symmetricEigenvalues(matrix: Float64Array, n: number): Float64Array {
  const z = Float64Array.from(matrix);
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  if (n === 0) return d;
  // --- Householder tridiagonalisation (tred2, no vectors) ---
  for (let i = n - 1; i > 0; i--) {
    const l = i - 1;
    let h = 0;
    let scale = 0;
    const rowI = i * n;
    if (l > 0) {
      for (let k = 0; k < i; k++) scale += Math.abs(z[rowI + k]);
      if (scale === 0) {
        e[i] = z[rowI + l];
      } else {
        for (let k = 0; k < i; k++) {
          z[rowI + k] /= scale;
          h += z[rowI + k] * z[rowI + k];
        }
        let f = z[rowI + l];
        let g = f >= 0 ? -Math.sqrt(h) : Math.sqrt(h);
        e[i] = scale * g;
        h -= f * g;
        z[rowI + l] = f - g;
        f = 0;
        for (let j = 0; j < i; j++) {
          g = 0;
          const rowJ = j * n;
          for (let k = 0; k <= j; k++) g += z[rowJ + k] * z[rowI + k];
          for (let k = j + 1; k < i; k++) g += z[k * n + j] * z[rowI + k];
          e[j] = g / h;
          f += e[j] * z[rowI + j];
        }
        const hh = f / (h + h);
        for (let j = 0; j < i; j++) {
          f = z[rowI + j];
          g = e[j] - hh * f;
          e[j] = g;
          const rowJ = j * n;
          for (let k = 0; k <= j; k++) z[rowJ + k] -= f * e[k] + g * z[rowI + k];
        }
      }
    } else {
      e[i] = z[rowI + l];
    }
  }
  e[0] = 0;
  for (let i = 0; i < n; i++) d[i] = z[i * n + i];
  // e[i] is the element below the diagonal in row i (e[0] unused)
  return tridiagonalEigenvalues(d, e.subarray(1));
}

/**
 * Eigenvalues, ascending, of the symmetric tridiagonal matrix with diagonal `diagonal` (n) and
 * off-diagonal `offDiagonal` (n − 1): the QL algorithm with implicit shifts (tql1 of Wilkinson &
 * Reinsch 1971; Press et al. 2007, §11.4 tqli). O(n²). The arguments are not changed.
 * @example tridiagonalEigenvalues([2, 2], [1]) → [1, 3]
 */
export function tridiagonalEigenvalues(diagonal: ArrayLike<number>, offDiagonal: ArrayLike<number>): Float64Array {
  const n = diagonal.length;
  const d = Float64Array.from(diagonal);
  const e = new Float64Array(n);
  for (let i = 0; i + 1 < n; i++) e[i] = offDiagonal[i];
  for (let l = 0; l < n; l++) {
    let iteration = 0;
    let m: number;
    do {
      for (m = l; m < n - 1; m++) {
        const dd = Math.abs(d[m]) + Math.abs(d[m + 1]);
        if (Math.abs(e[m]) <= Number.EPSILON * dd) break;
      }
      if (m !== l) {
        if (iteration++ === 60) throw new Error('tridiagonalEigenvalues: no convergence');
        let g = (d[l + 1] - d[l]) / (2 * e[l]);
        let r = Math.hypot(g, 1);
        g = d[m] - d[l] + e[l] / (g + (g >= 0 ? Math.abs(r) : -Math.abs(r)));
        let s = 1;
        let c = 1;
        let p = 0;
        let deflated = false;
        for (let i = m - 1; i >= l; i--) {
          const f = s * e[i];
          const b = c * e[i];
          r = Math.hypot(f, g);
          e[i + 1] = r;
          if (r === 0) {
            d[i + 1] -= p;
            e[m] = 0;
            deflated = true;
            break;
          }
          s = f / r;
          c = g / r;
          g = d[i + 1] - p;
          r = (d[i] - g) * s + 2 * c * b;
          p = s * r;
          d[i + 1] = g + p;
          g = c * r - b;
        }
        if (deflated) continue;
        d[l] -= p;
        e[l] = g;
        e[m] = 0;
      }
    } while (m !== l);
  }
  return d.sort();
}

/**
 * An orthonormal basis of the span of `vectors` (each of length n), by
 * modified Gram–Schmidt with one re-orthogonalisation pass ("twice is
 * enough", Giraud et al. 2005, Numer. Math. 101, 87–100). A vector whose
 * remainder is below `tolerance` of its own norm lies in the span of the
 * earlier ones and is dropped.
 */
export function orthonormalBasis(vectors: readonly Float64Array[], tolerance = 1e-10): Float64Array[] {
  const basis: Float64Array[] = [];
  for (const vector of vectors) {
    const v = Float64Array.from(vector);
    const original = Math.sqrt(dot(v, v));
    if (original === 0) continue;
    for (let pass = 0; pass < 2; pass++) {
      for (const q of basis) {
        const projection = dot(q, v);
        for (let i = 0; i < v.length; i++) v[i] -= projection * q[i];
      }
    }
    const norm = Math.sqrt(dot(v, v));
    if (norm <= tolerance * original) continue;
    for (let i = 0; i < v.length; i++) v[i] /= norm;
    basis.push(v);
  }
  return basis;
}

export function dot(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let sum = 0;
  for (let i = 0; i < a.length; i++) sum += a[i] * b[i];
  return sum;
}

/**
 * Solves the tridiagonal system T x = b (T with sub-diagonal `sub`, diagonal `diagonal`, super-diagonal
 * `sup`) by Gaussian elimination with partial pivoting (LAPACK dgtsv; Golub & Van Loan 2013, §4.3.5).
 * A zero pivot is replaced by a tiny one, as inverse iteration wants.
 */
export function solveTridiagonal(sub: ArrayLike<number>, diagonal: ArrayLike<number>, sup: ArrayLike<number>, rhs: ArrayLike<number>): Float64Array {
  const n = diagonal.length;
  const dl = Float64Array.from(sub);
  const d = Float64Array.from(diagonal);
  const du = Float64Array.from(sup);
  const du2 = new Float64Array(Math.max(0, n - 2));
  const b = Float64Array.from(rhs);
  const tiny = 1e-300;
  for (let i = 0; i < n - 1; i++) {
    if (Math.abs(d[i]) >= Math.abs(dl[i])) {
      if (d[i] === 0) d[i] = tiny;
      const fact = dl[i] / d[i];
      d[i + 1] -= fact * du[i];
      b[i + 1] -= fact * b[i];
    } else {
      // interchange rows i and i + 1
      const fact = d[i] / dl[i];
      d[i] = dl[i];
      const temp = d[i + 1];
      d[i + 1] = du[i] - fact * temp;
      if (i < n - 2) {
        du2[i] = du[i + 1];
        du[i + 1] = -fact * du2[i];
      }
      du[i] = temp;
      const bi = b[i];
      b[i] = b[i + 1];
      b[i + 1] = bi - fact * b[i + 1];
    }
  }
  if (d[n - 1] === 0) d[n - 1] = tiny;
  const x = new Float64Array(n);
  x[n - 1] = b[n - 1] / d[n - 1];
  if (n > 1) x[n - 2] = (b[n - 2] - du[n - 2] * x[n - 1]) / d[n - 2];
  for (let i = n - 3; i >= 0; i--) x[i] = (b[i] - du[i] * x[i + 1] - du2[i] * x[i + 2]) / d[i];
  return x;
}

/** |last component| of the unit eigenvector of the tridiagonal (alpha, beta) for the eigenvalue theta (inverse iteration). */
function lastEigenvectorComponent(alpha: number[], beta: number[], theta: number): number {
  const n = alpha.length;
  const shifted = alpha.map((a) => a - theta);
  let x: Float64Array = new Float64Array(n).fill(1);
  for (let iteration = 0; iteration < 3; iteration++) {
    x = solveTridiagonal(beta, shifted, beta, x);
    const norm = Math.sqrt(dot(x, x));
    if (!(norm > 0) || !Number.isFinite(norm)) return Infinity;
    for (let i = 0; i < n; i++) x[i] /= norm;
  }
  return Math.abs(x[n - 1]);
}

/**
 * The smallest and largest eigenvalues of a symmetric operator on an invariant subspace of the given
 * dimension, by the Lanczos method with full reorthogonalisation (Lanczos 1950, J. Res. Nat. Bur.
 * Standards 45, 255–282; Golub & Van Loan 2013, §10.1–10.3), started from `start` (in the subspace).
 * A Ritz value θ with Ritz vector y satisfies |λ − θ| ≤ ‖A y − θ y‖ = β_j |s_j| for some eigenvalue λ
 * (s the eigenvector of the Lanczos tridiagonal): the method stops when both extremes have that bound
 * below `tolerance` × the largest |θ|, when the Krylov space is exhausted (β = 0, or `dimension`
 * steps, where the values are exact), and gives null after `maxSteps` without convergence.
 */
export function extremeEigenvalues(
  apply: (v: Float64Array) => Float64Array,
  start: Float64Array,
  dimension: number,
  options: { tolerance?: number; maxSteps?: number } = {},
): { min: number; max: number; steps: number } | null {
  const tolerance = options.tolerance ?? 1e-12;
  const maxSteps = Math.min(options.maxSteps ?? 400, dimension);
  const startNorm = Math.sqrt(dot(start, start));
  if (!(startNorm > 0) || dimension < 1) return null;
  const basis: Float64Array[] = [start.map((v) => v / startNorm)];
  const alpha: number[] = [];
  const beta: number[] = [];
  let size = 0;
  for (let j = 0; j < maxSteps; j++) {
    const q = basis[j];
    const w = apply(q);
    const a = dot(q, w);
    alpha.push(a);
    for (let i = 0; i < w.length; i++) w[i] -= a * q[i] + (j > 0 ? beta[j - 1] * basis[j - 1][i] : 0);
    for (let pass = 0; pass < 2; pass++) {
      for (const previous of basis) {
        const c = dot(previous, w);
        for (let i = 0; i < w.length; i++) w[i] -= c * previous[i];
      }
    }
    const b = Math.sqrt(dot(w, w));
    size = Math.max(size, Math.abs(a), b);
    const steps = j + 1;
    const exhausted = b <= 1e-14 * size || steps >= dimension;
    if (exhausted || steps % 5 === 0 || steps === maxSteps) {
      const theta = tridiagonalEigenvalues(alpha, beta);
      const low = theta[0];
      const high = theta[steps - 1];
      if (exhausted) return { min: low, max: high, steps };
      const scale = Math.max(Math.abs(low), Math.abs(high), Number.MIN_VALUE);
      if (b * lastEigenvectorComponent(alpha, beta, low) <= tolerance * scale && b * lastEigenvectorComponent(alpha, beta, high) <= tolerance * scale) {
        return { min: low, max: high, steps };
      }
    }
    beta.push(b);
    basis.push(w.map((v) => v / b));
  }
  return null;
}
