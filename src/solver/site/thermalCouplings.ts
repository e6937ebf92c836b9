// Thermal order parameter of one site without eigenvectors (T > 0 sweeps). Eigenvalues by
// implicit QL without accumulated rotations (tql1, O(n^2); implicitQl.ts); then, by
// Hellmann-Feynman, <j|b|j> = -(1/2) d lambda_j / d psi, and on the characteristic
// polynomial p(lambda, psi), d lambda_j/d psi = -(dp/dpsi)/(dp/dlambda) at lambda_j; both
// derivatives follow from the three-term recurrence
//   p_k = (a_k - lambda) p_{k-1} - psi^2 k p_{k-2}.
// Then phi = Tr(rho b) = sum_j w_j <j|b|j> / sum_j w_j with w_j = exp(-(lambda_j - lambda_0)/kT).

import { insertionSortAscending } from '../../numerics/insertionSort.js';
import { implicitQl } from './implicitQl.js';
import type { SiteWorkspace } from './siteWorkspace.js';

/**
 * <j|b|j> of the eigenstate with eigenvalue lambda of the matrix in ws.diag / ws.offSq:
 * (1/2) (dp/dpsi)/(dp/dlambda).
 */
export function couplingAt(ws: SiteWorkspace, lambda: number, psi: number): number {
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
 * Thermal phi of the site at (interactionU, muLocal, psi > 0, temperature). Leaves the
 * ascending spectrum in ws.eigenvalues and <j|b|j> in ws.couplings (0 for states whose
 * Boltzmann weight is below 1e-17, which are skipped). Returns NaN (the caller falls back
 * to the full eigendecomposition) when two eigenvalues are so close that dp/dlambda loses
 * its accuracy, or when QL does not converge.
 */
export function thermalPhiByEigenvalues(
  ws: SiteWorkspace,
  interactionU: number,
  muLocal: number,
  psi: number,
  temperature: number,
): number {
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
  insertionSortAscending(d, n);
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
