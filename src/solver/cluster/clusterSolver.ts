// The cluster problem of cluster mean-field theory at given fields: ground state (T = 0)
// or thermal state rho = exp(-H_C / kT) / Z (T > 0) of the cluster Hamiltonian
// (clusterHamiltonian.ts), and its observables (clusterObservables.ts).
//
// Eigen-solver by dimension. Ground state: up to `denseMaxStates` Fock states a dense
// Householder reduction with QL eigenvalues and one inverse-iteration eigenvector
// (partialSymmetricEigen.ts), above it the Lanczos method (blockLanczos.ts, block size 1)
// warm-started from the caller's vector (the previous sweep's state, or a product of
// single-site states). Thermal state: dense up to `thermalDenseMaxStates` (all eigenvalues;
// eigenvectors of every state with a Boltzmann weight above 1e-17 of the ground state's,
// so the omitted ones change nothing at double precision), above it block Lanczos (default
// block 4) for the lowest k states. The thresholds come from bench/clusterBench.mjs: for the
// ground state the dense path wins up to ~100-150 states (dim 81: 0.6 ms against 1.8 ms
// for a cold Lanczos; dim 256: 22 ms against 4 ms); at kT ~ 0.1 U the thermal state of a
// 2x2 cluster needs 60-170 states, where the dense path is 5-15x cheaper than block
// Lanczos (2x2, nmax 3: 56 ms against 0.8 s).
//
// Thermal truncation. With Lanczos only the lowest k states enter Z; the Boltzmann weight
// of the highest kept one, w_k = exp(-(E_k - E_0)/kT) / Z, bounds the weight of each
// discarded state (all lie higher), and is reported. k starts at `thermalStates` and is
// doubled (up to `maxThermalStates`) until w_k <= `thermalWeightMax`; if the cap is hit
// the result says so (truncationWeight above the target).

import { createClusterGeometry, type ClusterGeometry } from './clusterGeometry.js';
import { createFockBasis, type FockBasis } from './fockBasis.js';
import { createClusterHamiltonian, denseFromSparse, updateClusterHamiltonian, type ClusterHamiltonian } from './clusterHamiltonian.js';
import { createPartialEigenWorkspace, partialEigenvalues, partialEigenvectors, type PartialEigenWorkspace } from './partialSymmetricEigen.js';
import { createLanczosWorkspace, lanczosLowest, type LanczosWorkspace } from './blockLanczos.js';
import { accumulateState, clearStateAverages, createClusterObservables, type ClusterObservables } from './clusterObservables.js';

export interface ClusterSolverOptions {
  /** T = 0: dense eigen-solve up to this Fock dimension, Lanczos above (default 128) */
  denseMaxStates?: number;
  /** T > 0: dense eigen-solve up to this Fock dimension, block Lanczos above (default 1296) */
  thermalDenseMaxStates?: number;
  /** Lanczos basis size for the ground state (default 24) */
  lanczosBasis?: number;
  /** Ritz residual tolerance relative to the energy scale of H (default 1e-12) */
  residualTolerance?: number;
  /** cap on matrix-vector products per Lanczos call (default 4000) */
  maxMatvecs?: number;
  /** thermal Lanczos: block size (default 4, >= the largest degeneracy expected) */
  thermalBlockSize?: number;
  /** thermal Lanczos: initial number of kept states (default 16) */
  thermalStates?: number;
  /** thermal Lanczos: largest number of kept states (default 256) */
  maxThermalStates?: number;
  /** thermal Lanczos: target Boltzmann weight of the highest kept state (default 1e-10) */
  thermalWeightMax?: number;
}

export interface ClusterSolver {
  readonly geometry: ClusterGeometry;
  readonly basis: FockBasis;
  /** fill hamiltonian.interactionU / muLocal / bondHopping / fieldPsi before a solve */
  readonly hamiltonian: ClusterHamiltonian;
  /** T = 0 method */
  readonly method: 'dense' | 'lanczos';
  /** T > 0 method */
  readonly thermalMethod: 'dense' | 'lanczos';
  readonly options: Required<ClusterSolverOptions>;
  /** dense workspace, created at the first dense solve */
  dense: PartialEigenWorkspace | null;
  readonly ground: LanczosWorkspace | null;
  /** created at the first thermal Lanczos solve */
  thermal: LanczosWorkspace | null;
  /** the ground state after a solve (also the warm start a caller may keep) */
  readonly groundVector: Float64Array;
  readonly observables: ClusterObservables;
  /** Boltzmann weights of the kept states of the last thermal solve */
  weights: Float64Array;
}

const DEFAULTS: Required<ClusterSolverOptions> = {
  denseMaxStates: 128,
  thermalDenseMaxStates: 1296,
  lanczosBasis: 24,
  residualTolerance: 1e-12,
  maxMatvecs: 4000,
  thermalBlockSize: 4,
  thermalStates: 16,
  maxThermalStates: 256,
  thermalWeightMax: 1e-10,
};

export function createClusterSolver(shape: readonly number[], nmax: number, options: ClusterSolverOptions = {}): ClusterSolver {
  const geometry = createClusterGeometry(shape);
  const basis = createFockBasis(geometry.siteCount, nmax);
  const opts = { ...DEFAULTS, ...options };
  const hamiltonian = createClusterHamiltonian(geometry, basis);
  // Lanczos needs dim > basis + block; smaller spaces always go dense.
  const method = basis.dim > opts.lanczosBasis + 1 && basis.dim > opts.denseMaxStates ? 'lanczos' : 'dense';
  const thermalMethod = basis.dim > 8 * opts.thermalBlockSize + 4 && basis.dim > opts.thermalDenseMaxStates ? 'lanczos' : 'dense';
  return {
    geometry,
    basis,
    hamiltonian,
    method,
    thermalMethod,
    options: opts,
    dense: null,
    ground: method === 'lanczos' ? createLanczosWorkspace(basis.dim, { blockSize: 1, maxBasis: opts.lanczosBasis, maxWanted: 1 }) : null,
    thermal: null,
    groundVector: new Float64Array(basis.dim),
    observables: createClusterObservables(geometry),
    weights: new Float64Array(thermalMethod === 'dense' ? basis.dim : opts.maxThermalStates),
  };
}

/**
 * A bound on ||H_C|| from the inputs (used to make tolerances relative):
 * sum_i (U_i nmax(nmax-1)/2 + |mu_i| nmax + 2 Psi_i sqrt(nmax)) + sum_b 2 J_b nmax.
 */
export function clusterEnergyScale(h: ClusterHamiltonian): number {
  const nmax = h.basis.nmax;
  let s = 0;
  for (let i = 0; i < h.basis.sites; i++) {
    s += 0.5 * Math.abs(h.interactionU[i]) * nmax * (nmax - 1) + Math.abs(h.muLocal[i]) * nmax + 2 * Math.abs(h.fieldPsi[i]) * Math.sqrt(nmax);
  }
  for (let b = 0; b < h.bondHopping.length; b++) s += 2 * Math.abs(h.bondHopping[b]) * nmax;
  return s > 0 ? s : 1;
}

/**
 * Ground state at the current inputs. `warm` (dim values, any norm; null for none) starts
 * the Lanczos iteration; the dense path ignores it. `looseTolerance` (absolute residual,
 * energy units) relaxes the Lanczos tolerance, e.g. in early sweeps of a relaxation.
 * Observables in solver.observables, the state in solver.groundVector.
 */
export function solveClusterGround(solver: ClusterSolver, warm: Float64Array | null, looseTolerance = 0): ClusterObservables {
  const h = solver.hamiltonian;
  const out = solver.observables;
  const dim = solver.basis.dim;
  updateClusterHamiltonian(h);
  clearStateAverages(out);
  if (solver.method === 'dense') {
    const ws = denseWorkspace(solver);
    denseFromSparse(h.matrix, ws.a);
    const ok = partialEigenvalues(ws, dim);
    partialEigenvectors(ws, dim, 1);
    for (let s = 0; s < dim; s++) solver.groundVector[s] = ws.vectors[s];
    out.groundEnergy = ws.values[0];
    out.converged = ok;
    out.matvecs = 0;
    out.residual = ws.residual;
    out.method = 'dense';
  } else {
    const ws = solver.ground as LanczosWorkspace;
    const tol = Math.max(solver.options.residualTolerance * clusterEnergyScale(h), looseTolerance);
    lanczosLowest(ws, h.matrix, 1, warm, warm === null ? 0 : 1, tol, solver.options.maxMatvecs);
    // Fix the sign: the ground state is non-negative (Perron-Frobenius, all off-diagonal
    // elements <= 0), so phi_i >= 0; choose the sign with a positive component sum.
    let sum = 0;
    for (let s = 0; s < dim; s++) sum += ws.vectors[s];
    const sign = sum < 0 ? -1 : 1;
    for (let s = 0; s < dim; s++) solver.groundVector[s] = sign * ws.vectors[s];
    out.groundEnergy = ws.values[0];
    out.converged = ws.converged;
    out.matvecs = ws.matvecs;
    out.residual = ws.residual;
    out.method = 'lanczos';
  }
  if (solver.method === 'dense') fixSign(solver.groundVector, dim);
  accumulateState(solver.geometry, solver.basis, h.sqrtInteger, solver.groundVector, 0, 1, out);
  out.energy = out.groundEnergy;
  out.entropy = 0;
  out.keptStates = 1;
  out.truncationWeight = 0;
  out.exhaustive = false;
  return out;
}

function denseWorkspace(solver: ClusterSolver): PartialEigenWorkspace {
  solver.dense ??= createPartialEigenWorkspace(solver.basis.dim);
  return solver.dense;
}

function fixSign(v: Float64Array, dim: number): void {
  let sum = 0;
  for (let s = 0; s < dim; s++) sum += v[s];
  if (sum < 0) for (let s = 0; s < dim; s++) v[s] = -v[s];
}

/**
 * Thermal state at temperature kT > 0 (energy units of H). `warm` and `looseTolerance` as in
 * solveClusterGround (used as the first start vector of the thermal block). The lowest
 * eigenvector is left in solver.groundVector.
 */
/** Thermal Lanczos workspaces of each solver, by kept states and basis size. */
const thermalWorkspaces = new WeakMap<ClusterSolver, Map<number, LanczosWorkspace>>();

export function solveClusterThermal(solver: ClusterSolver, temperature: number, warm: Float64Array | null, looseTolerance = 0): ClusterObservables {
  if (!(temperature > 0)) throw new Error(`temperature: expected kT > 0 for the thermal cluster state, got ${temperature}`);
  const h = solver.hamiltonian;
  const out = solver.observables;
  const dim = solver.basis.dim;
  updateClusterHamiltonian(h);
  clearStateAverages(out);
  let values: Float64Array;
  let vectors: Float64Array;
  let kept: number;
  if (solver.thermalMethod === 'dense') {
    const ws = denseWorkspace(solver);
    denseFromSparse(h.matrix, ws.a);
    out.converged = partialEigenvalues(ws, dim);
    // Keep every state with exp(-(E - E0)/kT) > 1e-17 (x < 39.1).
    kept = 1;
    while (kept < dim && (ws.values[kept] - ws.values[0]) / temperature < 39.1) kept++;
    partialEigenvectors(ws, dim, kept);
    out.matvecs = 0;
    out.residual = ws.residual;
    out.method = 'dense';
    values = ws.values;
    vectors = ws.vectors;
    out.exhaustive = true;
  } else {
    const o = solver.options;
    const cap = Math.min(o.maxThermalStates, dim - 3 * o.thermalBlockSize - 1);
    let k = Math.min(o.thermalStates, cap);
    let matvecs = 0;
    for (;;) {
      const basisSize = Math.min(dim - o.thermalBlockSize - 1, Math.max(2 * k + 4 * o.thermalBlockSize, 3 * k));
      // One workspace per (k, basis size): the Lanczos basis size is the workspace's, so a
      // workspace enlarged for one cluster must not change the solve of the next (results
      // would then depend on which clusters a thread solved before, i.e. on the thread count).
      let byShape = thermalWorkspaces.get(solver);
      if (byShape === undefined) thermalWorkspaces.set(solver, (byShape = new Map()));
      let ws = byShape.get(k * 100_003 + basisSize) ?? null;
      if (ws === null) {
        ws = createLanczosWorkspace(dim, { blockSize: o.thermalBlockSize, maxBasis: basisSize, maxWanted: k });
        byShape.set(k * 100_003 + basisSize, ws);
      }
      solver.thermal = ws;
      const tol = Math.max(o.residualTolerance * clusterEnergyScale(h), looseTolerance);
      lanczosLowest(ws, h.matrix, k, warm, warm === null ? 0 : 1, tol, o.maxMatvecs);
      matvecs += ws.matvecs;
      const top = Math.exp(-(ws.values[k - 1] - ws.values[0]) / temperature);
      let z = 0;
      for (let j = 0; j < k; j++) z += Math.exp(-(ws.values[j] - ws.values[0]) / temperature);
      out.converged = ws.converged;
      out.residual = ws.residual;
      values = ws.values;
      vectors = ws.vectors;
      kept = k;
      if (top / z <= o.thermalWeightMax || k >= cap) break;
      k = Math.min(2 * k, cap);
    }
    out.matvecs = matvecs;
    out.method = 'lanczos';
    out.exhaustive = false;
  }
  if (solver.weights.length < kept) solver.weights = new Float64Array(kept);
  const w = solver.weights;
  const e0 = values[0];
  const beta = 1 / temperature;
  let z = 0;
  let meanExcess = 0;
  let used = 0;
  for (let j = 0; j < kept; j++) {
    const x = (values[j] - e0) * beta;
    if (x > 745) break; // exp underflows; values ascending
    const wj = Math.exp(-x);
    w[j] = wj;
    z += wj;
    meanExcess += wj * x;
    used = j + 1;
  }
  const invZ = 1 / z;
  for (let j = 0; j < used; j++) {
    // Each eigenvector's overall sign does not matter for the expectation values.
    accumulateState(solver.geometry, solver.basis, h.sqrtInteger, vectors, j * dim, w[j] * invZ, out);
  }
  for (let s = 0; s < dim; s++) solver.groundVector[s] = vectors[s];
  fixSign(solver.groundVector, dim);
  out.groundEnergy = e0;
  out.energy = e0 - temperature * Math.log(z);
  out.entropy = Math.log(z) + meanExcess * invZ;
  out.keptStates = kept;
  // A dense solve keeps every state within 1e-17 of the ground state's weight: nothing that
  // matters is dropped, and the highest kept state's weight (which may be large when the
  // whole Fock space is kept) measures no truncation.
  out.truncationWeight = out.exhaustive ? 0 : (used === kept ? w[kept - 1] : 0) * invZ;
  // phi >= 0 gauge: the thermal average does not depend on eigenvector signs, and the
  // ground-state sign convention makes phi_i >= 0 for Psi_i >= 0.
  return out;
}
