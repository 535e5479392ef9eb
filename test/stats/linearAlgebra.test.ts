import { describe, expect, it } from 'vitest';
import { dot, extremeEigenvalues, orthonormalBasis, solveTridiagonal, symmetricEigenvalues, tridiagonalEigenvalues } from '../../src/stats/linearAlgebra.js';
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

describe('tridiagonal routines and the Lanczos extremes', () => {
  const n = 300;
  const secondDifference = (v: Float64Array): Float64Array => v.map((x, i) => 2 * x - (i > 0 ? v[i - 1] : 0) - (i < n - 1 ? v[i + 1] : 0));
  const exact = (k: number): number => 2 - 2 * Math.cos((k * Math.PI) / (n + 1)); // Golub & Van Loan 2013, §4.8

  it('tridiagonal eigenvalues and a pivoting solve of tridiag(−1, 2, −1)', () => {
    const values = tridiagonalEigenvalues(new Array(n).fill(2), new Array(n - 1).fill(-1));
    for (let k = 1; k <= n; k++) expect(Math.abs(values[k - 1] - exact(k))).toBeLessThan(1e-13);
    const x = Float64Array.from({ length: n }, (_v, i) => Math.cos(i));
    const solved = solveTridiagonal(new Array(n - 1).fill(-1), new Array(n).fill(2), new Array(n - 1).fill(-1), secondDifference(x));
    for (let i = 0; i < n; i++) expect(Math.abs(solved[i] - x[i])).toBeLessThan(1e-9);
    // a system that needs row interchanges (zero pivots): [[0,1,0],[1,0,1],[0,1,1]] x = (2, 4, 5) has x = (1, 2, 3)
    const interchanged = solveTridiagonal([1, 1], [0, 0, 1], [1, 1], [2, 4, 5]);
    [1, 2, 3].forEach((v, i) => expect(Math.abs(interchanged[i] - v)).toBeLessThan(1e-15));
  });

  it('Lanczos finds the smallest and largest eigenvalue of tridiag(−1, 2, −1) of order 300 to 1e-12 of the largest', () => {
    const start = Float64Array.from({ length: n }, (_v, i) => 1 + Math.sin(i * 0.37));
    const result = extremeEigenvalues(secondDifference, start, n)!;
    expect(result).not.toBeNull();
    expect(Math.abs(result.max - exact(n)) / exact(n)).toBeLessThan(1e-12);
    expect(Math.abs(result.min - exact(1)) / exact(n)).toBeLessThan(1e-12);
  });
});
