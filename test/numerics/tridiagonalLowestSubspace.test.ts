// The lowest-eigenvalue subspace of a symmetric tridiagonal matrix (bisection + inverse
// iteration with partial pivoting + re-orthogonalisation) against ml-matrix's dense
// EigenvalueDecomposition: eigenvalues, and the spectral projector V V^T, which is the same for
// any basis of the subspace (so clustered and exactly degenerate eigenvalues can be compared).
import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { tridiagonalLowestSubspace } from '../../src/numerics/tridiagonalLowestSubspace.js';

function dense(diag: Float64Array, off: Float64Array): Matrix {
  const n = diag.length;
  const M = new Matrix(n, n);
  for (let i = 0; i < n; i++) {
    M.set(i, i, diag[i]);
    if (i + 1 < n) {
      M.set(i, i + 1, off[i]);
      M.set(i + 1, i, off[i]);
    }
  }
  return M;
}

function compare(diag: Float64Array, off: Float64Array, k: number): { eigen: number; projector: number; orthonormal: number; residual: number } {
  const n = diag.length;
  const sub = tridiagonalLowestSubspace(diag, off, k);
  const evd = new EigenvalueDecomposition(dense(diag, off), { assumeSymmetric: true });
  const order = evd.realEigenvalues.map((e, j) => ({ e, j })).sort((a, b) => a.e - b.e);
  let eigen = Math.abs(sub.nextEigenvalue - order[k].e);
  for (let j = 0; j < k; j++) eigen = Math.max(eigen, Math.abs(sub.eigenvalues[j] - order[j].e));
  let projector = 0;
  let orthonormal = 0;
  for (let a = 0; a < n; a++) {
    for (let b = 0; b < n; b++) {
      let p = 0;
      let q = 0;
      for (let j = 0; j < k; j++) {
        p += sub.vectors[j * n + a] * sub.vectors[j * n + b];
        q += evd.eigenvectorMatrix.get(a, order[j].j) * evd.eigenvectorMatrix.get(b, order[j].j);
      }
      projector = Math.max(projector, Math.abs(p - q));
    }
  }
  for (let i = 0; i < k; i++) {
    for (let j = 0; j < k; j++) {
      let d = 0;
      for (let a = 0; a < n; a++) d += sub.vectors[i * n + a] * sub.vectors[j * n + a];
      orthonormal = Math.max(orthonormal, Math.abs(d - (i === j ? 1 : 0)));
    }
  }
  return { eigen, projector, orthonormal, residual: sub.residual };
}

describe('tridiagonalLowestSubspace against ml-matrix', () => {
  it('a lattice band: the finite-difference Hamiltonian of 6 wells of 10 sin^2(x), lowest 6 states', () => {
    const P = 24;
    const n = 6 * P - 1;
    const h = Math.PI / P;
    const diag = new Float64Array(n);
    const off = new Float64Array(n - 1);
    for (let k = 0; k < n; k++) {
      diag[k] = 2 / (h * h) + 10 * Math.sin(-Math.PI / 2 + (k + 1) * h) ** 2;
      if (k < n - 1) off[k] = -1 / (h * h);
    }
    const r = compare(diag, off, 6);
    // ||T|| ~ 200: both solvers are backward stable (errors ~ eps ||T|| ~ 5e-14); the band
    // (width ~0.1) is separated from the next by ~4, so the projector agrees to ~1e-12.
    expect(r.eigen).toBeLessThan(1e-11);
    expect(r.projector).toBeLessThan(1e-10);
    expect(r.orthonormal).toBeLessThan(1e-13);
    expect(r.residual).toBeLessThan(1e-10);
  });

  it('exactly degenerate eigenvalues: two identical uncoupled blocks', () => {
    // diag = [3, 1, 2, 3, 1, 2] with off = [0.5, 0.5, 0, 0.5, 0.5]: every eigenvalue twice.
    const diag = Float64Array.from([3, 1, 2, 3, 1, 2]);
    const off = Float64Array.from([0.5, 0.5, 0, 0.5, 0.5]);
    const r = compare(diag, off, 4);
    expect(r.eigen).toBeLessThan(1e-13);
    expect(r.projector).toBeLessThan(1e-12);
    expect(r.orthonormal).toBeLessThan(1e-14);
  });

  it('a random symmetric tridiagonal matrix (fixed seed), lowest 10 of 40', () => {
    let seed = 7;
    const rand = (): number => {
      seed = (Math.imul(seed, 1103515245) + 12345) >>> 0;
      return seed / 4294967296;
    };
    const diag = Float64Array.from({ length: 40 }, () => 4 * rand() - 2);
    const off = Float64Array.from({ length: 39 }, () => 2 * rand() - 1);
    const r = compare(diag, off, 10);
    expect(r.eigen).toBeLessThan(1e-13);
    // Projector error ~ eps ||T|| / (gap above the subspace); the gap here is 0.20.
    expect(r.projector).toBeLessThan(1e-11);
    expect(r.orthonormal).toBeLessThan(1e-14);
  });
});
