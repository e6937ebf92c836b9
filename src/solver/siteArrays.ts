// The per-site results of a solver state as plain arrays (views on the shared buffers, no
// copies), in the shape observables take (SiteSolution in src/observables/siteFields.ts,
// matched structurally so that neither folder imports the other). The pipeline joins them:
// siteFieldsFrom(siteArraysOf(outcome.state), outcome.compressibility).

import type { SolverState } from './solverState.js';

export interface SolverSiteArrays {
  /** phi_i = <b_i> */
  orderParameter: Float64Array;
  /** <n_i> */
  density: Float64Array;
  /** <n_i^2> */
  densitySquared: Float64Array;
  /** P(n_i odd) */
  parityOdd: Float64Array;
  /** site entropy (k_B = 1) */
  entropy: Float64Array;
  /** eps_i, internal energy unit */
  sitePotential: Float64Array;
}

export function siteArraysOf(state: SolverState): SolverSiteArrays {
  const { fields, measure } = state;
  return {
    orderParameter: fields.phi,
    density: measure.density,
    densitySquared: measure.densitySq,
    parityOdd: measure.parityOdd,
    entropy: measure.entropy,
    sitePotential: fields.eps,
  };
}
