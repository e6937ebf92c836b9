// Full eigendecomposition of a dense real symmetric matrix: Householder reduction to
// tridiagonal form with the transformations accumulated (procedure tred2 of Martin,
// Reinsch & Wilkinson, Numer. Math. 11, 181 (1968)), then the implicit QL algorithm with
// Wilkinson-type shifts on the tridiagonal matrix, rotating the accumulated basis (tql2,
// Bowdler, Martin, Reinsch & Wilkinson, Numer. Math. 11, 293 (1968)). Both are the
// Handbook for Automatic Computation versions, here on a flat row-major array and a
// preallocated workspace so that repeated solves allocate nothing.
//
// The working matrix V of the Handbook procedures is stored transposed, a[c * n + r] =
// V[r][c], so that every inner loop (over the row index of V) runs over contiguous memory;
// the input is symmetric, so this is the same array, and the eigenvectors (columns of V)
// come out as rows.
//
// Used for the cluster problem at small Fock dimension and for the Rayleigh-Ritz step of
// the Lanczos solver (projected matrices of varying size n <= capacity).

import { sortEigenpairsAscending } from '../../numerics/sortEigenpairs.js';
import { tridiagonalQl } from '../../numerics/tridiagonalQl.js';

export interface SymmetricEigenWorkspace {
  /** largest n accepted */
  readonly capacity: number;
  /**
   * input: the symmetric matrix, row-major in the first n*n entries;
   * output: eigenvector k in row k (a[k * n + i] = component i), ascending eigenvalues
   */
  readonly a: Float64Array;
  /** output: eigenvalues ascending */
  readonly values: Float64Array;
  readonly off: Float64Array;
}

export function createSymmetricEigenWorkspace(capacity: number): SymmetricEigenWorkspace {
  return {
    capacity,
    a: new Float64Array(capacity * capacity),
    values: new Float64Array(capacity),
    off: new Float64Array(capacity),
  };
}

/**
 * Diagonalise the n x n symmetric matrix in ws.a (full, both triangles filled). Returns
 * false if the QL iteration failed to converge (more than 60 sweeps on one eigenvalue),
 * which for a finite symmetric matrix does not happen in practice.
 */
export function symmetricEigen(ws: SymmetricEigenWorkspace, n: number): boolean {
  if (n > ws.capacity) throw new Error(`symmetricEigen: n = ${n} exceeds the workspace capacity ${ws.capacity}`);
  const a = ws.a;
  const d = ws.values;
  const e = ws.off;
  if (n === 1) {
    d[0] = a[0];
    a[0] = 1;
    return true;
  }
  householderTridiagonal(a, d, e, n);
  const ok = qlAfterReduction(a, d, e, n);
  // Rows hold the eigenvectors; sort ascending.
  sortEigenpairsAscending(d, a, n);
  return ok;
}

/**
 * tred2: on return d is the diagonal, e[1..n-1] the subdiagonal (e[0] = 0), and a holds
 * the orthogonal matrix Z of the reduction (A = Z T Z^T), column j of Z in row j of a.
 */
function householderTridiagonal(a: Float64Array, d: Float64Array, e: Float64Array, n: number): void {
  householderReduce(a, d, e, n);
  accumulateReflections(a, d, e, n);
}

/**
 * The reduction half of tred2 without accumulating Z. On return: T_ii = a[i * n + i],
 * e[i] (i >= 1) the subdiagonal T_{i,i-1} (e[0] = 0), and reflection m (m = 1 .. n-1),
 * P_m = I - u u^T / h_m acting on indices 0 .. m-1, has u_k = a[m * n + k] (k < m) and
 * h_m = d[m] (0: no reflection). Z = P_{n-1} ... P_1 in the sense of accumulateReflections.
 */
export function householderReduce(a: Float64Array, d: Float64Array, e: Float64Array, n: number): void {
  for (let j = 0; j < n; j++) d[j] = a[j * n + (n - 1)];
  for (let i = n - 1; i > 0; i--) {
    // Scale the row to avoid under/overflow of the Householder vector.
    let scale = 0;
    let h = 0;
    for (let k = 0; k < i; k++) scale += Math.abs(d[k]);
    if (scale === 0) {
      e[i] = d[i - 1];
      for (let j = 0; j < i; j++) {
        d[j] = a[j * n + (i - 1)];
        a[j * n + i] = 0;
        a[i * n + j] = 0;
      }
    } else {
      for (let k = 0; k < i; k++) {
        d[k] /= scale;
        h += d[k] * d[k];
      }
      let f = d[i - 1];
      let g = Math.sqrt(h);
      if (f > 0) g = -g;
      e[i] = scale * g;
      h -= f * g;
      d[i - 1] = f - g;
      for (let j = 0; j < i; j++) e[j] = 0;
      // p = A u / h, accumulated in e, using the lower triangle.
      for (let j = 0; j < i; j++) {
        f = d[j];
        a[i * n + j] = f;
        g = e[j] + a[j * n + j] * f;
        for (let k = j + 1; k <= i - 1; k++) {
          g += a[j * n + k] * d[k];
          e[k] += a[j * n + k] * f;
        }
        e[j] = g;
      }
      f = 0;
      for (let j = 0; j < i; j++) {
        e[j] /= h;
        f += e[j] * d[j];
      }
      const hh = f / (h + h);
      for (let j = 0; j < i; j++) e[j] -= hh * d[j];
      // Rank-2 update A <- A - u q^T - q u^T of the remaining lower triangle.
      for (let j = 0; j < i; j++) {
        f = d[j];
        g = e[j];
        for (let k = j; k <= i - 1; k++) a[j * n + k] -= f * e[k] + g * d[k];
        d[j] = a[j * n + (i - 1)];
        a[j * n + i] = 0;
      }
    }
    d[i] = h;
  }
}

/** Second half of tred2: form Z from the reflections left by householderReduce. */
function accumulateReflections(a: Float64Array, d: Float64Array, e: Float64Array, n: number): void {
  for (let i = 0; i < n - 1; i++) {
    a[i * n + (n - 1)] = a[i * n + i];
    a[i * n + i] = 1;
    const h = d[i + 1];
    if (h !== 0) {
      for (let k = 0; k <= i; k++) d[k] = a[(i + 1) * n + k] / h;
      for (let j = 0; j <= i; j++) {
        let g = 0;
        for (let k = 0; k <= i; k++) g += a[(i + 1) * n + k] * a[j * n + k];
        for (let k = 0; k <= i; k++) a[j * n + k] -= g * d[k];
      }
    }
    for (let k = 0; k <= i; k++) a[(i + 1) * n + k] = 0;
  }
  for (let j = 0; j < n; j++) {
    d[j] = a[j * n + (n - 1)];
    a[j * n + (n - 1)] = 0;
  }
  a[(n - 1) * n + (n - 1)] = 1;
  e[0] = 0;
}

/**
 * tql2 on the output of householderReduce / accumulateReflections, where e[i] couples rows
 * i-1 and i: shift e to the convention of tridiagonalQl (e[i] couples i and i+1) and rotate
 * the rows of a (the columns of Z, stored transposed). With a = null only the eigenvalues
 * are computed (tql1), unsorted. Returns false when an eigenvalue did not converge.
 */
export function qlAfterReduction(a: Float64Array | null, d: Float64Array, e: Float64Array, n: number): boolean {
  for (let i = 1; i < n; i++) e[i - 1] = e[i];
  e[n - 1] = 0;
  return tridiagonalQl(d, e, n, a, true);
}
