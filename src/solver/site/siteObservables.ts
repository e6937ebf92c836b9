// Observables of one site of the Gutzwiller product state, filled in place by the ground
// (groundObservables.ts) and thermal (thermalState.ts) solvers.

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
