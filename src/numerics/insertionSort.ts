// Ascending sort of the first n entries of a Float64Array in place, by insertion. For the
// short lists sorted over and over on paths that must not allocate: the 8 neighbours of a
// pixel whose median replaces a hot pixel (imaging/camera/hotPixels.ts) and the eigenvalues
// of a reduced cluster matrix (solver/cluster/partialSymmetricEigen.ts) and of a site matrix on the
// thermal path without eigenvectors (solver/site/thermalCouplings.ts). Insertion sort does
// n^2 / 4 moves on average, nothing next to the work around its callers, and leaves the
// tail beyond n untouched (capacity-sized buffers). Callers pass finite values: a NaN (every
// comparison with it false) would stay where it is and split the list into two sorted runs.

/** Sort values[0..n-1] ascending in place. */
export function insertionSortAscending(values: Float64Array, n: number): void {
  for (let i = 1; i < n; i++) {
    const v = values[i];
    let j = i - 1;
    while (j >= 0 && values[j] > v) {
      values[j + 1] = values[j];
      j--;
    }
    values[j + 1] = v;
  }
}
