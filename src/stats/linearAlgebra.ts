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
  // --- QL with implicit shifts (tqli, no vectors) ---
  for (let i = 1; i < n; i++) e[i - 1] = e[i];
  e[n - 1] = 0;
  for (let l = 0; l < n; l++) {
    let iteration = 0;
    let m: number;
    do {
      for (m = l; m < n - 1; m++) {
        const dd = Math.abs(d[m]) + Math.abs(d[m + 1]);
        if (Math.abs(e[m]) <= Number.EPSILON * dd) break;
      }
      if (m !== l) {
        if (iteration++ === 60) throw new Error('symmetricEigenvalues: no convergence');
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
