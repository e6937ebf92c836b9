// Ground state (T = 0) of the single-site Gutzwiller problem (siteWorkspace.ts for H).
//
// The lowest eigenvalue is found with Laguerre's method on det(H - lambda): for a
// polynomial with only real zeros, Laguerre started left of the smallest zero converges
// monotonically and cubically to it (Wilkinson, The Algebraic Eigenvalue Problem, 1965,
// section 7.10; Parlett, The Symmetric Eigenvalue Problem, 1998). A start that is
// guaranteed to lie below the smallest eigenvalue comes from Gershgorin's theorem or, in a
// sweep, from Weyl's inequality applied to the previous solution of the same site
// (weylBound.ts). Up to POLYNOMIAL_PATH_MAX_STATES states the division-free polynomial path
// (groundPolynomials.ts) is used, beyond it the pivot path (groundPivots.ts).

import { groundByPivots } from './groundPivots.js';
import { groundByPolynomials, PolynomialStart } from './groundPolynomials.js';
import { POLYNOMIAL_PATH_MAX_STATES, type SiteWorkspace } from './siteWorkspace.js';

/** Arguments of solveGround (a record, so that the hot path passes no boxed doubles). */
export class GroundParameters {
  /** on-site interaction U */
  interactionU = NaN;
  /** local chemical potential mu - eps_i */
  muLocal = NaN;
  /** mean field of the neighbours, sum_j J_ij phi_j */
  psi = NaN;
  /** a value below the ground energy, or NaN for Gershgorin's bound */
  lowerBound = NaN;
  /** a close estimate of the ground energy (not a bound), or NaN */
  estimate = NaN;
}

const polynomialStart = new PolynomialStart();

/**
 * Lowest eigenpair of the site Hamiltonian: phi = <b> in ws.phi, the normalised amplitudes
 * in ws.amplitudes and the ground energy in ws.eigenvalues[0].
 */
export function solveGround(ws: SiteWorkspace, p: GroundParameters): void {
  const psi = p.psi;
  if (psi < 0) {
    // phi(-psi) = -phi(psi): the unitary (-1)^n maps one problem onto the other. The
    // amplitudes left in the workspace are those for |psi|. p is restored afterwards.
    p.psi = -psi;
    solveGround(ws, p);
    p.psi = psi;
    ws.phi = -ws.phi;
    return;
  }
  const interactionU = p.interactionU;
  const muLocal = p.muLocal;
  const lowerBound = p.lowerBound;
  const estimate = p.estimate;
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
    ws.phi = 0;
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
    const search = polynomialStart;
    search.interactionU = interactionU;
    search.psi = psi;
    search.minDiag = minDiag;
    if (estimate === estimate) {
      // A close estimate (not a bound) usually needs a single Laguerre step. The result is
      // the ground state only if its eigenvector has no sign change (Perron-Frobenius:
      // all off-diagonals are negative); otherwise start again from the bound.
      search.start = estimate;
      if (groundByPolynomials(ws, search, false)) return;
    }
    search.start = lambda;
    groundByPolynomials(ws, search, true);
    return;
  }
  const search = polynomialStart;
  search.interactionU = interactionU;
  search.psi = psi;
  search.minDiag = minDiag;
  search.start = lambda;
  groundByPivots(ws, search);
}

const scratch = new GroundParameters();

/**
 * Convenience form of solveGround for callers outside the sweeps: returns phi = <b>.
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
  const p = scratch;
  p.interactionU = interactionU;
  p.muLocal = muLocal;
  p.psi = psi;
  p.lowerBound = lowerBound;
  p.estimate = estimate;
  solveGround(ws, p);
  return ws.phi;
}
