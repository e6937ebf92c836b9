// All eigenvalues (and optionally eigenvectors) of a real symmetric tridiagonal matrix by the
// implicit QL algorithm with Wilkinson shifts: the tql1 / tql2 procedures of Bowdler,
// Martin, Reinsch & Wilkinson, Numer. Math. 11, 293 (1968) (Handbook for Automatic
// Computation II, contribution II/3), in the EISPACK form. Each QL sweep applies plane
// rotations from the bottom of the unreduced block upwards; the shift is the eigenvalue of
// the leading 2 x 2 block nearer to d[l], which gives cubic convergence for symmetric
// matrices (Golub & Van Loan, Matrix Computations, 4th ed., sec. 8.3.5). An off-diagonal
// element counts as zero once |e[m]| <= eps * max_(j <= l) (|d[j]| + |e[j]|).
//
// Accuracy: backward stable, every eigenvalue to about eps * ||T|| absolute. For a few
// eigenvalues of a matrix whose norm is far above them and with high relative accuracy,
// Sturm bisection (tridiagonalBisection.ts) is better.
//
// Layout: d[0..n-1] the diagonal, e[i] the coupling of rows i and i+1 (e[n-1] ignored, set
// to 0 on return). Everything happens in place: on return d holds the eigenvalues, NOT
// sorted. With z (n x n row-major, the identity on entry) the rotations are accumulated so
// that column j of z (z[k * n + j], k = 0..n-1) is the normalised eigenvector of d[j] (tql2);
// with z = null only eigenvalues are computed (tql1, O(n^2)). With vectorsInRows the same
// rotations act on rows instead (row j of z is the eigenvector of d[j], contiguous memory):
// the site spectrum (solver/site/fullSpectrum.ts) wants its eigenvectors as rows, and the
// dense solver (solver/cluster/symmetricEigen.ts) keeps its Householder basis transposed so
// that its inner loops run over contiguous memory; one QL serves both layouts, the layout
// test sitting outside the k loop (one branch per rotation).
//
// Hot path: the site problem of the solver calls this once per site update, so it allocates
// nothing and returns a plain boolean instead of a result object.

/** Iterations allowed per eigenvalue before the routine reports failure (EISPACK uses 30). */
export const qlIterationLimit = 60;

/**
 * Implicit QL with Wilkinson shifts on d, e (length >= n) in place; see the file header.
 * z (n x n, the starting basis) receives the rotations on its columns, or on its rows when
 * vectorsInRows is true.
 * Returns false when an eigenvalue needed more than qlIterationLimit iterations (d, e, z
 * then hold a partial result and must not be used).
 */
export function tridiagonalQl(
  d: Float64Array,
  e: Float64Array,
  n: number,
  z: Float64Array | null,
  vectorsInRows = false,
): boolean {
  const eps = 2.220446049250313e-16;
  let f = 0;
  let tst1 = 0;
  for (let l = 0; l < n; l++) {
    const t = Math.abs(d[l]) + Math.abs(e[l]);
    if (t > tst1) tst1 = t;
    let m = l;
    while (m < n - 1 && Math.abs(e[m]) > eps * tst1) m++;
    if (m > l) {
      let iter = 0;
      do {
        if (++iter > qlIterationLimit) return false;
        // Wilkinson shift from the leading 2 x 2 block of the unreduced part.
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
        // Implicit QL sweep from the bottom of the block up to row l.
        p = d[m];
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1];
        let sn = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = sn;
          g = c * e[i];
          h = c * p;
          r = Math.sqrt(p * p + e[i] * e[i]);
          e[i + 1] = sn * r;
          sn = e[i] / r;
          c = p / r;
          p = c * d[i] - sn * g;
          d[i + 1] = h + sn * (c * g + sn * d[i]);
          if (z !== null) {
            if (vectorsInRows) {
              // the same rotation on rows i and i + 1 (contiguous memory)
              const ri = i * n;
              const rj = ri + n;
              for (let k = 0; k < n; k++) {
                h = z[rj + k];
                z[rj + k] = sn * z[ri + k] + c * h;
                z[ri + k] = c * z[ri + k] - sn * h;
              }
            } else {
              // accumulate the rotation on columns i and i + 1 of every row k
              for (let k = 0; k < n; k++) {
                const zk = k * n;
                h = z[zk + i + 1];
                z[zk + i + 1] = sn * z[zk + i] + c * h;
                z[zk + i] = c * z[zk + i] - sn * h;
              }
            }
          }
        }
        p = (-sn * s2 * c3 * el1 * e[l]) / dl1;
        e[l] = sn * p;
        d[l] = c * p;
      } while (Math.abs(e[l]) > eps * tst1);
    }
    d[l] += f;
    e[l] = 0;
  }
  return true;
}

/** Eigenpairs of a symmetric tridiagonal matrix, eigenvalues ascending. */
export interface TridiagonalEigensystem {
  /** Eigenvalues in ascending order. */
  eigenvalues: Float64Array;
  /** Row j (vectors[j * n + k], k = 0..n-1) is the normalised eigenvector of eigenvalues[j]; null when not asked for. */
  vectors: Float64Array | null;
  /** False when the QL iteration did not converge (then the arrays are NaN). */
  converged: boolean;
}

/**
 * Convenience form of tridiagonalQl for callers off the hot path: copies the input, sorts
 * the eigenvalues ascending and returns eigenvectors as rows.
 * @param diag diagonal, n entries
 * @param off couplings between rows i and i+1, n - 1 entries
 */
export function tridiagonalEigensystem(
  diag: Float64Array,
  off: Float64Array,
  options: { vectors?: boolean } = {},
): TridiagonalEigensystem {
  const n = diag.length;
  if (n < 1) throw new RangeError('tridiagonalEigensystem diag: expected at least one diagonal entry, got none');
  if (off.length !== n - 1) {
    throw new RangeError(`tridiagonalEigensystem off: expected ${n - 1} couplings for ${n} diagonal entries, got ${off.length}`);
  }
  const d = Float64Array.from(diag);
  const e = new Float64Array(n);
  e.set(off);
  const wantVectors = options.vectors ?? false;
  const z = wantVectors ? new Float64Array(n * n) : null;
  if (z !== null) for (let i = 0; i < n; i++) z[i * n + i] = 1;
  if (!tridiagonalQl(d, e, n, z)) {
    return { eigenvalues: new Float64Array(n).fill(NaN), vectors: wantVectors ? new Float64Array(n * n).fill(NaN) : null, converged: false };
  }
  const order = Array.from({ length: n }, (_, j) => j).sort((a, b) => d[a] - d[b]);
  const eigenvalues = Float64Array.from(order, (j) => d[j]);
  let vectors: Float64Array | null = null;
  if (z !== null) {
    vectors = new Float64Array(n * n);
    order.forEach((j, row) => {
      for (let k = 0; k < n; k++) vectors![row * n + k] = z[k * n + j];
    });
  }
  return { eigenvalues, vectors, converged: true };
}
