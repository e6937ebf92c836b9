// Thermal state rho = exp(-H/kT)/Z of the single-site problem (siteWorkspace.ts for H):
// full eigendecomposition by implicit QL (tql2; fullSpectrum.ts), then Boltzmann averages
// (standard statistical mechanics): Z = sum_k exp(-(E_k - E_0)/kT), phi = Tr(rho b),
// p_n = <n|rho|n>, site grand potential -kT ln Z, entropy S/k_B = ln Z + <E - E_0>/kT.
// Without observables the cheaper eigenvalue-only path (thermalCouplings.ts) is tried first.

import { diagonalizeSite } from './fullSpectrum.js';
import type { SiteObservables } from './siteObservables.js';
import { POLYNOMIAL_PATH_MAX_STATES, type SiteWorkspace } from './siteWorkspace.js';
import { thermalPhiByEigenvalues } from './thermalCouplings.js';

/**
 * Returns phi = Tr(rho b) and fills `out` (energy = -kT ln Z, the site grand potential)
 * when `out` is given.
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
