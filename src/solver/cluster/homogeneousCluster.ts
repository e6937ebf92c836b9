// Uniform cluster mean-field solution of the Bose-Hubbard model on the infinite chain,
// square or cubic lattice (McIntosh, Pisarski, Gooding & Zaremba, arXiv:1111.4102): the
// lattice is tiled by copies of one cluster, all carrying the same order parameters
// phi_i, so the field on cluster site k is Psi_k = J sum over its external bonds of the
// phi of the neighbour's periodic image inside the cluster (clusterGeometry.ts). The
// self-consistency phi = <b>(Psi(phi)) is solved by fixed-point iteration from a large
// start: the map is monotone in phi (every susceptibility is non-negative), so the
// iterates decrease to the largest fixed point, the physical solution.
//
// Grand potential per site (decoupling b_i^+ b_j ~ phi_i b_j + b_i^+ phi_j - phi_i phi_j on
// the bonds between clusters): Omega / N_s = (Omega_C + sum_{i in C} Psi_i phi_i) / sites,
// with Omega_C the cluster ground energy (T = 0) or -kT ln Z_C (T > 0).

import { ParameterError } from '../../physics/parameterError.js';
import { createClusterSolver, solveClusterGround, solveClusterThermal, type ClusterSolver, type ClusterSolverOptions } from './clusterSolver.js';
import type { ClusterObservables } from './clusterObservables.js';

export interface HomogeneousClusterInput {
  /** cluster shape; its length is the lattice dimension */
  shape: readonly number[];
  /** nearest-neighbour hopping J (energy unit of the caller) */
  hopping: number;
  interactionU: number;
  mu: number;
  /** kT; 0 for the ground state */
  temperature: number;
  nmax: number;
  /** stop when max |delta phi| < tolerance (default 1e-11) */
  tolerance?: number;
  /** default 20000 */
  maxIterations?: number;
  /** starting phi on every site (default sqrt(nmax)/2) */
  initialPhi?: number;
  solverOptions?: ClusterSolverOptions;
}

export interface HomogeneousClusterSolution {
  /** per cluster site */
  phi: Float64Array;
  density: Float64Array;
  numberVariance: Float64Array;
  parityOdd: Float64Array;
  topWeight: Float64Array;
  /** <b_i^+ b_j> on the cluster's internal bonds */
  bondCorrelation: Float64Array;
  /** cluster averages */
  meanPhi: number;
  meanDensity: number;
  /** Omega / N_s */
  grandPotentialPerSite: number;
  /** Omega / N_s + mu n: energy (T = 0) or free energy (T > 0) per site */
  freeEnergyPerSite: number;
  /** entropy per site / k_B */
  entropyPerSite: number;
  converged: boolean;
  iterations: number;
  /** last max |delta phi| */
  residual: number;
  /** largest Boltzmann weight of a highest kept state (T > 0, Lanczos), 0 otherwise */
  truncationWeight: number;
  /** the cluster eigen-solves met their tolerances */
  clusterConverged: boolean;
}

export function solveHomogeneousCluster(input: HomogeneousClusterInput, reuse?: ClusterSolver): HomogeneousClusterSolution {
  const { hopping, interactionU, mu, temperature, nmax } = input;
  if (!(hopping >= 0) || !Number.isFinite(hopping)) throw new ParameterError('hopping', `expected a finite J >= 0, got ${hopping}`);
  if (!(interactionU > 0) || !Number.isFinite(interactionU)) throw new ParameterError('interactionU', `expected a finite U > 0, got ${interactionU}`);
  if (!(temperature >= 0) || !Number.isFinite(temperature)) throw new ParameterError('temperature', `expected a finite kT >= 0, got ${temperature}`);
  if (!Number.isFinite(mu)) throw new ParameterError('mu', `expected a finite number, got ${mu}`);
  const solver = reuse ?? createClusterSolver(input.shape, nmax, input.solverOptions);
  const g = solver.geometry;
  const h = solver.hamiltonian;
  const sites = g.siteCount;
  const tolerance = input.tolerance ?? 1e-11;
  const maxIterations = input.maxIterations ?? 20_000;
  h.interactionU.fill(interactionU);
  h.muLocal.fill(mu);
  h.bondHopping.fill(hopping);
  const phi = new Float64Array(sites).fill(input.initialPhi ?? 0.5 * Math.sqrt(nmax));
  const warm = new Float64Array(solver.basis.dim);
  let haveWarm = false;
  let change = Infinity;
  let iterations = 0;
  let clusterConverged = true;
  let truncation = 0;
  let out: ClusterObservables = solver.observables;
  const setFields = (): void => {
    for (let k = 0; k < sites; k++) {
      let s = 0;
      for (let e = g.externalStart[k]; e < g.externalStart[k + 1]; e++) s += phi[g.externalImage[e]];
      h.fieldPsi[k] = hopping * s;
    }
  };
  const solve = (): ClusterObservables => {
    const r = temperature > 0 ? solveClusterThermal(solver, temperature, haveWarm ? warm : null) : solveClusterGround(solver, haveWarm ? warm : null);
    warm.set(solver.groundVector);
    haveWarm = true;
    clusterConverged = clusterConverged && r.converged;
    if (r.truncationWeight > truncation) truncation = r.truncationWeight;
    return r;
  };
  while (iterations < maxIterations) {
    setFields();
    out = solve();
    iterations++;
    change = 0;
    for (let i = 0; i < sites; i++) {
      const d = Math.abs(out.phi[i] - phi[i]);
      if (d > change) change = d;
      phi[i] = out.phi[i];
    }
    if (change < tolerance) break;
  }
  // Observables at the final phi (the last solve used the previous iterate's fields).
  setFields();
  out = solve();
  let coupling = 0;
  let meanPhi = 0;
  let meanDensity = 0;
  for (let i = 0; i < sites; i++) {
    coupling += h.fieldPsi[i] * phi[i];
    meanPhi += phi[i];
    meanDensity += out.density[i];
  }
  meanPhi /= sites;
  meanDensity /= sites;
  const omega = (out.energy + coupling) / sites;
  const variance = new Float64Array(sites);
  for (let i = 0; i < sites; i++) variance[i] = out.densitySq[i] - out.density[i] * out.density[i];
  return {
    phi,
    density: Float64Array.from(out.density),
    numberVariance: variance,
    parityOdd: Float64Array.from(out.parityOdd),
    topWeight: Float64Array.from(out.topWeight),
    bondCorrelation: Float64Array.from(out.bondCorrelation),
    meanPhi,
    meanDensity,
    grandPotentialPerSite: omega,
    freeEnergyPerSite: omega + mu * meanDensity,
    entropyPerSite: out.entropy / sites,
    converged: change < tolerance,
    iterations,
    residual: change,
    truncationWeight: truncation,
    clusterConverged,
  };
}
