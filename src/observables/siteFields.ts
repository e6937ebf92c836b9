// Per-site fields of a converged solution, as plain arrays for the writers: density,
// order parameter, condensate density |phi|^2, number variance <n^2> - <n>^2, parity
// weight P_odd, entropy, site potential, local compressibility and the phase labels.
//
// Input is a plain set of per-site arrays (SiteSolution), so observables do not depend on
// how the solver stores its state; src/solver/siteArrays.ts provides them from a solver state.

/** What a solution gives per site: arrays of equal length in the lattice's C order. */
export interface SiteSolution {
  /** phi_i = <b_i> (real) */
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

/** The fields of a solution (copies: the solution's arrays may be reused by the solver). */
export function siteFieldsFrom(solution: SiteSolution, compressibility: Float64Array | null): SiteFields {
  const phi = solution.orderParameter;
  const n = phi.length;
  for (const name of ['density', 'densitySquared', 'parityOdd', 'entropy', 'sitePotential'] as const) {
    const values = solution[name];
    if (values.length !== n) {
      throw new RangeError(`siteFieldsFrom ${name}: expected ${n} values (one per site, like orderParameter), got ${values.length}`);
    }
  }
  if (compressibility !== null && compressibility.length !== n) {
    throw new RangeError(`siteFieldsFrom compressibility: expected ${n} values, got ${compressibility.length}`);
  }
  const { density, densitySquared } = solution;
  const condensate = new Float64Array(n);
  const variance = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    condensate[i] = phi[i] * phi[i];
    const v = densitySquared[i] - density[i] * density[i];
    variance[i] = v > 0 ? v : 0; // rounding can give -1e-16 on a Fock state
  }
  return {
    density: Float64Array.from(density),
    orderParameter: Float64Array.from(phi),
    condensateDensity: condensate,
    numberVariance: variance,
    parityOdd: Float64Array.from(solution.parityOdd),
    entropy: Float64Array.from(solution.entropy),
    sitePotential: Float64Array.from(solution.sitePotential),
    compressibility: compressibility ?? new Float64Array(n),
  };
}
