// Scratch memory of the single-site Gutzwiller problem (DESIGN.md section 1):
//
//   H = sum_n [ U n(n-1)/2 - muLocal n ] |n><n|  -  psi (b^+ + b),     n = 0 .. nmax,
//
// with muLocal = mu - eps_i and psi = sum_j J_ij phi_j the mean field of the neighbours
// (real, >= 0 without gauge fields). In the occupation basis H is real symmetric
// tridiagonal: diagonal a_n = U n(n-1)/2 - muLocal n, off-diagonal e_n = -psi sqrt(n+1).
//
// Every solver of this folder works in one preallocated workspace: no allocation per call.
// Scalar results (phi of the last solve) are written to fields of the workspace instead of
// being returned: V8 boxes a double returned from, or passed to, a function it does not
// inline, and the sweep kernel calls these solvers once per site.

/**
 * Largest Fock space for which the division-free polynomial paths are used (ground state
 * by leading/trailing determinants, thermal couplings by Hellmann-Feynman on the
 * characteristic polynomial): products of up to 17 factors |a_k - lambda| (at most ~1e5 in
 * any sensible unit) stay far inside double range.
 */
export const POLYNOMIAL_PATH_MAX_STATES = 17;

/** Replacement for an exactly zero pivot (the twisted factorisation stays finite). */
export const TINY_PIVOT = 1e-300;

export class SiteWorkspace {
  /** nmax + 1 */
  readonly states: number;
  readonly nmax: number;
  /** sqrt(n + 1), n = 0..nmax (bosonic matrix elements) */
  readonly sqrtUp: Float64Array;
  /** diagonal a_n of the last site matrix */
  readonly diag: Float64Array;
  /** squared off-diagonals e_n^2 = psi^2 (n + 1) (the last entry is unused) */
  readonly offSq: Float64Array;
  /** ground path: leading determinants (polynomial path) or inverse top-down pivots */
  readonly pivotsTop: Float64Array;
  /** ground path: trailing determinants (polynomial path) or inverse bottom-up pivots */
  readonly pivotsBottom: Float64Array;
  /** ground path: first and second lambda-derivatives of the leading determinants */
  readonly leadSlope: Float64Array;
  readonly leadCurvature: Float64Array;
  /** ground-state amplitudes c_n (normalised) after a ground-state solve */
  readonly amplitudes: Float64Array;
  /** eigenvalues: [0] the ground energy (T = 0); the ascending spectrum (T > 0) */
  readonly eigenvalues: Float64Array;
  /** full spectrum: row k = eigenvector k */
  readonly eigenvectors: Float64Array;
  /** off-diagonal work vector of the QL iteration */
  readonly qlOff: Float64Array;
  /** thermal case: populations p_n = <n|rho|n> (also scratch of other paths) */
  readonly populations: Float64Array;
  /** thermal path: <j|b|j> for each eigenvalue j (same order as eigenvalues) */
  readonly couplings: Float64Array;
  /** phi = <b> of the last in-place solve */
  phi: number;

  constructor(nmax: number) {
    if (!Number.isInteger(nmax) || nmax < 1) throw new RangeError(`nmax: expected an integer >= 1, got ${nmax}`);
    const states = nmax + 1;
    this.states = states;
    this.nmax = nmax;
    this.sqrtUp = new Float64Array(states);
    for (let n = 0; n < states; n++) this.sqrtUp[n] = Math.sqrt(n + 1);
    this.diag = new Float64Array(states);
    this.offSq = new Float64Array(states);
    this.pivotsTop = new Float64Array(states);
    this.pivotsBottom = new Float64Array(states);
    this.leadSlope = new Float64Array(states);
    this.leadCurvature = new Float64Array(states);
    this.amplitudes = new Float64Array(states);
    this.eigenvalues = new Float64Array(states);
    this.eigenvectors = new Float64Array(states * states);
    this.qlOff = new Float64Array(states);
    this.populations = new Float64Array(states);
    this.couplings = new Float64Array(states);
    this.phi = NaN;
  }
}

export function createSiteWorkspace(nmax: number): SiteWorkspace {
  return new SiteWorkspace(nmax);
}
