import { describe, expect, it } from 'vitest';
import { orthonormalBasis, symmetricEigenvalues, dot } from '../../src/stats/linearAlgebra.js';
import { expectClose } from '../helpers.js';

describe('symmetric eigenvalues (Householder + QL)', () => {
  it('the tridiagonal matrix tridiag(−1, 2, −1) of order n has eigenvalues 2 − 2 cos(kπ/(n+1)) (Golub & Van Loan 2013, Matrix Computations, 4th ed., §4.8)', () => {
    for (const n of [1, 2, 5, 40]) {
      const A = new Float64Array(n * n);
      for (let i = 0; i < n; i++) {
        A[i * n + i] = 2;
        if (i > 0) A[i * n + i - 1] = A[(i - 1) * n + i] = -1;
      }
      const values = symmetricEigenvalues(A, n);
      for (let k = 1; k <= n; k++) expect(Math.abs(values[k - 1] - (2 - 2 * Math.cos((k * Math.PI) / (n + 1))))).toBeLessThan(1e-13);
    }
  });

  it('a dense symmetric matrix keeps its trace and Frobenius norm (sums of eigenvalues and of their squares)', () => {
    const n = 30;
    const A = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) A[i * n + j] = A[j * n + i] = Math.sin(i * 13 + j * 7) + (i === j ? 3 : 0);
    const values = symmetricEigenvalues(A, n);
    let trace = 0;
    let frobenius = 0;
    for (let i = 0; i < n; i++) trace += A[i * n + i];
    for (const v of A) frobenius += v * v;
    expectClose(values.reduce((s, v) => s + v, 0), trace, 1e-12);
    expectClose(values.reduce((s, v) => s + v * v, 0), frobenius, 1e-12);
  });
});

describe('orthonormal basis', () => {
  it('drops dependent vectors and returns orthonormal ones', () => {
    const basis = orthonormalBasis([Float64Array.of(1, 1, 0), Float64Array.of(2, 2, 0), Float64Array.of(1, 0, 1)]);
    expect(basis.length).toBe(2);
    expectClose(dot(basis[0], basis[0]), 1, 1e-15);
    expect(Math.abs(dot(basis[0], basis[1]))).toBeLessThan(1e-15);
  });
});
