// The single-site Gutzwiller problem of the Bose-Hubbard model (DESIGN.md section 1):
//
//   H = sum_n [ U n(n-1)/2 - muLocal n ] |n><n|  -  psi (b^+ + b),     n = 0 .. nmax,
//
// with muLocal = mu - eps_i and psi = sum_j J_ij phi_j the mean field of the neighbours
// (real, >= 0 without gauge fields). In the occupation basis H is real symmetric
// tridiagonal: diagonal a_n = U n(n-1)/2 - muLocal n, off-diagonal e_n = -psi sqrt(n+1).
//
// Ground state (T = 0)
//   The lowest eigenvalue is found with Laguerre's method on det(H - lambda), evaluated
//   through the LDL^T pivots d_k(lambda) (Sturm sequence in ratio form, no overflow):
//   for a polynomial with only real zeros, Laguerre started left of the smallest zero
//   converges monotonically and cubically to it (Wilkinson, The Algebraic Eigenvalue
//   Problem, 1965, section 7.10; Parlett, The Symmetric Eigenvalue Problem, 1998).
//   A start that is guaranteed to lie below the smallest eigenvalue comes from
//   Gershgorin's theorem or, in a sweep, from Weyl's inequality applied to the previous
//   solution of the same site (see `weylLowerBound`).
//   The eigenvector comes from a twisted factorisation (Dhillon & Parlett, Linear Algebra
//   Appl. 387, 1 (2004)): top-down and bottom-up pivots, the twist index r where
//   |gamma_r| is smallest (the largest component), then outward recurrences that only
//   ever run toward decaying components. With psi > 0 all off-diagonals are negative, so
//   every component of the ground state is positive (Perron-Frobenius) and no
//   cancellation occurs.
//
// Thermal state (T > 0)
//   Full eigendecomposition by the implicit QL algorithm with Wilkinson shifts on the
//   tridiagonal matrix with accumulated rotations (Bowdler, Martin, Reinsch & Wilkinson,
//   Numer. Math. 11, 293 (1968), the tql2 procedure), then Boltzmann averages.
//
// Everything works on a preallocated workspace: no allocation per call.

export interface SiteWorkspace {
  /** nmax + 1 */
  readonly states: number;
  readonly nmax: number;
  /** sqrt(n + 1), n = 0..nmax-1 (bosonic matrix elements) */
  readonly sqrtUp: Float64Array;
  readonly diag: Float64Array;
  /** squared off-diagonals e_n^2 */
  readonly offSq: Float64Array;
  readonly pivotsTop: Float64Array;
  readonly pivotsBottom: Float64Array;
  /** ground-state amplitudes c_n (normalised) after solveSiteGround */
  readonly amplitudes: Float64Array;
  /** thermal case: eigenvalues and eigenvectors (row k = eigenvector k) */
  readonly eigenvalues: Float64Array;
  readonly eigenvectors: Float64Array;
  readonly qlOff: Float64Array;
  /** thermal case: populations p_n = <n|rho|n> */
  readonly populations: Float64Array;
  /** result slot: [phi] of the last in-place solve (avoids boxing a returned double) */
  readonly result: Float64Array;
  /**
   * argument slots of groundFromArgs: [U, muLocal, psi, lowerBound, estimate, start,
   * minDiag]. Doubles passed to a function V8 does not inline are boxed on the heap; the
   * sweep kernel passes them through this array instead.
   */
  readonly args: Float64Array;
  /** thermal path: <j|b|j> for each eigenvalue j (same order as eigenvalues) */
  readonly couplings: Float64Array;
  /** ground path: first and second lambda-derivatives of the leading determinants */
  readonly leadSlope: Float64Array;
  readonly leadCurvature: Float64Array;
}

export function createSiteWorkspace(nmax: number): SiteWorkspace {
  if (!Number.isInteger(nmax) || nmax < 1) throw new Error(`nmax: expected an integer >= 1, got ${nmax}`);
  const states = nmax + 1;
  const sqrtUp = new Float64Array(states);
  for (let n = 0; n < states; n++) sqrtUp[n] = Math.sqrt(n + 1);
  return {
    states,
    nmax,
    sqrtUp,
    diag: new Float64Array(states),
    offSq: new Float64Array(states),
    pivotsTop: new Float64Array(states),
    pivotsBottom: new Float64Array(states),
    amplitudes: new Float64Array(states),
    eigenvalues: new Float64Array(states),
    eigenvectors: new Float64Array(states * states),
    qlOff: new Float64Array(states),
    populations: new Float64Array(states),
    result: new Float64Array(2),
    args: new Float64Array(8),
    couplings: new Float64Array(states),
    leadSlope: new Float64Array(states),
    leadCurvature: new Float64Array(states),
  };
}

/** Observables of one site; filled in place by the solvers below. */
export interface SiteObservables {
  /** ground-state energy (T = 0) or -kT ln Z (T > 0) of the single-site Hamiltonian */
  energy: number;
  /** <b> */
  phi: number;
  /** <n> */
  density: number;
  /** <n^2> */
  densitySq: number;
  /** probability of an odd occupation, sum over odd n of p_n */
  parityOdd: number;
  /** weight on the truncation state |nmax> */
  topWeight: number;
  /** von Neumann entropy of the site state in units of k_B (0 at T = 0) */
  entropy: number;
}

export function createSiteObservables(): SiteObservables {
  return { energy: 0, phi: 0, density: 0, densitySq: 0, parityOdd: 0, topWeight: 0, entropy: 0 };
}

const TINY_PIVOT = 1e-300;

function fillDiagonal(ws: SiteWorkspace, interactionU: number, muLocal: number, psi: number): void {
  const { diag, offSq, sqrtUp, states } = ws;
  const psiSq = psi * psi;
  for (let n = 0; n < states; n++) {
    diag[n] = 0.5 * interactionU * n * (n - 1) - muLocal * n;
    offSq[n] = psiSq * (n + 1); // e_n^2 = psi^2 (n+1); the last entry is unused
  }
  void sqrtUp;
}

/**
 * Norm of the truncated b + b^+ (largest eigenvalue of the truncated position operator of
 * a harmonic oscillator, bounded by 2 sqrt(nmax)). Used in Weyl's bound below.
 */
export function couplingNormBound(nmax: number): number {
  return 2 * Math.sqrt(nmax);
}

/**
 * A value guaranteed to lie below the ground energy of the site Hamiltonian at
 * (muLocal, psi), given its ground energy `previousEnergy` at (muLocalPrev, psiPrev):
 * by Weyl's inequality lambda_min(A + E) >= lambda_min(A) - ||E||_2, with
 * ||E|| <= |psi - psiPrev| ||b + b^+|| + |muLocal - muLocalPrev| nmax.
 */
export function weylLowerBound(
  previousEnergy: number,
  psi: number,
  psiPrev: number,
  muLocal: number,
  muLocalPrev: number,
  nmax: number,
): number {
  const shift = Math.abs(psi - psiPrev) * couplingNormBound(nmax) + Math.abs(muLocal - muLocalPrev) * nmax;
  // Relative slack covers rounding in the previous solve.
  return previousEnergy - shift - 1e-12 * (Math.abs(previousEnergy) + 1) - 1e-300;
}

/**
 * Lowest eigenpair of the site Hamiltonian. Returns phi = <b>; the normalised amplitudes
 * are left in ws.amplitudes and the ground energy in ws.eigenvalues[0].
 * `lowerBound` must lie below the ground energy (pass NaN to use Gershgorin's bound).
 */
export function solveSiteGround(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  lowerBound: number,
  estimate = NaN,
): number {
  groundStateInPlace(ws, interactionU, muLocal, psi, lowerBound, estimate);
  return ws.result[0];
}

/**
 * The same as solveSiteGround, with phi left in ws.result[0] instead of returned: the
 * sweep kernel's hot path (a returned double is boxed when the call is not inlined).
 */
export function groundStateInPlace(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  lowerBound: number,
  estimate: number,
): void {
  const args = ws.args;
  args[ARG_U] = interactionU;
  args[ARG_MU] = muLocal;
  args[ARG_PSI] = psi;
  args[ARG_BOUND] = lowerBound;
  args[ARG_ESTIMATE] = estimate;
  groundFromArgs(ws);
}

export const ARG_U = 0;
export const ARG_MU = 1;
export const ARG_PSI = 2;
export const ARG_BOUND = 3;
export const ARG_ESTIMATE = 4;
const ARG_START = 5;
const ARG_MIN_DIAG = 6;

/** Ground state with its arguments in ws.args (see SiteWorkspace.args); phi in ws.result[0]. */
export function groundFromArgs(ws: SiteWorkspace): void {
  const args = ws.args;
  const interactionU = args[ARG_U];
  const muLocal = args[ARG_MU];
  const psi = args[ARG_PSI];
  const lowerBound = args[ARG_BOUND];
  const estimate = args[ARG_ESTIMATE];
  if (psi < 0) {
    // phi(-psi) = -phi(psi): the unitary (-1)^n maps one problem onto the other. The
    // amplitudes left in the workspace are those for |psi|.
    args[ARG_PSI] = -psi;
    groundFromArgs(ws);
    ws.result[0] = -ws.result[0];
    return;
  }
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const amp = ws.amplitudes;
  const psiSq = psi * psi;
  // Diagonal a_n = U n(n-1)/2 - muLocal n by increments, squared off-diagonals psi^2 (n+1).
  let a = 0;
  let minDiag = 0;
  let gersh = Infinity;
  for (let n = 0; n < states; n++) {
    diag[n] = a;
    offSq[n] = psiSq * (n + 1);
    if (a < minDiag) minDiag = a;
    a += interactionU * n - muLocal;
  }

  if (psi === 0) {
    // Diagonal: the ground state is the lowest diagonal entry (lowest n on a tie).
    let best = 0;
    for (let n = 1; n < states; n++) if (diag[n] < diag[best]) best = n;
    amp.fill(0);
    amp[best] = 1;
    ws.eigenvalues[0] = diag[best];
    ws.result[0] = 0;
    return;
  }

  // Starting point below the spectrum.
  let lambda = lowerBound;
  if (!(lambda === lambda)) {
    const sqrtUp = ws.sqrtUp;
    for (let n = 0; n < states; n++) {
      const radius = psi * ((n > 0 ? sqrtUp[n - 1] : 0) + (n < states - 1 ? sqrtUp[n] : 0));
      const g = diag[n] - radius;
      if (g < gersh) gersh = g;
    }
    lambda = gersh - 1e-12 * (Math.abs(gersh) + 1);
  }

  if (states <= POLYNOMIAL_PATH_MAX_STATES) {
    args[ARG_MIN_DIAG] = minDiag;
    if (estimate === estimate) {
      // A close estimate (not a bound) usually needs a single Laguerre step. The result is
      // the ground state only if its eigenvector has no sign change (Perron-Frobenius:
      // all off-diagonals are negative); otherwise start again from the bound.
      args[ARG_START] = estimate;
      if (groundByPolynomials(ws, false)) return;
    }
    args[ARG_START] = lambda;
    groundByPolynomials(ws, true);
    return;
  }

  // Laguerre iteration on p(lambda) = det(H - lambda) through the pivots:
  //   d_k = a_k - lambda - e_{k-1}^2 / d_{k-1}
  //   d_k' = -1 + e_{k-1}^2 d_{k-1}' / d_{k-1}^2
  //   d_k'' = e_{k-1}^2 (d_{k-1}'' / d_{k-1}^2 - 2 d_{k-1}'^2 / d_{k-1}^3)
  //   G = p'/p = sum d_k'/d_k,  H = G^2 - p''/p = sum (d_k'/d_k)^2 - d_k''/d_k
  // Convergence is cubic, so once a step is below 1e-6 of the scale the next error is
  // below rounding and the loop can stop without another evaluation.
  const degree = states;
  const scale = Math.abs(minDiag) + Math.abs(interactionU) + psi;
  const small = 1e-6 * scale;
  const done = 4e-16 * scale;
  for (let iter = 0; iter < 100; iter++) {
    let d = diag[0] - lambda;
    if (d <= 0) break; // at or above the smallest eigenvalue: converged to rounding
    let inv = 1 / d;
    let dp = -1;
    let dpp = 0;
    let g = -inv;
    let h = inv * inv;
    let positive = true;
    for (let k = 1; k < states; k++) {
      const t = offSq[k - 1] * inv;
      const dNew = diag[k] - lambda - t;
      const tInv = t * inv;
      dpp = tInv * (dpp - 2 * dp * dp * inv);
      dp = -1 + tInv * dp;
      d = dNew;
      if (d <= 0) {
        positive = false;
        break;
      }
      inv = 1 / d;
      const r = dp * inv;
      g += r;
      h += r * r - dpp * inv;
    }
    if (!positive) break;
    // Laguerre step: lambda_new = lambda - n / (G -/+ sqrt((n-1)(n H - G^2))), with the
    // sign that maximises the denominator. G < 0 left of all zeros, so step > 0.
    const disc = (degree - 1) * (degree * h - g * g);
    const step = degree / (Math.sqrt(disc > 0 ? disc : 0) - g);
    lambda += step;
    if (!(step > small)) {
      if (step < done || iter > 0) break;
    }
  }

  ws.eigenvalues[0] = lambda;
  twistedGroundVector(ws, lambda, psi);
}

/**
 * Eigenvector of the tridiagonal matrix in ws (diag, offSq, off-diagonals -psi sqrt(k+1))
 * for the eigenvalue lambda, by a twisted factorisation; written to ws.amplitudes,
 * normalised, all components >= 0. Returns phi = sum sqrt(n+1) c_n c_{n+1}.
 */
function twistedGroundVector(ws: SiteWorkspace, lambda: number, psi: number): void {
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const invTop = ws.pivotsTop;
  const invBottom = ws.pivotsBottom;
  const amp = ws.amplitudes;
  const sqrtUp = ws.sqrtUp;
  const last = states - 1;

  // Inverse pivots of the top-down and bottom-up LDL^T factorisations of H - lambda;
  // gamma_k = top_k + bottom_k - (a_k - lambda) is needed only to choose the twist.
  let top = diag[0] - lambda;
  if (top === 0) top = TINY_PIVOT;
  invTop[0] = 1 / top;
  const topPivot = ws.populations; // scratch: pivots themselves
  topPivot[0] = top;
  for (let k = 1; k < states; k++) {
    top = diag[k] - lambda - offSq[k - 1] * invTop[k - 1];
    if (top === 0) top = TINY_PIVOT;
    topPivot[k] = top;
    invTop[k] = 1 / top;
  }
  let bottom = diag[last] - lambda;
  if (bottom === 0) bottom = TINY_PIVOT;
  invBottom[last] = 1 / bottom;
  let twist = last;
  let best = Math.abs(topPivot[last]);
  for (let k = last - 1; k >= 0; k--) {
    const shifted = diag[k] - lambda;
    bottom = shifted - offSq[k] * invBottom[k + 1];
    if (bottom === 0) bottom = TINY_PIVOT;
    invBottom[k] = 1 / bottom;
    const gamma = Math.abs(topPivot[k] + bottom - shifted);
    if (gamma < best) {
      best = gamma;
      twist = k;
    }
  }
  // Off-diagonal e_k = -psi sqrt(k+1) < 0, so x_k = |e_k|/top_k x_{k+1} below the twist
  // and x_k = |e_{k-1}|/bottom_k x_{k-1} above it.
  amp[twist] = 1;
  let norm = 1;
  let x = 1;
  for (let k = twist - 1; k >= 0; k--) {
    x *= psi * sqrtUp[k] * invTop[k];
    amp[k] = x;
    norm += x * x;
  }
  x = 1;
  for (let k = twist + 1; k < states; k++) {
    x *= psi * sqrtUp[k - 1] * invBottom[k];
    amp[k] = x;
    norm += x * x;
  }
  const scaleAmp = 1 / Math.sqrt(norm);
  let phi = 0;
  amp[0] *= scaleAmp;
  for (let k = 1; k < states; k++) {
    amp[k] *= scaleAmp;
    phi += sqrtUp[k - 1] * amp[k - 1] * amp[k];
  }
  ws.result[0] = phi;
}

/**
 * Largest Fock space for which the division-free path below is used: the determinants of
 * the leading blocks, products of up to 17 factors |a_k - lambda| (at most ~1e5 in any
 * sensible unit), stay far inside double range.
 */
const POLYNOMIAL_PATH_MAX_STATES = 17;

/**
 * Ground state through the characteristic polynomials of the leading and trailing blocks
 * (three-term Sturm recurrences; Wilkinson 1965, section 5.37), which need no division per
 * entry, unlike the pivot form:
 *   p_k = (a_k - lambda) p_{k-1} - e_{k-1}^2 p_{k-2},   p_{-1} = 1,
 * with first and second derivatives in lambda for Laguerre's method. At the eigenvalue,
 * the adjugate of H - lambda is proportional to x x^T, and for a tridiagonal matrix its
 * entries are products of leading (p) and trailing (q) determinants and off-diagonals
 * (Usmani, Linear Algebra Appl. 212/213, 413 (1994)):
 *   adj_kk = p_{k-1} q_{k+1},  adj_kr = p_{k-1} q_{r+1} prod_{j=k}^{r-1} |e_j|  (k <= r).
 * The column r of the largest diagonal entry gives the eigenvector from determinants of
 * blocks that exclude the dominant occupation, which are well conditioned.
 */
function groundByPolynomials(ws: SiteWorkspace, startIsLowerBound: boolean): boolean {
  const args = ws.args;
  const interactionU = args[ARG_U];
  const psi = args[ARG_PSI];
  const start = args[ARG_START];
  const minDiag = args[ARG_MIN_DIAG];
  const states = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const degree = states;
  const scale = Math.abs(minDiag) + Math.abs(interactionU) + psi;
  const small = 1e-6 * scale;
  const lead = ws.pivotsTop;
  const leadSlope = ws.leadSlope;
  const leadCurvature = ws.leadCurvature;
  let lambda = start;
  // lead[] holds the leading determinants at leadAt, with their first two derivatives. After
  // the last (small) Laguerre step they are carried to the new lambda by a second-order
  // Taylor step instead of a new recurrence: the error is O(step^3), below rounding when
  // the step is below 1e-5 of the scale.
  let leadAt = NaN;
  lead[0] = 1;
  for (let iter = 0; iter < 100; iter++) {
    let pPrev = 1;
    let dPrev = 0;
    let ddPrev = 0;
    let p = diag[0] - lambda;
    let d = -1;
    let dd = 0;
    leadAt = lambda;
    for (let k = 1; k < states; k++) {
      lead[k] = p;
      leadSlope[k] = d;
      leadCurvature[k] = dd;
      const shifted = diag[k] - lambda;
      const e2 = offSq[k - 1];
      const pNew = shifted * p - e2 * pPrev;
      const dNew = shifted * d - p - e2 * dPrev;
      const ddNew = shifted * dd - 2 * d - e2 * ddPrev;
      pPrev = p;
      dPrev = d;
      ddPrev = dd;
      p = pNew;
      d = dNew;
      dd = ddNew;
    }
    // From a lower bound, p <= 0 means the smallest eigenvalue is reached to rounding.
    if (startIsLowerBound ? !(p > 0) : p === 0) break;
    const invP = 1 / p;
    const g = d * invP;
    const h = g * g - dd * invP;
    const disc = (degree - 1) * (degree * h - g * g);
    const root = Math.sqrt(disc > 0 ? disc : 0);
    // Laguerre: lambda_new = lambda - n / (G +- sqrt(...)), the sign that maximises |denominator|.
    const step = -degree / (g < 0 ? g - root : g + root);
    lambda += step;
    // Cubic convergence: after a step below 1e-6 of the scale the error is ~1e-18.
    if (!(Math.abs(step) > small)) break;
  }
  ws.eigenvalues[0] = lambda;

  // Leading determinants p_{k-1} stored at lead[k] (lead[0] = 1), trailing q_{k+1} at
  // trail[k] (trail[states-1] = 1).
  const trail = ws.pivotsBottom;
  const moved = lambda - leadAt;
  if (Math.abs(moved) <= 1e-5 * scale) {
    const half = 0.5 * moved * moved;
    for (let k = 1; k < states; k++) lead[k] += moved * leadSlope[k] + half * leadCurvature[k];
  } else {
    let pPrev = 1;
    let p = diag[0] - lambda;
    for (let k = 1; k < states; k++) {
      lead[k] = p;
      const pNew = (diag[k] - lambda) * p - offSq[k - 1] * pPrev;
      pPrev = p;
      p = pNew;
    }
  }
  const last = states - 1;
  trail[last] = 1;
  let qNext = 1;
  let q = diag[last] - lambda;
  let twist = last;
  let best = lead[last];
  for (let k = last - 1; k >= 0; k--) {
    trail[k] = q;
    const weight = lead[k] * q;
    if (weight > best) {
      best = weight;
      twist = k;
    }
    const qNew = (diag[k] - lambda) * q - offSq[k] * qNext;
    qNext = q;
    q = qNew;
  }
  const amp = ws.amplitudes;
  const sqrtUp = ws.sqrtUp;
  // x_k / x_r = (p_{k-1}/p_{r-1}) prod_{j=k}^{r-1} |e_j|   (k < r)
  //           = (q_{k+1}/q_{r+1}) prod_{j=r}^{k-1} |e_j|   (k > r)
  amp[twist] = 1;
  let norm = 1;
  const invLead = 1 / lead[twist];
  let prod = 1;
  for (let k = twist - 1; k >= 0; k--) {
    prod *= psi * sqrtUp[k];
    const x = lead[k] * invLead * prod;
    amp[k] = x;
    norm += x * x;
  }
  const invTrail = 1 / trail[twist];
  prod = 1;
  for (let k = twist + 1; k < states; k++) {
    prod *= psi * sqrtUp[k - 1];
    const x = trail[k] * invTrail * prod;
    amp[k] = x;
    norm += x * x;
  }
  if (!startIsLowerBound) {
    // The ground state has no negative component; anything else is an excited state.
    for (let k = 0; k < states; k++) if (!(amp[k] >= 0)) return false;
  }
  const scaleAmp = 1 / Math.sqrt(norm);
  let phi = 0;
  amp[0] *= scaleAmp;
  for (let k = 1; k < states; k++) {
    amp[k] *= scaleAmp;
    phi += sqrtUp[k - 1] * amp[k - 1] * amp[k];
  }
  ws.result[0] = phi;
  return true;
}

/** Fill `out` from the ground-state amplitudes left by solveSiteGround. */
export function groundObservables(ws: SiteWorkspace, phi: number, out: SiteObservables): void {
  const amp = ws.amplitudes;
  let density = 0;
  let densitySq = 0;
  let odd = 0;
  for (let n = 0; n < ws.states; n++) {
    const p = amp[n] * amp[n];
    density += n * p;
    densitySq += n * n * p;
    if (n & 1) odd += p;
  }
  out.energy = ws.eigenvalues[0];
  out.phi = phi;
  out.density = density;
  out.densitySq = densitySq;
  out.parityOdd = odd;
  out.topWeight = amp[ws.states - 1] * amp[ws.states - 1];
  out.entropy = 0;
}

/**
 * Implicit QL with Wilkinson shifts on a symmetric tridiagonal matrix: diagonal d[0..n-1],
 * off-diagonal e[i] between i and i+1 (e[n-1] = 0). On return d holds the eigenvalues
 * (unsorted). With z (n x n, identity on entry) the rotations are accumulated so that
 * column j of z is eigenvector j (the tql2 procedure; without z, tql1): Bowdler, Martin,
 * Reinsch & Wilkinson, Numer. Math. 11, 293 (1968). Returns false if an eigenvalue needed
 * more than 60 iterations.
 */
function implicitQl(d: Float64Array, e: Float64Array, n: number, z: Float64Array | null): boolean {
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
        if (++iter > 60) return false;
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
            // accumulate the rotation on rows k, columns i and i+1
            for (let k = 0; k < n; k++) {
              const zk = k * n;
              h = z[zk + i + 1];
              z[zk + i + 1] = sn * z[zk + i] + c * h;
              z[zk + i] = c * z[zk + i] - sn * h;
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

/**
 * Full spectrum of the site Hamiltonian by implicit QL with Wilkinson shifts (tql2).
 * Eigenvalues ascending in ws.eigenvalues, eigenvector k in row k of ws.eigenvectors.
 */
export function diagonalizeSite(ws: SiteWorkspace, interactionU: number, muLocal: number, psi: number): void {
  const n = ws.states;
  fillDiagonal(ws, interactionU, muLocal, psi);
  const d = ws.eigenvalues;
  const e = ws.qlOff;
  const z = ws.eigenvectors; // z[k*n + i]: component i of eigenvector k
  for (let i = 0; i < n; i++) {
    d[i] = ws.diag[i];
    e[i] = i < n - 1 ? -psi * ws.sqrtUp[i] : 0;
  }
  z.fill(0);
  for (let i = 0; i < n; i++) z[i * n + i] = 1;
  if (psi === 0) {
    sortEigen(ws);
    return;
  }

  implicitQl(d, e, n, z);
  // tql2 stores eigenvector j as column j (z[k*n + j] = component k). Transpose so that
  // row j holds eigenvector j, then sort.
  for (let a = 0; a < n; a++) {
    for (let b = a + 1; b < n; b++) {
      const t = z[a * n + b];
      z[a * n + b] = z[b * n + a];
      z[b * n + a] = t;
    }
  }
  sortEigen(ws);
}

function sortEigen(ws: SiteWorkspace): void {
  const n = ws.states;
  const d = ws.eigenvalues;
  const z = ws.eigenvectors;
  // selection sort: n is tiny
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
        const t = z[i * n + c];
        z[i * n + c] = z[k * n + c];
        z[k * n + c] = t;
      }
    }
  }
}

/**
 * Thermal state rho = exp(-H/kT)/Z of the site problem. Returns phi = Tr(rho b) and fills
 * `out` (energy = -kT ln Z, the site grand potential) when `out` is given.
 */
export function solveSiteThermal(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  temperature: number,
  out: SiteObservables | null,
): number {
  if (out === null && psi !== 0 && ws.states <= POLYNOMIAL_PATH_MAX_STATES) {
    const phi = thermalPhiByEigenvalues(ws, interactionU, muLocal, psi, temperature);
    if (phi === phi) return phi;
  }
  diagonalizeSite(ws, interactionU, muLocal, psi);
  const n = ws.states;
  const d = ws.eigenvalues;
  const z = ws.eigenvectors;
  const sqrtUp = ws.sqrtUp;
  const pop = ws.populations;
  const beta = 1 / temperature;
  const e0 = d[0];
  let partition = 0;
  let meanExcess = 0;
  let phi = 0;
  pop.fill(0);
  for (let k = 0; k < n; k++) {
    const x = (d[k] - e0) * beta;
    if (x > 745) break; // exp underflows; eigenvalues are sorted
    const w = Math.exp(-x);
    partition += w;
    meanExcess += w * x;
    const row = k * n;
    let bk = 0;
    for (let i = 0; i < n - 1; i++) bk += sqrtUp[i] * z[row + i] * z[row + i + 1];
    phi += w * bk;
    if (out) for (let i = 0; i < n; i++) pop[i] += w * z[row + i] * z[row + i];
  }
  const invZ = 1 / partition;
  phi *= invZ;
  if (out) {
    let density = 0;
    let densitySq = 0;
    let odd = 0;
    for (let i = 0; i < n; i++) {
      const p = pop[i] * invZ;
      pop[i] = p;
      density += i * p;
      densitySq += i * i * p;
      if (i & 1) odd += p;
    }
    out.energy = e0 - temperature * Math.log(partition);
    out.phi = phi;
    out.density = density;
    out.densitySq = densitySq;
    out.parityOdd = odd;
    out.topWeight = pop[n - 1];
    out.entropy = Math.log(partition) + meanExcess * invZ;
  }
  return phi;
}

/**
 * Thermal order parameter without eigenvectors, for the sweeps (T > 0). Eigenvalues by
 * implicit QL without accumulated rotations (O(n^2)); then, by Hellmann-Feynman,
 * <j|b|j> = -(1/2) d lambda_j / d psi, and on the characteristic polynomial p(lambda, psi)
 * d lambda_j/d psi = -(dp/dpsi)/(dp/dlambda) at lambda_j; both derivatives follow from the
 * three-term recurrence. States whose Boltzmann weight is below 1e-17 are skipped. Returns
 * NaN (caller falls back to the full eigendecomposition) when two eigenvalues are so close
 * that dp/dlambda loses its accuracy.
 */
function thermalPhiByEigenvalues(ws: SiteWorkspace, interactionU: number, muLocal: number, psi: number, temperature: number): number {
  const n = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const d = ws.eigenvalues;
  const e = ws.qlOff;
  const psiSq = psi * psi;
  let a = 0;
  let scale = Math.abs(interactionU) + Math.abs(muLocal) + psi;
  for (let k = 0; k < n; k++) {
    diag[k] = a;
    d[k] = a;
    offSq[k] = psiSq * (k + 1);
    e[k] = k < n - 1 ? -psi * ws.sqrtUp[k] : 0;
    a += interactionU * k - muLocal;
    if (Math.abs(diag[k]) > scale) scale = Math.abs(diag[k]);
  }
  if (!implicitQl(d, e, n, null)) return NaN;
  // Ascending order (insertion sort; n is small) so that callers can keep the spectrum.
  for (let j = 1; j < n; j++) {
    const v = d[j];
    let k = j - 1;
    while (k >= 0 && d[k] > v) {
      d[k + 1] = d[k];
      k--;
    }
    d[k + 1] = v;
  }
  const couplings = ws.couplings;
  couplings.fill(0);
  const e0 = d[0];
  const beta = 1 / temperature;
  let partition = 0;
  let phi = 0;
  for (let j = 0; j < n; j++) {
    const lambda = d[j];
    const x = (lambda - e0) * beta;
    if (x > 39) continue; // weight below 1e-17
    // Guard: a close neighbour makes dp/dlambda tiny and the ratio inaccurate.
    for (let k = 0; k < n; k++) if (k !== j && Math.abs(d[k] - lambda) < 1e-7 * scale) return NaN;
    const w = Math.exp(-x);
    partition += w;
    const bj = couplingAt(ws, lambda, psi);
    couplings[j] = bj;
    phi += w * bj;
  }
  return phi / partition;
}

/**
 * <j|b|j> of the eigenstate with eigenvalue lambda, by Hellmann-Feynman on the
 * characteristic polynomial p(lambda, psi) of ws.diag / ws.offSq:
 * <j|b|j> = -(1/2) d lambda/d psi = (1/2) (dp/dpsi)/(dp/dlambda), both derivatives by the
 * recurrence p_k = (a_k - lambda) p_{k-1} - psi^2 k p_{k-2}.
 */
function couplingAt(ws: SiteWorkspace, lambda: number, psi: number): number {
  const n = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  let pPrev = 1;
  let lPrev = 0;
  let sPrev = 0;
  let pc = diag[0] - lambda;
  let lc = -1;
  let sc = 0;
  for (let k = 1; k < n; k++) {
    const shifted = diag[k] - lambda;
    const e2 = offSq[k - 1];
    const pNew = shifted * pc - e2 * pPrev;
    const lNew = shifted * lc - pc - e2 * lPrev;
    const sNew = shifted * sc - 2 * psi * k * pPrev - e2 * sPrev;
    pPrev = pc;
    lPrev = lc;
    sPrev = sc;
    pc = pNew;
    lc = lNew;
    sc = sNew;
  }
  return (0.5 * sc) / lc;
}

/**
 * One Laguerre step toward an eigenvalue of the site matrix in ws.diag / ws.offSq from
 * lambda: p, p' and p'' by the three-term recurrence, then
 * lambda_new - lambda = -n / (G +- sqrt((n-1)(nH - G^2))). Returns 0 when p(lambda) = 0.
 * (The ground-state path keeps its own inline copy: it also stores the leading
 * determinants and runs once per site update in the hottest loop.)
 */
function laguerreStep(ws: SiteWorkspace, lambda: number): number {
  const n = ws.states;
  const diag = ws.diag;
  const offSq = ws.offSq;
  let pPrev = 1;
  let dPrev = 0;
  let ddPrev = 0;
  let p = diag[0] - lambda;
  let d = -1;
  let dd = 0;
  for (let k = 1; k < n; k++) {
    const shifted = diag[k] - lambda;
    const e2 = offSq[k - 1];
    const pNew = shifted * p - e2 * pPrev;
    const dNew = shifted * d - p - e2 * dPrev;
    const ddNew = shifted * dd - 2 * d - e2 * ddPrev;
    pPrev = p;
    dPrev = d;
    ddPrev = dd;
    p = pNew;
    d = dNew;
    dd = ddNew;
  }
  if (p === 0) return 0;
  const invP = 1 / p;
  const g = d * invP;
  const h = g * g - dd * invP;
  const disc = (n - 1) * (n * h - g * g);
  const root = Math.sqrt(disc > 0 ? disc : 0);
  return -n / (g < 0 ? g - root : g + root);
}

export const ARG_DPSI = 3;
export const ARG_TEMPERATURE = 4;

/**
 * Thermal order parameter from a stored spectrum of the same site (the sweeps' warm path).
 * Arguments in ws.args: [U, muLocal, psi, psi - psiPrev, kT]; spectrum[offset + j] and
 * couplings[offset + j] hold lambda_j and <j|b|j> at psiPrev. Each eigenvalue is predicted
 * to first order (Hellmann-Feynman, d lambda_j/d psi = -2 <j|b|j>) and refined by
 * Laguerre's method on the characteristic polynomial; states more than 45 kT above the
 * ground state are not refined (weight < 3e-20). The refined spectrum must stay ordered
 * and each eigenvalue close to its own prediction, otherwise false is returned and the
 * caller uses the full QL path. On success phi is in ws.result[0] and the stored spectrum
 * is updated.
 */
export function thermalFromSpectrum(ws: SiteWorkspace, spectrum: Float64Array, couplings: Float64Array, offset: number): boolean {
  const args = ws.args;
  const interactionU = args[ARG_U];
  const muLocal = args[ARG_MU];
  const psi = args[ARG_PSI];
  const dPsi = args[ARG_DPSI];
  const temperature = args[ARG_TEMPERATURE];
  const n = ws.states;
  if (!(spectrum[offset] === spectrum[offset]) || n > POLYNOMIAL_PATH_MAX_STATES) return false;
  const diag = ws.diag;
  const offSq = ws.offSq;
  const lambdas = ws.eigenvalues;
  const bs = ws.couplings;
  const predicted = ws.populations; // scratch
  const psiSq = psi * psi;
  let a = 0;
  let scale = Math.abs(interactionU) + Math.abs(muLocal) + Math.abs(psi);
  for (let k = 0; k < n; k++) {
    diag[k] = a;
    offSq[k] = psiSq * (k + 1);
    a += interactionU * k - muLocal;
    if (Math.abs(diag[k]) > scale) scale = Math.abs(diag[k]);
  }
  for (let j = 0; j < n; j++) predicted[j] = spectrum[offset + j] - 2 * couplings[offset + j] * dPsi;
  const beta = 1 / temperature;
  const small = 1e-6 * scale;
  const e0Predicted = predicted[0];
  let partition = 0;
  let phi = 0;
  let e0 = 0;
  for (let j = 0; j < n; j++) {
    if ((predicted[j] - e0Predicted) * beta > 45) {
      lambdas[j] = predicted[j];
      bs[j] = couplings[offset + j];
      continue;
    }
    let lambda = predicted[j];
    let converged = false;
    for (let iter = 0; iter < 8; iter++) {
      const step = laguerreStep(ws, lambda);
      lambda += step;
      if (step === 0 || Math.abs(step) <= small) {
        converged = true;
        break;
      }
    }
    if (!converged) return false;
    // Each eigenvalue must stay nearest to its own prediction (no two converged to one root).
    const below = j > 0 ? predicted[j] - predicted[j - 1] : Infinity;
    const above = j < n - 1 ? predicted[j + 1] - predicted[j] : Infinity;
    const reach = 0.3 * Math.min(below, above);
    if (!(Math.abs(lambda - predicted[j]) < reach) || !(Math.min(below, above) > 1e-7 * scale)) return false;
    const bj = couplingAt(ws, lambda, psi);
    lambdas[j] = lambda;
    bs[j] = bj;
    if (j === 0) e0 = lambda;
    const w = Math.exp(-(lambda - e0) * beta);
    partition += w;
    phi += w * bj;
  }
  for (let j = 0; j < n; j++) {
    spectrum[offset + j] = lambdas[j];
    couplings[offset + j] = bs[j];
  }
  ws.result[0] = phi / partition;
  return true;
}

/**
 * Thermal phi for a sweep with a per-site spectrum store: the warm path when possible,
 * otherwise the full QL path, whose spectrum is then stored. Arguments as for
 * thermalFromSpectrum; phi in ws.result[0].
 */
export function thermalSweepUpdate(ws: SiteWorkspace, spectrum: Float64Array, couplings: Float64Array, offset: number): void {
  if (thermalFromSpectrum(ws, spectrum, couplings, offset)) return;
  const args = ws.args;
  const n = ws.states;
  const psi = args[ARG_PSI];
  let phi: number;
  if (psi !== 0 && n <= POLYNOMIAL_PATH_MAX_STATES) {
    phi = thermalPhiByEigenvalues(ws, args[ARG_U], args[ARG_MU], psi, args[ARG_TEMPERATURE]);
  } else {
    phi = NaN;
  }
  if (!(phi === phi)) {
    // Degenerate or large Fock space: full eigendecomposition; couplings from eigenvectors.
    phi = solveSiteThermal(ws, args[ARG_U], args[ARG_MU], psi, args[ARG_TEMPERATURE], null);
    spectrum[offset] = NaN; // no reliable warm start next time
    ws.result[0] = phi;
    return;
  }
  for (let j = 0; j < n; j++) {
    spectrum[offset + j] = ws.eigenvalues[j];
    couplings[offset + j] = ws.couplings[j];
  }
  ws.result[0] = phi;
}

/**
 * One call for either regime: T = 0 (temperature <= 0) uses the ground state with the
 * given lower bound; T > 0 the thermal state. Fills `out`, returns phi.
 */
export function solveSite(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  temperature: number,
  out: SiteObservables,
  lowerBound = NaN,
): number {
  if (temperature > 0) return solveSiteThermal(ws, interactionU, muLocal, psi, temperature, out);
  const phi = solveSiteGround(ws, interactionU, muLocal, psi, lowerBound);
  groundObservables(ws, phi, out);
  return phi;
}
