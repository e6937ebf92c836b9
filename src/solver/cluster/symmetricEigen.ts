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
  const ok = tridiagonalQl(a, d, e, n);
  // Rows hold the eigenvectors; sort ascending.
  for (let i = 0; i < n - 1; i++) {
    let k = i;
    let p = d[i];
    for (let j = i + 1; j < n; j++) {
      if (d[j] < p) {
        k = j;
        p = d[j];
      }
    }
    if (k !== i) {
      d[k] = d[i];
      d[i] = p;
      for (let c = 0; c < n; c++) {
        const t = a[i * n + c];
        a[i * n + c] = a[k * n + c];
        a[k * n + c] = t;
      }
    }
  }
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
 * tql2 on (d, e) with e[i] the subdiagonal element between i-1 and i; rotates the rows of
 * a (the columns of Z). With a = null only the eigenvalues are computed (tql1), unsorted.
 */
export function tridiagonalQl(a: Float64Array | null, d: Float64Array, e: Float64Array, n: number): boolean {
  for (let i = 1; i < n; i++) e[i - 1] = e[i];
  e[n - 1] = 0;
  const eps = 2.220446049250313e-16;
  let f = 0;
  let tst1 = 0;
  let ok = true;
  for (let l = 0; l < n; l++) {
    const t = Math.abs(d[l]) + Math.abs(e[l]);
    if (t > tst1) tst1 = t;
    let m = l;
    while (m < n - 1 && Math.abs(e[m]) > eps * tst1) m++;
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > 60) {
          ok = false;
          break;
        }
        let g = d[l];
        let p = (d[l + 1] - g) / (2 * e[l]);
        let r = Math.sqrt(p * p + 1);
        if (p < 0) r = -r;
        d[l] = e[l] / (p + r);
        d[l + 1] = e[l] * (p + r);
        const dl1 = d[l + 1];
        let h = g - d[l];
        for (let i = l + 2; i < n; i++) d[i] -= h;
        f += h;
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i];
          h = c * p;
          r = Math.sqrt(p * p + e[i] * e[i]); // no overflow at Hamiltonian scales
          e[i + 1] = s * r;
          s = e[i] / r;
          c = p / r;
          p = c * d[i] - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]);
          if (a === null) continue;
          const ri = i * n;
          const rj = ri + n;
          for (let k = 0; k < n; k++) {
            h = a[rj + k];
            a[rj + k] = s * a[ri + k] + c * h;
            a[ri + k] = c * a[ri + k] - s * h;
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = s * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] += f;
    e[l] = 0;
  }
  return ok;
}
