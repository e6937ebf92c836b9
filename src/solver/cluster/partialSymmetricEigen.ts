// All eigenvalues and the lowest k eigenvectors of a dense real symmetric matrix, for the
// cluster ground state (k = 1) and the thermal state (k = the states with a Boltzmann
// weight that counts). Cost ~ (4/3) n^3 + O(n^2 k) instead of ~ 9 n^3 for the full
// decomposition (symmetricEigen.ts):
//
// 1. Householder reduction A = Z T Z^T without forming Z (first half of tred2, Martin,
//    Reinsch & Wilkinson, Numer. Math. 11, 181 (1968));
// 2. eigenvalues of T by implicit QL without vectors (tql1, Bowdler et al., Numer. Math.
//    11, 293 (1968));
// 3. eigenvectors of T by inverse iteration with the tridiagonal LU factorisation of
//    T - lambda I with partial pivoting, vectors of eigenvalues closer than 1e-3 ||T||
//    orthogonalised against each other (Wilkinson's method as in the EISPACK routine
//    tinvit; Peters & Wilkinson, Handbook for Automatic Computation II/18, 1971); this
//    also spans degenerate eigenspaces, which symmetric clusters have;
// 4. back-transformation x = Z y by applying the stored reflections.

import { householderReduce, qlAfterReduction } from './symmetricEigen.js';
import { insertionSortAscending } from '../../numerics/insertionSort.js';

export interface PartialEigenWorkspace {
  readonly capacity: number;
  /** input: the symmetric matrix (row-major, full); destroyed */
  readonly a: Float64Array;
  /** output: all eigenvalues ascending */
  readonly values: Float64Array;
  /** output: eigenvector j in vectors[j * n .. (j + 1) * n) for j < count */
  vectors: Float64Array;
  readonly diagonal: Float64Array;
  readonly offDiagonal: Float64Array;
  readonly reflectionNorm: Float64Array;
  readonly work: Float64Array;
  readonly u0: Float64Array;
  readonly u1: Float64Array;
  readonly u2: Float64Array;
  readonly multiplier: Float64Array;
  readonly swapped: Uint8Array;
  readonly x: Float64Array;
  /** largest inverse-iteration residual ||T y - lambda y|| of the last call */
  residual: number;
}

export function createPartialEigenWorkspace(capacity: number): PartialEigenWorkspace {
  const f = (): Float64Array => new Float64Array(capacity);
  return {
    capacity,
    a: new Float64Array(capacity * capacity),
    values: f(),
    vectors: new Float64Array(capacity),
    diagonal: f(),
    offDiagonal: f(),
    reflectionNorm: f(),
    work: f(),
    u0: f(),
    u1: f(),
    u2: f(),
    multiplier: f(),
    swapped: new Uint8Array(capacity),
    x: f(),
    residual: 0,
  };
}

/** Steps 1-2: reduce ws.a and compute all eigenvalues into ws.values (ascending). */
export function partialEigenvalues(ws: PartialEigenWorkspace, n: number): boolean {
  if (n > ws.capacity) throw new Error(`partialEigenvalues: n = ${n} exceeds the workspace capacity ${ws.capacity}`);
  const a = ws.a;
  const h = ws.reflectionNorm;
  const e = ws.offDiagonal;
  householderReduce(a, h, e, n);
  const d = ws.diagonal;
  for (let i = 0; i < n; i++) d[i] = a[i * n + i];
  // tql1 works on copies: the tridiagonal is needed again for inverse iteration.
  const v = ws.values;
  const w = ws.work;
  for (let i = 0; i < n; i++) {
    v[i] = d[i];
    w[i] = e[i];
  }
  const ok = n === 1 ? true : qlAfterReduction(null, v, w, n);
  // Insertion sort (no allocation; O(n^2) at worst, small against the O(n^3) reduction).
  insertionSortAscending(v, n);
  return ok;
}

/** Steps 3-4: the eigenvectors of the `count` lowest eigenvalues (after partialEigenvalues). */
export function partialEigenvectors(ws: PartialEigenWorkspace, n: number, count: number): void {
  if (ws.vectors.length < count * n) ws.vectors = new Float64Array(count * n);
  const out = ws.vectors;
  const d = ws.diagonal;
  const e = ws.offDiagonal; // e[i] = T_{i,i-1}
  let norm = 0;
  for (let i = 0; i < n; i++) {
    const r = Math.abs(d[i]) + Math.abs(e[i]) + (i + 1 < n ? Math.abs(e[i + 1]) : 0);
    if (r > norm) norm = r;
  }
  if (norm === 0) norm = 1;
  const eps = 2.220446049250313e-16;
  const clusterGap = 1e-3 * norm;
  let groupStart = 0;
  let previous = -Infinity;
  let worst = 0;
  for (let j = 0; j < count; j++) {
    let lambda = ws.values[j];
    if (lambda - ws.values[groupStart] > clusterGap || j === 0) groupStart = j;
    // Separate coincident eigenvalues slightly so that the factorisations differ.
    if (j > 0 && lambda - previous < 10 * eps * norm) lambda = previous + 10 * eps * norm;
    previous = lambda;
    factorShifted(ws, n, lambda, eps * norm);
    const x = ws.x;
    for (let i = 0; i < n; i++) x[i] = 1 + 0.3 * Math.sin(0.7 * i + 1.3 * j);
    for (let it = 0; it < 5; it++) {
      solveShifted(ws, n, x);
      // Orthogonalise against the previous vectors of the group (twice).
      for (let pass = 0; pass < 2; pass++) {
        for (let g = groupStart; g < j; g++) {
          let dot = 0;
          for (let i = 0; i < n; i++) dot += out[g * n + i] * x[i];
          for (let i = 0; i < n; i++) x[i] -= dot * out[g * n + i];
        }
      }
      let s = 0;
      for (let i = 0; i < n; i++) s += x[i] * x[i];
      const inv = 1 / Math.sqrt(s);
      for (let i = 0; i < n; i++) x[i] *= inv;
      // Residual of the normalised vector.
      let r2 = 0;
      for (let i = 0; i < n; i++) {
        let t = (d[i] - ws.values[j]) * x[i];
        if (i > 0) t += e[i] * x[i - 1];
        if (i + 1 < n) t += e[i + 1] * x[i + 1];
        r2 += t * t;
      }
      const res = Math.sqrt(r2);
      if (it >= 1 && res <= 1e3 * eps * norm) {
        if (res > worst) worst = res;
        break;
      }
      if (it === 4 && res > worst) worst = res;
    }
    for (let i = 0; i < n; i++) out[j * n + i] = x[i];
  }
  ws.residual = worst;
  // Back-transformation: x = Z y with Z = P_{n-1} ... P_1 (applied as in tred2's accumulation).
  const a = ws.a;
  const h = ws.reflectionNorm;
  for (let j = 0; j < count; j++) {
    const o = j * n;
    for (let m = 1; m < n; m++) {
      const hm = h[m];
      if (hm === 0) continue;
      const row = m * n;
      let g = 0;
      for (let k = 0; k < m; k++) g += a[row + k] * out[o + k];
      g /= hm;
      for (let k = 0; k < m; k++) out[o + k] -= g * a[row + k];
    }
  }
}

/** LU with partial pivoting of T - lambda I (tridiagonal); zero pivots replaced by `tiny`. */
function factorShifted(ws: PartialEigenWorkspace, n: number, lambda: number, tiny: number): void {
  const d = ws.diagonal;
  const e = ws.offDiagonal;
  const { u0, u1, u2, multiplier, swapped } = ws;
  let p0 = d[0] - lambda;
  let p1 = n > 1 ? e[1] : 0;
  for (let i = 0; i < n - 1; i++) {
    const sub = e[i + 1];
    const r1 = d[i + 1] - lambda;
    const r2 = i + 2 < n ? e[i + 2] : 0;
    if (Math.abs(p0) >= Math.abs(sub)) {
      if (p0 === 0) p0 = tiny;
      const m = sub / p0;
      u0[i] = p0;
      u1[i] = p1;
      u2[i] = 0;
      multiplier[i] = m;
      swapped[i] = 0;
      p0 = r1 - m * p1;
      p1 = r2;
    } else {
      const m = p0 / sub;
      u0[i] = sub;
      u1[i] = r1;
      u2[i] = r2;
      multiplier[i] = m;
      swapped[i] = 1;
      p0 = p1 - m * r1;
      p1 = -m * r2;
    }
  }
  u0[n - 1] = p0 === 0 ? tiny : p0;
}

/** Solve (T - lambda I) x = b in place with the factorisation of factorShifted. */
function solveShifted(ws: PartialEigenWorkspace, n: number, x: Float64Array): void {
  const { u0, u1, u2, multiplier, swapped } = ws;
  for (let i = 0; i < n - 1; i++) {
    if (swapped[i] === 1) {
      const t = x[i];
      x[i] = x[i + 1];
      x[i + 1] = t;
    }
    x[i + 1] -= multiplier[i] * x[i];
  }
  x[n - 1] /= u0[n - 1];
  if (n > 1) x[n - 2] = (x[n - 2] - u1[n - 2] * x[n - 1]) / u0[n - 2];
  for (let i = n - 3; i >= 0; i--) x[i] = (x[i] - u1[i] * x[i + 1] - u2[i] * x[i + 2]) / u0[i];
  // Rescale to avoid overflow (the growth is 1/|lambda - lambda_true|).
  let big = 0;
  for (let i = 0; i < n; i++) if (Math.abs(x[i]) > big) big = Math.abs(x[i]);
  if (big > 0) for (let i = 0; i < n; i++) x[i] /= big;
}
