// The invariant subspace of the k lowest eigenvalues of a real symmetric tridiagonal matrix T
// (diagonal d, coupling e_i between rows i and i+1), as k orthonormal vectors, with the
// (k+1)-th eigenvalue so the caller can check that the subspace is separated from the rest.
//
// Eigenvalues: Sturm bisection (as in tridiagonalBisection.ts, with the counts shared among
// the wanted indices). Vectors: inverse iteration
// (Golub & Van Loan, Matrix Computations, 4th ed., sec. 8.2.2) on T - lambda_j I factored by
// Gaussian elimination with partial pivoting (the band LU of LAPACK's dlagtf/dlagts: U has
// two super-diagonals), and each result orthogonalised (modified Gram-Schmidt, twice) against
// the vectors already found, as LAPACK's dstein does for clustered eigenvalues.
// The lowest band of a long lattice is such a cluster: k eigenvalues within 4J. Inside a
// cluster the individual vectors may be any rotation of the true eigenvectors; their span,
// which is all the caller uses, converges at the rate |lambda_k - lambda_j| /
// |lambda_(k+1) - lambda_j| per step, i.e. as fast as the gap above the cluster allows.
//
// The residual ||T V - V (V^T T V)||_max is returned so that callers can refuse a subspace
// that did not converge.

export interface LowestSubspace {
  /** k orthonormal vectors of length n, vector j at [j * n, (j + 1) * n) */
  vectors: Float64Array;
  /** the k lowest eigenvalues, ascending */
  eigenvalues: Float64Array;
  /** the (k+1)-th eigenvalue (NaN when k = n) */
  nextEigenvalue: number;
  /** V^T T V, k x k row-major (symmetric) */
  projected: Float64Array;
  /** max |T V - V (V^T T V)| over all entries */
  residual: number;
}

/** Multiplies T by x into y. */
function multiply(diag: Float64Array, off: Float64Array, x: Float64Array, y: Float64Array): void {
  const n = diag.length;
  for (let i = 0; i < n; i++) {
    let s = diag[i] * x[i];
    if (i > 0) s += off[i - 1] * x[i - 1];
    if (i + 1 < n) s += off[i] * x[i + 1];
    y[i] = s;
  }
}

/**
 * Factor T - lambda I with partial pivoting: row k of U is (u0[k], u1[k], u2[k]) at columns
 * (k, k+1, k+2); multiplier[k] and swapped[k] record the elimination of row k+1.
 */
function factor(
  diag: Float64Array,
  off: Float64Array,
  lambda: number,
  u0: Float64Array,
  u1: Float64Array,
  u2: Float64Array,
  multiplier: Float64Array,
  swapped: Uint8Array,
  tiny: number,
): void {
  const n = diag.length;
  let p = diag[0] - lambda;
  let q = n > 1 ? off[0] : 0;
  let r = 0;
  for (let k = 0; k < n - 1; k++) {
    const c = off[k];
    const a = diag[k + 1] - lambda;
    const b = k + 1 < n - 1 ? off[k + 1] : 0;
    // The pending row (p, q, r) and the next row (c, a, b): the one with the larger leading
    // entry becomes row k of U, the other is eliminated against it and stays pending.
    const swap = Math.abs(c) > Math.abs(p);
    if (!swap && p === 0) p = tiny;
    const pivot0 = swap ? c : p;
    const pivot1 = swap ? a : q;
    const pivot2 = swap ? b : r;
    const rest0 = swap ? p : c;
    const rest1 = swap ? q : a;
    const rest2 = swap ? r : b;
    u0[k] = pivot0;
    u1[k] = pivot1;
    u2[k] = pivot2;
    const m = rest0 / pivot0;
    multiplier[k] = m;
    swapped[k] = swap ? 1 : 0;
    p = rest1 - m * pivot1;
    q = rest2 - m * pivot2;
    r = 0;
  }
  u0[n - 1] = p === 0 ? tiny : p;
  u1[n - 1] = 0;
  u2[n - 1] = 0;
}

/** Solves (T - lambda I) x = rhs in place with the factors of `factor`. */
function solve(
  u0: Float64Array,
  u1: Float64Array,
  u2: Float64Array,
  multiplier: Float64Array,
  swapped: Uint8Array,
  x: Float64Array,
  tiny: number,
): void {
  const n = x.length;
  for (let k = 0; k < n - 1; k++) {
    if (swapped[k]) {
      const t = x[k];
      x[k] = x[k + 1];
      x[k + 1] = t;
    }
    x[k + 1] -= multiplier[k] * x[k];
  }
  for (let k = n - 1; k >= 0; k--) {
    let s = x[k];
    if (k + 1 < n) s -= u1[k] * x[k + 1];
    if (k + 2 < n) s -= u2[k] * x[k + 2];
    const pivot = Math.abs(u0[k]) < tiny ? (u0[k] < 0 ? -tiny : tiny) : u0[k];
    x[k] = s / pivot;
  }
}

/** Removes from v its components along vectors 0..count-1 (twice, for stability) and normalises it. */
function orthonormalise(vectors: Float64Array, count: number, v: Float64Array): number {
  const n = v.length;
  for (let pass = 0; pass < 2; pass++) {
    for (let j = 0; j < count; j++) {
      let dot = 0;
      const base = j * n;
      for (let i = 0; i < n; i++) dot += vectors[base + i] * v[i];
      for (let i = 0; i < n; i++) v[i] -= dot * vectors[base + i];
    }
  }
  let norm = 0;
  for (let i = 0; i < n; i++) norm += v[i] * v[i];
  norm = Math.sqrt(norm);
  if (norm > 0) for (let i = 0; i < n; i++) v[i] /= norm;
  return norm;
}

/**
 * The k + 1 lowest eigenvalues by Sturm bisection (to adjacent doubles), sharing every count
 * among all wanted indices: a count c at x bounds eigenvalues 0..c-1 from above and c.. from
 * below, so the early halvings of the common interval are paid once, not k times.
 */
function lowestEigenvalues(diag: Float64Array, off: Float64Array, count: number): Float64Array {
  const n = diag.length;
  let lo0 = Infinity;
  let hi0 = -Infinity;
  const offSquared = new Float64Array(Math.max(0, n - 1));
  for (let i = 0; i < n; i++) {
    const r = (i > 0 ? Math.abs(off[i - 1]) : 0) + (i < n - 1 ? Math.abs(off[i]) : 0);
    lo0 = Math.min(lo0, diag[i] - r);
    hi0 = Math.max(hi0, diag[i] + r);
    if (i < n - 1) offSquared[i] = off[i] * off[i];
  }
  const pad = 1e-12 * Math.max(1, Math.abs(lo0), Math.abs(hi0));
  const lo = new Float64Array(count).fill(lo0 - pad);
  const hi = new Float64Array(count).fill(hi0 + pad);
  const tiny = Number.EPSILON * Number.EPSILON;
  const below = (x: number): number => {
    let c = 0;
    let p = diag[0] - x;
    if (p === 0) p = -tiny;
    if (p < 0) c++;
    for (let i = 1; i < n; i++) {
      p = diag[i] - x - offSquared[i - 1] / p;
      if (p === 0) p = -tiny;
      if (p < 0) c++;
    }
    return c;
  };
  const out = new Float64Array(count);
  for (let j = 0; j < count; j++) {
    // Invariant: count(lo[j]) <= j < count(hi[j]).
    for (let iteration = 0; iteration < 200; iteration++) {
      const mid = 0.5 * (lo[j] + hi[j]);
      if (mid <= lo[j] || mid >= hi[j]) break;
      const c = below(mid);
      for (let i = j; i < count; i++) {
        if (c > i) {
          if (mid < hi[i]) hi[i] = mid;
        } else if (mid > lo[i]) lo[i] = mid;
      }
    }
    out[j] = 0.5 * (lo[j] + hi[j]);
  }
  return out;
}

/**
 * The k lowest eigenpairs' subspace of T (see the file header). `iterations` inverse-iteration
 * solves per vector: with the shift at the bisected eigenvalue, two are plenty when the gap
 * above the cluster is a few times its width; the vectors are orthonormalised after the last.
 */
export function tridiagonalLowestSubspace(diag: Float64Array, off: Float64Array, k: number, iterations = 2): LowestSubspace {
  const n = diag.length;
  if (!Number.isInteger(k) || k < 1 || k > n) throw new RangeError(`subspace size must be an integer in [1, ${n}], got ${k}`);
  if (off.length < n - 1) throw new RangeError(`off-diagonal needs ${n - 1} entries, got ${off.length}`);
  let scale = 0;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(diag[i]) + 2 * Math.abs(i < n - 1 ? off[i] : 0));
  const tiny = Number.EPSILON * Math.max(scale, 1);
  const all = lowestEigenvalues(diag, off, Math.min(n, k + 1));
  const eigenvalues = all.slice(0, k);
  const nextEigenvalue = k < n ? all[k] : Number.NaN;

  const vectors = new Float64Array(k * n);
  const u0 = new Float64Array(n);
  const u1 = new Float64Array(n);
  const u2 = new Float64Array(n);
  const multiplier = new Float64Array(n);
  const swapped = new Uint8Array(n);
  const v = new Float64Array(n);
  // Deterministic start vectors (a fixed linear congruential sequence, Numerical Recipes'
  // constants): every vector gets components along the whole cluster.
  let seed = 12345;
  for (let j = 0; j < k; j++) {
    factor(diag, off, eigenvalues[j], u0, u1, u2, multiplier, swapped, tiny);
    for (let i = 0; i < n; i++) {
      seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0;
      v[i] = seed / 4294967296 - 0.5;
    }
    for (let it = 0; it < iterations; it++) {
      solve(u0, u1, u2, multiplier, swapped, v, tiny);
      // Rescale between solves (each multiplies the wanted component by ~1/rounding error).
      let m = 0;
      for (let i = 0; i < n; i++) m = Math.max(m, Math.abs(v[i]));
      for (let i = 0; i < n; i++) v[i] /= m;
    }
    orthonormalise(vectors, j, v);
    vectors.set(v, j * n);
  }

  // Rayleigh quotient matrix and residual of the subspace.
  const projected = new Float64Array(k * k);
  const tv = new Float64Array(k * n);
  for (let j = 0; j < k; j++) multiply(diag, off, vectors.subarray(j * n, (j + 1) * n), tv.subarray(j * n, (j + 1) * n));
  for (let a = 0; a < k; a++) {
    for (let b = a; b < k; b++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += vectors[a * n + i] * tv[b * n + i];
      projected[a * k + b] = s;
      projected[b * k + a] = s;
    }
  }
  let residual = 0;
  for (let b = 0; b < k; b++) {
    for (let i = 0; i < n; i++) {
      let s = tv[b * n + i];
      for (let a = 0; a < k; a++) s -= vectors[a * n + i] * projected[a * k + b];
      if (Math.abs(s) > residual) residual = Math.abs(s);
    }
  }
  return { vectors, eigenvalues, nextEigenvalue, projected, residual };
}
