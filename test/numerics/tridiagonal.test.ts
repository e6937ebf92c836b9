// Symmetric tridiagonal eigensolvers (implicit QL and Sturm bisection) against:
// - the closed form for the matrix with d_i = a, e_i = b (the discrete Laplacian with
//   Dirichlet ends): lambda_k = a + 2 b cos(k pi / (n + 1)), k = 1..n, with eigenvector
//   v_j = sin(j k pi / (n + 1)) (e.g. Golub & Van Loan, Matrix Computations, 4th ed.,
//   sec. 4.8.3; Smith, Numerical Solution of PDEs, the model problem);
// - ml-matrix's dense EigenvalueDecomposition (Householder tridiagonalisation + QL from
//   JAMA), a general-purpose reference library, on random matrices and on Wilkinson's
//   W21+ matrix, whose largest eigenvalues come in pairs agreeing to ~1e-14 (Wilkinson,
//   The Algebraic Eigenvalue Problem, 1965, sec. 5.45).
// Tolerances: both methods are backward stable, eigenvalue errors ~ eps ||T|| (Golub & Van
// Loan sec. 8.3.6, 8.4.1); 1e-12 ||T|| leaves room for n <= 40.

import { EigenvalueDecomposition, Matrix } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { sturmCount, tridiagonalEigenvalue, tridiagonalEigenvector } from '../../src/numerics/tridiagonalBisection.js';
import { qlIterationLimit, tridiagonalEigensystem, tridiagonalQl } from '../../src/numerics/tridiagonalQl.js';

function dense(diag: Float64Array, off: Float64Array): Matrix {
  const n = diag.length;
  const m = new Matrix(n, n);
  for (let i = 0; i < n; i++) {
    m.set(i, i, diag[i]);
    if (i + 1 < n) {
      m.set(i, i + 1, off[i]);
      m.set(i + 1, i, off[i]);
    }
  }
  return m;
}

function randomTridiagonal(n: number, seed: string): { diag: Float64Array; off: Float64Array } {
  const random = seededRandom(seed);
  return {
    diag: Float64Array.from({ length: n }, () => 4 * random.uniform() - 2),
    off: Float64Array.from({ length: n - 1 }, () => 2 * random.uniform() - 1),
  };
}

function normOf(diag: Float64Array, off: Float64Array): number {
  let m = 0;
  for (let i = 0; i < diag.length; i++) m = Math.max(m, Math.abs(diag[i]) + (i > 0 ? Math.abs(off[i - 1]) : 0) + (i < off.length ? Math.abs(off[i]) : 0));
  return m;
}

/** Wilkinson's W_(2m+1)^+: d_i = |m - i|, e_i = 1. */
function wilkinson(m: number): { diag: Float64Array; off: Float64Array } {
  const n = 2 * m + 1;
  return { diag: Float64Array.from({ length: n }, (_, i) => Math.abs(m - i)), off: new Float64Array(n - 1).fill(1) };
}

describe('implicit QL (tql1 / tql2)', () => {
  it('reproduces the closed-form spectrum and eigenvectors of the constant tridiagonal matrix', () => {
    const n = 17;
    const a = 2;
    const b = -1;
    const diag = new Float64Array(n).fill(a);
    const off = new Float64Array(n - 1).fill(b);
    const result = tridiagonalEigensystem(diag, off, { vectors: true });
    expect(result.converged).toBe(true);
    // ascending: b < 0, so k = 1 gives the largest value; sort the closed form
    const exact = Array.from({ length: n }, (_, k) => a + 2 * b * Math.cos(((k + 1) * Math.PI) / (n + 1))).sort((x, y) => x - y);
    for (let j = 0; j < n; j++) expect(Math.abs(result.eigenvalues[j] - exact[j])).toBeLessThan(1e-13);
    // eigenvalue j ascending belongs to k = j + 1 (b < 0): v_i = sin((i + 1)(j + 1) pi / (n + 1)), normalised
    const vectors = result.vectors!;
    for (let j = 0; j < n; j++) {
      let dot = 0;
      let norm = 0;
      for (let i = 0; i < n; i++) {
        const v = Math.sin(((i + 1) * (j + 1) * Math.PI) / (n + 1));
        dot += v * vectors[j * n + i];
        norm += v * v;
      }
      expect(Math.abs(Math.abs(dot) / Math.sqrt(norm) - 1)).toBeLessThan(1e-13);
    }
  });

  it('agrees with ml-matrix EigenvalueDecomposition on random matrices; vectors orthonormal with T v = lambda v', () => {
    for (const n of [1, 2, 3, 8, 25, 40]) {
      const { diag, off } = randomTridiagonal(n, `ql/${n}`);
      const tolerance = 1e-12 * normOf(diag, off);
      const reference = new EigenvalueDecomposition(dense(diag, off), { assumeSymmetric: true }).realEigenvalues.sort((x, y) => x - y);
      const withVectors = tridiagonalEigensystem(diag, off, { vectors: true });
      const valuesOnly = tridiagonalEigensystem(diag, off);
      expect(valuesOnly.vectors).toBeNull();
      for (let j = 0; j < n; j++) {
        expect(Math.abs(withVectors.eigenvalues[j] - reference[j])).toBeLessThan(tolerance);
        expect(Math.abs(valuesOnly.eigenvalues[j] - reference[j])).toBeLessThan(tolerance);
      }
      const v = withVectors.vectors!;
      for (let j = 0; j < n; j++) {
        for (let k = 0; k <= j; k++) {
          let dot = 0;
          for (let i = 0; i < n; i++) dot += v[j * n + i] * v[k * n + i];
          expect(Math.abs(dot - (j === k ? 1 : 0))).toBeLessThan(1e-13 * n);
        }
        for (let i = 0; i < n; i++) {
          const tv = diag[i] * v[j * n + i] + (i > 0 ? off[i - 1] * v[j * n + i - 1] : 0) + (i < n - 1 ? off[i] * v[j * n + i + 1] : 0);
          expect(Math.abs(tv - withVectors.eigenvalues[j] * v[j * n + i])).toBeLessThan(tolerance);
        }
      }
    }
  });

  it("resolves the close pairs of Wilkinson's W21+ like ml-matrix", () => {
    const { diag, off } = wilkinson(10);
    const ours = tridiagonalEigensystem(diag, off).eigenvalues;
    const reference = new EigenvalueDecomposition(dense(diag, off), { assumeSymmetric: true }).realEigenvalues.sort((x, y) => x - y);
    for (let j = 0; j < 21; j++) expect(Math.abs(ours[j] - reference[j])).toBeLessThan(1e-12 * 11);
    // the top pair: 10.746194182903393 twice to ~1e-14 (Wilkinson 1965, recalled from memory to 8 digits: 10.74619418)
    expect(ours[20]).toBeCloseTo(10.74619418, 7);
    expect(Math.abs(ours[20] - ours[19])).toBeLessThan(1e-12);
  });

  it('works in place on the column layout: z column j is eigenvector j, d unsorted', () => {
    const { diag, off } = randomTridiagonal(6, 'ql/inplace');
    const n = 6;
    const d = Float64Array.from(diag);
    const e = new Float64Array(n);
    e.set(off);
    const z = new Float64Array(n * n);
    for (let i = 0; i < n; i++) z[i * n + i] = 1;
    expect(tridiagonalQl(d, e, n, z)).toBe(true);
    expect(Array.from(e)).toEqual(new Array(n).fill(0));
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        const col = (k: number) => z[k * n + j];
        const tv = diag[i] * col(i) + (i > 0 ? off[i - 1] * col(i - 1) : 0) + (i < n - 1 ? off[i] * col(i + 1) : 0);
        expect(Math.abs(tv - d[j] * col(i))).toBeLessThan(1e-13);
      }
    }
    expect(qlIterationLimit).toBeGreaterThanOrEqual(30); // EISPACK's limit
  });

  it('with vectorsInRows gives the transpose of the column layout, bit for bit', () => {
    // the same rotations on rows instead of columns: T v = lambda v checked directly on the rows
    const { diag, off } = randomTridiagonal(7, 'ql/rows');
    const n = 7;
    const run = (rows: boolean) => {
      const d = Float64Array.from(diag);
      const e = new Float64Array(n);
      e.set(off);
      const z = new Float64Array(n * n);
      for (let i = 0; i < n; i++) z[i * n + i] = 1;
      expect(tridiagonalQl(d, e, n, z, rows)).toBe(true);
      return { d, z };
    };
    const cols = run(false);
    const rows = run(true);
    expect(Array.from(rows.d)).toEqual(Array.from(cols.d));
    for (let j = 0; j < n; j++) {
      for (let k = 0; k < n; k++) expect(rows.z[j * n + k]).toBe(cols.z[k * n + j]);
      const row = (k: number) => rows.z[j * n + k];
      for (let i = 0; i < n; i++) {
        const tv = diag[i] * row(i) + (i > 0 ? off[i - 1] * row(i - 1) : 0) + (i < n - 1 ? off[i] * row(i + 1) : 0);
        expect(Math.abs(tv - rows.d[j] * row(i))).toBeLessThan(1e-13);
      }
    }
  });

  it('names the bad argument', () => {
    expect(() => tridiagonalEigensystem(new Float64Array(3), new Float64Array(3))).toThrow(/off: expected 2 couplings for 3 diagonal entries, got 3/);
    expect(() => tridiagonalEigensystem(new Float64Array(0), new Float64Array(0))).toThrow(/diag: expected at least one/);
  });
});

describe('Sturm bisection and inverse iteration', () => {
  it('counts eigenvalues below x as the closed form does', () => {
    const n = 12;
    const diag = new Float64Array(n).fill(2);
    const off = new Float64Array(n - 1).fill(-1);
    const exact = Array.from({ length: n }, (_, k) => 2 - 2 * Math.cos(((k + 1) * Math.PI) / (n + 1)));
    for (const x of [-1, 0.05, 0.5, 1.7, 2, 3.3, 4.1]) {
      expect(sturmCount(diag, off, x)).toBe(exact.filter((v) => v < x).length);
    }
  });

  it('gives every eigenvalue of random matrices as ml-matrix does, and the lowest eigenvector', () => {
    for (const n of [1, 2, 9, 31]) {
      const { diag, off } = randomTridiagonal(n, `bisect/${n}`);
      const tolerance = 1e-12 * normOf(diag, off);
      const evd = new EigenvalueDecomposition(dense(diag, off), { assumeSymmetric: true });
      const reference = evd.realEigenvalues; // JAMA tql2 returns them ascending
      for (let j = 0; j < n; j++) expect(Math.abs(tridiagonalEigenvalue(diag, off, j) - reference[j])).toBeLessThan(tolerance);
      const vector = new Float64Array(n);
      tridiagonalEigenvector(diag, off, tridiagonalEigenvalue(diag, off, 0), vector);
      let dot = 0;
      for (let i = 0; i < n; i++) dot += vector[i] * evd.eigenvectorMatrix.get(i, 0);
      expect(Math.abs(Math.abs(dot) - 1)).toBeLessThan(1e-10);
      let sum = 0;
      for (const v of vector) sum += v;
      expect(sum).toBeGreaterThanOrEqual(0); // documented sign convention
    }
  });

  it('brackets the lowest eigenvalue of a deep-lattice Hamiltonian to a few ulps; QL agrees to eps ||T||', () => {
    // The plane-wave Hamiltonian of a 190 E_r lattice at q = 0 (bandStructure.ts):
    // d_l = (2 l)^2 + s/2, e = -s/4. Exactness check without a reference: the Sturm count
    // changes exactly at the returned value (one ulp apart), i.e. bisection found the
    // eigenvalue of the computed recurrence to the last bit.
    const s = 190;
    const L = 17;
    const n = 2 * L + 1;
    const diag = Float64Array.from({ length: n }, (_, i) => (2 * (i - L)) ** 2 + s / 2);
    const off = new Float64Array(n - 1).fill(-s / 4);
    const e0 = tridiagonalEigenvalue(diag, off, 0);
    const ulp = Math.abs(e0) * Number.EPSILON;
    expect(sturmCount(diag, off, e0 - 2 * ulp)).toBe(0);
    expect(sturmCount(diag, off, e0 + 2 * ulp)).toBe(1);
    const ql = tridiagonalEigensystem(diag, off).eigenvalues[0];
    expect(Math.abs(ql - e0)).toBeLessThan(1e-12 * normOf(diag, off)); // consistent, but only to eps ||T||
  });

  it('names the bad index', () => {
    expect(() => tridiagonalEigenvalue(new Float64Array(3), new Float64Array(2), 3)).toThrow(/index must be an integer in \[0, 2\], got 3/);
  });
});
