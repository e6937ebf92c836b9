// Per-site fields of a converged solution, as plain arrays for the writers: density,
// order parameter, condensate density |phi|^2, number variance <n^2> - <n>^2, parity
// weight P_odd, entropy, site potential, local compressibility and the phase labels.

import type { SolverState } from '../solver/solverState.js';

export interface SiteFields {
  density: Float64Array;
  orderParameter: Float64Array;
  condensateDensity: Float64Array;
  numberVariance: Float64Array;
  parityOdd: Float64Array;
  entropy: Float64Array;
  sitePotential: Float64Array;
  /** dn_i/dmu (1/energy unit); zeros when not computed */
  compressibility: Float64Array;
}

export function siteFieldsOf(state: SolverState, compressibility: Float64Array | null): SiteFields {
  const m = state.measure;
  const phi = state.fields.phi;
  const n = phi.length;
  const condensate = new Float64Array(n);
  const variance = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    condensate[i] = phi[i] * phi[i];
    const v = m.densitySq[i] - m.density[i] * m.density[i];
    variance[i] = v > 0 ? v : 0; // rounding can give -1e-16 on a Fock state
  }
  return {
    density: Float64Array.from(m.density),
    orderParameter: Float64Array.from(phi),
    condensateDensity: condensate,
    numberVariance: variance,
    parityOdd: Float64Array.from(m.parityOdd),
    entropy: Float64Array.from(m.entropy),
    sitePotential: Float64Array.from(state.fields.eps),
    compressibility: compressibility ?? new Float64Array(n),
  };
}
