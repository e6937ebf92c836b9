// The per-site results of a solver state as plain arrays (views on the shared buffers, no
// copies), in the shape observables take (SiteSolution in src/observables/siteFields.ts:
// orderParameter, density, densitySquared = <n^2>, parityOdd, entropy, sitePotential). The
// shapes match structurally, so neither folder imports the other; the pipeline joins them:
// siteFieldsFrom(siteArraysOf(outcome.state), outcome.compressibility).

import type { SolverState } from './solverState.js';

export function siteArraysOf(state: SolverState) {
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
