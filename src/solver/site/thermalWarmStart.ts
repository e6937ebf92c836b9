// Thermal order parameter in the sweeps (T > 0) from a stored spectrum of the same site:
// each eigenvalue is predicted to first order in the change of psi (Hellmann-Feynman,
// d lambda_j/d psi = -2 <j|b|j>) and refined by Laguerre's method on the characteristic
// polynomial (laguerreStep.ts); <j|b|j> again by Hellmann-Feynman (thermalCouplings.ts).
// States more than 45 kT above the ground state are not refined (weight < 3e-20). When the
// prediction is unreliable the full QL path is used and its spectrum stored.

import { laguerreStep } from './laguerreStep.js';
import { POLYNOMIAL_PATH_MAX_STATES, type SiteWorkspace } from './siteWorkspace.js';
import { couplingAt, thermalPhiByEigenvalues } from './thermalCouplings.js';
import { solveSiteThermal } from './thermalState.js';

/** Arguments of the thermal sweep update (a record: no boxed doubles on the hot path). */
export class ThermalSweepParameters {
  /** on-site interaction U */
  interactionU = NaN;
  /** local chemical potential mu - eps_i */
  muLocal = NaN;
  /** mean field of the neighbours now */
  psi = NaN;
  /** psi minus the psi at which the stored spectrum was computed */
  psiChange = NaN;
  /** k_B T (> 0) */
  temperature = NaN;
}

/**
 * The warm path: spectrum[offset + j] and couplings[offset + j] hold lambda_j and <j|b|j>
 * at psi - psiChange. The refined spectrum must stay ordered and each eigenvalue close to
 * its own prediction, otherwise false is returned (nothing stored). On success phi is in
 * ws.phi and the stored spectrum is updated.
 */
export function thermalFromSpectrum(
  ws: SiteWorkspace,
  p: ThermalSweepParameters,
  spectrum: Float64Array,
  couplings: Float64Array,
  offset: number,
): boolean {
  const interactionU = p.interactionU;
  const muLocal = p.muLocal;
  const psi = p.psi;
  const dPsi = p.psiChange;
  const temperature = p.temperature;
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
  ws.phi = phi / partition;
  return true;
}

/**
 * Thermal phi for a sweep with a per-site spectrum store: the warm path when possible,
 * otherwise the eigenvalue-only QL path (its spectrum is then stored), and for degenerate
 * spectra or large Fock spaces the full eigendecomposition (the store is then marked
 * empty). phi in ws.phi.
 */
export function thermalSweepUpdate(
  ws: SiteWorkspace,
  p: ThermalSweepParameters,
  spectrum: Float64Array,
  couplings: Float64Array,
  offset: number,
): void {
  if (thermalFromSpectrum(ws, p, spectrum, couplings, offset)) return;
  const n = ws.states;
  const psi = p.psi;
  let phi: number;
  if (psi !== 0 && n <= POLYNOMIAL_PATH_MAX_STATES) {
    phi = thermalPhiByEigenvalues(ws, p.interactionU, p.muLocal, psi, p.temperature);
  } else {
    phi = NaN;
  }
  if (!(phi === phi)) {
    phi = solveSiteThermal(ws, p.interactionU, p.muLocal, psi, p.temperature, null);
    spectrum[offset] = NaN; // no reliable warm start next time
    ws.phi = phi;
    return;
  }
  for (let j = 0; j < n; j++) {
    spectrum[offset + j] = ws.eigenvalues[j];
    couplings[offset + j] = ws.couplings[j];
  }
  ws.phi = phi;
}
