// Selected eigenpairs of a real symmetric tridiagonal matrix T (diagonal d_0..d_(n-1),
// coupling e_i between rows i and i+1): the index-th eigenvalue and its eigenvector.
//
// Eigenvalues: Sturm-sequence bisection (Givens; Golub & Van Loan, Matrix Computations, 4th
// ed., sec. 8.4.1). The pivots of the LDL^T factorisation of T - x I,
//     p_0 = d_0 - x,   p_i = d_i - x - e_(i-1)^2 / p_(i-1),
// contain as many negative values as T has eigenvalues below x (Sylvester's law of inertia), so
// the k-th eigenvalue is found by bisection on that count, to the last bit.
// Eigenvector: inverse iteration (Golub & Van Loan sec. 8.2.2): solve (T - lambda I) x = b
// twice by tridiagonal elimination and normalise.
//
// When to use this and when the implicit QL of tridiagonalQl.ts: QL gives all n eigenpairs
// at once, each to about eps * ||T|| absolute. Bisection costs O(n) per step for one
// eigenvalue and, for the low eigenvalues of the plane-wave Hamiltonian of a deep lattice
// (||T|| ~ (2L)^2 ~ 1000 E_r, lowest band width ~ 1e-9 E_r), is far more accurate: measured
// against each other on that matrix, QL moves E_0(q) by up to 1e-12 E_r, which moved the
// hopping at 190 E_r by 8e-4 relative and raised the aliasing noise floor of J_n from 2e-15
// to 9e-14 E_r (bandStructure.ts, latticeAxis.ts). Hence the band structure uses bisection
// and the site problem (small n, all states needed) uses QL.
//
// Why not ml-matrix's dense EigenvalueDecomposition: it gives the same numbers (checked in
// test/physics/bands.test.ts and test/numerics/tridiagonal.test.ts) but is O(n^3) per
// quasi-momentum and costs ~100 ms of JIT warm-up on the first call of a run, beyond the budget
// of one Hubbard calculation. Only the two lowest bands are needed.

/** Number of eigenvalues of T strictly below x. */
export function sturmCount(diag: Float64Array, off: Float64Array, x: number): number {
  const n = diag.length;
  let count = 0;
  let p = diag[0]! - x;
  // A zero pivot is replaced by a tiny negative number of the size of the rounding error; this
  // perturbs T by far less than its own round-off and keeps the count consistent.
  const tiny = Number.EPSILON * Number.EPSILON;
  if (p === 0) p = -tiny;
  if (p < 0) count++;
  for (let i = 1; i < n; i++) {
    const e = off[i - 1]!;
    p = diag[i]! - x - (e * e) / p;
    if (p === 0) p = -tiny;
    if (p < 0) count++;
  }
  return count;
}

/** Gershgorin interval containing all eigenvalues. */
function gershgorin(diag: Float64Array, off: Float64Array): { lo: number; hi: number } {
  const n = diag.length;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const r = (i > 0 ? Math.abs(off[i - 1]!) : 0) + (i < n - 1 ? Math.abs(off[i]!) : 0);
    lo = Math.min(lo, diag[i]! - r);
    hi = Math.max(hi, diag[i]! + r);
  }
  return { lo, hi };
}

/** The index-th smallest eigenvalue (index 0 = lowest) by bisection to full precision. */
export function tridiagonalEigenvalue(diag: Float64Array, off: Float64Array, index: number): number {
  const n = diag.length;
  if (!Number.isInteger(index) || index < 0 || index >= n) {
    throw new RangeError(`eigenvalue index must be an integer in [0, ${n - 1}], got ${index}`);
  }
  let { lo, hi } = gershgorin(diag, off);
  const pad = 1e-12 * Math.max(1, Math.abs(lo), Math.abs(hi));
  lo -= pad;
  hi += pad;
  // Invariant: count(lo) <= index < count(hi).
  for (let iteration = 0; iteration < 200; iteration++) {
    const mid = 0.5 * (lo + hi);
    if (mid <= lo || mid >= hi) break; // adjacent doubles: done
    if (sturmCount(diag, off, mid) > index) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * Normalised eigenvector for an eigenvalue computed by tridiagonalEigenvalue, written to out.
 * The eigenvalue must be simple and separated from its neighbours (true for the lowest band of
 * a lattice with depth > 0). Sign: sum of components >= 0.
 */
export function tridiagonalEigenvector(
  diag: Float64Array,
  off: Float64Array,
  eigenvalue: number,
  out: Float64Array,
): void {
  const n = diag.length;
  let scale = 1;
  for (let i = 0; i < n; i++) scale = Math.max(scale, Math.abs(diag[i]!));
  const tiny = Number.EPSILON * scale;
  const pivot = new Float64Array(n);
  const upper = new Float64Array(n);
  out.fill(1);
  for (let sweep = 0; sweep < 3; sweep++) {
    // Forward elimination of (T - lambda I) x = out, no pivoting: T - lambda_0 I is positive
    // semi-definite for the lowest eigenvalue, and a pivot that rounds to zero is replaced by the
    // size of the rounding error (the usual inverse-iteration safeguard).
    let p = diag[0]! - eigenvalue;
    if (Math.abs(p) < tiny) p = tiny;
    pivot[0] = p;
    for (let i = 1; i < n; i++) {
      const e = off[i - 1]!;
      const factor = e / pivot[i - 1]!;
      upper[i - 1] = e;
      out[i] = out[i]! - factor * out[i - 1]!;
      p = diag[i]! - eigenvalue - factor * e;
      if (Math.abs(p) < tiny) p = tiny;
      pivot[i] = p;
    }
    out[n - 1] = out[n - 1]! / pivot[n - 1]!;
    for (let i = n - 2; i >= 0; i--) out[i] = (out[i]! - upper[i]! * out[i + 1]!) / pivot[i]!;
    let norm = 0;
    for (let i = 0; i < n; i++) norm += out[i]! * out[i]!;
    norm = Math.sqrt(norm);
    for (let i = 0; i < n; i++) out[i] = out[i]! / norm;
  }
  let sum = 0;
  for (let i = 0; i < n; i++) sum += out[i]!;
  if (sum < 0) for (let i = 0; i < n; i++) out[i] = -out[i]!;
}
