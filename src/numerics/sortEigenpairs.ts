// Ascending order for an eigensystem whose eigenvectors are stored as rows: the last step of
// the dense cluster solver (solver/cluster/symmetricEigen.ts) and of the site spectrum
// (solver/site/fullSpectrum.ts). Selection sort, in place and allocation-free, because both
// callers sit on repeated-solve paths with n at most a few dozen, where n^2 comparisons and
// at most n - 1 row swaps cost nothing next to the O(n^3) diagonalisation before it.
// Equal eigenvalues keep their first-found order (strict < comparison), so the rows of a
// degenerate level come out in a fixed, reproducible order.

/**
 * Sort values[0..n-1] ascending and move row j of rows (rows[j * n + c], c = 0..n-1) along
 * with values[j].
 */
export function sortEigenpairsAscending(values: Float64Array, rows: Float64Array, n: number): void {
  for (let i = 0; i < n - 1; i++) {
    let k = i;
    let p = values[i];
    for (let j = i + 1; j < n; j++) {
      if (values[j] < p) {
        k = j;
        p = values[j];
      }
    }
    if (k !== i) {
      values[k] = values[i];
      values[i] = p;
      for (let c = 0; c < n; c++) {
        const t = rows[i * n + c];
        rows[i * n + c] = rows[k * n + c];
        rows[k * n + c] = t;
      }
    }
  }
}
