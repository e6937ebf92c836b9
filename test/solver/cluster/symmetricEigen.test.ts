// Dense symmetric eigensolver (Householder + implicit QL) against ml-matrix's
// EigenvalueDecomposition (a general-purpose reference library) and the invariants
// A v = lambda v, V^T V = 1, to 1e-12 relative (double precision, well-conditioned sizes);
// the partial solver (lowest eigenvectors by inverse iteration) against the same.
import { describe, expect, it } from 'vitest';
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { createSymmetricEigenWorkspace, symmetricEigen } from '../../../src/solver/cluster/symmetricEigen.js';
import { createPartialEigenWorkspace, partialEigenvalues, partialEigenvectors } from '../../../src/solver/cluster/partialSymmetricEigen.js';
import { seededRandom } from '../../../src/numerics/seededRandom.js';

function randomSymmetric(n: number, seed: string): number[][] {
  const rng = seededRandom(seed);
  const m = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 0; i < n; i++) for (let j = 0; j <= i; j++) m[i][j] = m[j][i] = 2 * rng.uniform() - 1;
  return m;
}

describe('symmetricEigen', () => {
  for (const n of [1, 2, 3, 7, 40]) {
    it(`n = ${n}: eigenvalues equal ml-matrix, eigenpairs satisfy A v = lambda v, orthonormal`, () => {
      const m = randomSymmetric(n, `eig-${n}`);
      const ws = createSymmetricEigenWorkspace(64);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) ws.a[i * n + j] = m[i][j];
      expect(symmetricEigen(ws, n)).toBe(true);
      const ref = new EigenvalueDecomposition(new Matrix(m), { assumeSymmetric: true }).realEigenvalues.slice().sort((x, y) => x - y);
      for (let k = 0; k < n; k++) expect(Math.abs(ws.values[k] - ref[k])).toBeLessThan(1e-12 * n);
      for (let k = 0; k < n; k++) {
        if (k > 0) expect(ws.values[k]).toBeGreaterThanOrEqual(ws.values[k - 1]);
        for (let i = 0; i < n; i++) {
          let av = 0;
          for (let j = 0; j < n; j++) av += m[i][j] * ws.a[k * n + j];
          expect(Math.abs(av - ws.values[k] * ws.a[k * n + i])).toBeLessThan(1e-12 * n);
        }
        for (let l = 0; l < n; l++) {
          let dot = 0;
          for (let i = 0; i < n; i++) dot += ws.a[k * n + i] * ws.a[l * n + i];
          expect(Math.abs(dot - (k === l ? 1 : 0))).toBeLessThan(1e-12 * n);
        }
      }
    });
  }

  it('a degenerate spectrum (diagonal with repeats, rotated) keeps orthonormal eigenvectors', () => {
    const n = 6;
    // A = Q diag(1,1,1,2,2,3) Q^T with Q from the ml-matrix QR of a random matrix.
    const rng = seededRandom('degenerate');
    const R = new Matrix(Array.from({ length: n }, () => Array.from({ length: n }, () => rng.uniform() - 0.5)));
    const Q = new EigenvalueDecomposition(R.add(R.transpose()), { assumeSymmetric: true }).eigenvectorMatrix;
    const D = Matrix.diag([1, 1, 1, 2, 2, 3]);
    const A = Q.mmul(D).mmul(Q.transpose());
    const ws = createSymmetricEigenWorkspace(n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) ws.a[i * n + j] = A.get(i, j);
    symmetricEigen(ws, n);
    const expected = [1, 1, 1, 2, 2, 3];
    for (let k = 0; k < n; k++) expect(Math.abs(ws.values[k] - expected[k])).toBeLessThan(1e-13);
    for (let k = 0; k < n; k++) {
      for (let l = 0; l < n; l++) {
        let dot = 0;
        for (let i = 0; i < n; i++) dot += ws.a[k * n + i] * ws.a[l * n + i];
        expect(Math.abs(dot - (k === l ? 1 : 0))).toBeLessThan(1e-13);
      }
    }
  });
});

describe('partial eigen-solver (Householder, QL eigenvalues, inverse iteration)', () => {
  it('lowest eigenvectors of random matrices: A v = lambda v, orthonormal, eigenvalues = ml-matrix (1e-11)', () => {
    for (const [n, count] of [[1, 1], [5, 2], [30, 30], [80, 12]]) {
      const m = randomSymmetric(n, `partial-${n}`);
      const ws = createPartialEigenWorkspace(100);
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) ws.a[i * n + j] = m[i][j];
      expect(partialEigenvalues(ws, n)).toBe(true);
      partialEigenvectors(ws, n, count);
      const ref = new EigenvalueDecomposition(new Matrix(m), { assumeSymmetric: true }).realEigenvalues.slice().sort((x, y) => x - y);
      for (let k = 0; k < n; k++) expect(Math.abs(ws.values[k] - ref[k])).toBeLessThan(1e-11);
      checkPairs(m, ws.values, ws.vectors, n, count, 1e-11);
    }
  });

  it('a degenerate spectrum gives an orthonormal basis of each eigenspace', () => {
    const n = 7;
    const rng = seededRandom('partial-degenerate');
    const R = new Matrix(Array.from({ length: n }, () => Array.from({ length: n }, () => rng.uniform() - 0.5)));
    const Q = new EigenvalueDecomposition(R.add(R.transpose()), { assumeSymmetric: true }).eigenvectorMatrix;
    const A = Q.mmul(Matrix.diag([-1, -1, -1, 0.5, 0.5, 2, 3])).mmul(Q.transpose());
    const ws = createPartialEigenWorkspace(n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) ws.a[i * n + j] = A.get(i, j);
    partialEigenvalues(ws, n);
    partialEigenvectors(ws, n, 5);
    checkPairs(A.to2DArray(), ws.values, ws.vectors, n, 5, 1e-12);
  });
});

function checkPairs(m: number[][], values: Float64Array, vectors: Float64Array, n: number, count: number, tol: number): void {
  for (let k = 0; k < count; k++) {
    for (let i = 0; i < n; i++) {
      let av = 0;
      for (let j = 0; j < n; j++) av += m[i][j] * vectors[k * n + j];
      expect(Math.abs(av - values[k] * vectors[k * n + i])).toBeLessThan(tol);
    }
    for (let l = 0; l <= k; l++) {
      let dot = 0;
      for (let i = 0; i < n; i++) dot += vectors[k * n + i] * vectors[l * n + i];
      expect(Math.abs(dot - (k === l ? 1 : 0))).toBeLessThan(tol);
    }
  }
}
