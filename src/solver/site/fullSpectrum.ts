// Full spectrum of the site Hamiltonian (siteWorkspace.ts) by implicit QL with Wilkinson
// shifts and accumulated rotations (tql2; implicitQl.ts): every eigenvalue and eigenvector,
// for the thermal observables and for measurements.

import { sortEigenpairsAscending } from '../../numerics/sortEigenpairs.js';
import { implicitQl } from './implicitQl.js';
import type { SiteWorkspace } from './siteWorkspace.js';

/** Diagonal a_n = U n(n-1)/2 - muLocal n and squared off-diagonals psi^2 (n+1). */
function fillDiagonal(ws: SiteWorkspace, interactionU: number, muLocal: number, psi: number): void {
  const { diag, offSq, states } = ws;
  const psiSq = psi * psi;
  for (let n = 0; n < states; n++) {
    diag[n] = 0.5 * interactionU * n * (n - 1) - muLocal * n;
    offSq[n] = psiSq * (n + 1); // the last entry is unused
  }
}

/**
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
    sortEigenpairsAscending(d, z, n);
    return;
  }

  // rotations on the rows of z, so row j is eigenvector j without a transpose
  implicitQl(d, e, n, z, true);
  sortEigenpairsAscending(d, z, n);
}
