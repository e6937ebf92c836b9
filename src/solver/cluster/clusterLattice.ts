// Lattice-level cluster mean-field (cluster Gutzwiller) solution of a trapped, disordered
// Bose-Hubbard lattice at fixed chemical potential (Luhmann, arXiv:1608.02905, section on
// inhomogeneous lattices): the lattice is tiled by clusters (clusterTiling.ts); each
// cluster is solved exactly in the fields Psi_i = sum_j J_ij phi_j of its neighbours in
// other clusters, with site potential, interaction and hoppings taken site by site and
// bond by bond from the model; colours of clusters are swept in turn (Gauss-Seidel) until
// max |delta phi| < tolerance.
//
// This is the plain single-threaded reference driver: a colour's clusters are independent,
// so a parallel executor can split them among threads with the same result.
//
// Eigen-solve accuracy follows the relaxation: early sweeps allow a Lanczos residual of
// 1e-3 U times the last change of phi, the measuring pass uses the solver's tight default.
//
// Warm starts. Each cluster keeps its last ground state (if the vectors of all clusters
// fit `warmStartBytes`), otherwise it starts from the product of the single-site
// Gutzwiller ground states in the full field of all its neighbours (src/solver/site). The
// Krylov space of a start vector conserves what the start conserves; with Psi ~ 0 that is
// the boson number, so warm vectors belong to one fixed-mu relaxation and are dropped
// between calls.
//
// Outputs per site: as the single-site solver, plus <b_i^+ b_j> per bond: exact for bonds
// inside a cluster, the factorised phi_i phi_j for the decoupled ones (bondExact = 0).
// Per-site entropy and grand potential: the cluster's share S_C / |C| and
// Omega_C / |C| + Psi_i phi_i, so that the sums over sites are the lattice totals.

import type { LatticeModel } from '../../lattice/latticeModel.js';
import { createSiteWorkspace, solveSiteGround } from '../site/index.js';
import { createClusterSolver, solveClusterGround, solveClusterThermal, type ClusterSolver, type ClusterSolverOptions } from './clusterSolver.js';
import { createClusterTiling, type ClusterTiling } from './clusterTiling.js';
import { productState } from './fockBasis.js';

export interface ClusterLatticeRequest {
  model: LatticeModel;
  /** cluster shape, one extent per lattice axis; all 1 is the single-site method */
  cluster: readonly number[];
  mu: number;
  /** kT, 0 for the ground state */
  temperature: number;
  /** stop when max |delta phi| over a sweep is below this */
  tolerance: number;
  maxSweeps: number;
  /** starting phi per site (default: atomic-limit guess as in the single-site solver) */
  initialPhi?: Float64Array;
  solverOptions?: ClusterSolverOptions;
  /** memory for per-cluster warm-start vectors (default 256 MiB) */
  warmStartBytes?: number;
  /** after each sweep; 'stop' interrupts */
  observer?: (progress: { sweep: number; change: number }) => void | 'stop';
}

export interface ClusterLatticeResult {
  phi: Float64Array;
  density: Float64Array;
  numberVariance: Float64Array;
  parityOdd: Float64Array;
  topWeight: Float64Array;
  entropy: Float64Array;
  /** mean field from other clusters, Psi_i */
  psi: Float64Array;
  grandPotential: Float64Array;
  /** per physical axis, at the bond's storage site: <b_i^+ b_j> (NaN where there is no bond) */
  bondCorrelation: Float64Array[];
  /** per physical axis: 1 where the bond lies inside a cluster (exact correlation) */
  bondExact: Uint8Array[];
  totals: { atoms: number; condensedAtoms: number; grandPotential: number; freeEnergy: number; entropy: number; maxTopWeight: number };
  converged: boolean;
  stopped: boolean;
  sweeps: number;
  residual: number;
  residualHistory: number[];
  /** largest Boltzmann weight of the highest kept state over all cluster solves (T > 0) */
  maxTruncationWeight: number;
  /** every cluster eigen-solve met its tolerance */
  clusterSolvesConverged: boolean;
  matvecs: number;
  clusterCount: number;
  colourCount: number;
  /** warm-start vectors were kept per cluster */
  warmStarts: boolean;
}

interface DriverState {
  model: LatticeModel;
  tiling: ClusterTiling;
  solvers: ClusterSolver[];
  warm: Float64Array[] | null;
  siteWs: ReturnType<typeof createSiteWorkspace>;
  amplitudes: Float64Array[];
  start: Float64Array[];
  phi: Float64Array;
  mu: number;
  temperature: number;
  matvecs: number;
  maxTruncation: number;
  allConverged: boolean;
  /** absolute Lanczos residual allowed in this sweep (0: the solver's default) */
  looseTolerance: number;
}

function hoppingAt(model: LatticeModel, axis: number, site: number): number {
  const h = model.hopping[axis];
  return typeof h === 'number' ? h : h[site];
}

function interactionAt(model: LatticeModel, site: number): number {
  const u = model.interactionU;
  return typeof u === 'number' ? u : u[site];
}

/** Set the inputs of cluster c's solver from the model and the current phi; returns the solver. */
function loadCluster(st: DriverState, c: number): ClusterSolver {
  const t = st.tiling;
  const gi = t.geometryOf[c];
  const solver = st.solvers[gi];
  const h = solver.hamiltonian;
  const s0 = t.siteStart[c];
  const sites = t.siteStart[c + 1] - s0;
  for (let l = 0; l < sites; l++) {
    const g = t.sites[s0 + l];
    h.interactionU[l] = interactionAt(st.model, g);
    h.muLocal[l] = st.mu - st.model.eps[g];
    let psi = 0;
    for (let e = t.externalStart[s0 + l]; e < t.externalStart[s0 + l + 1]; e++) {
      psi += hoppingAt(st.model, t.externalAxis[e], t.externalBondSite[e]) * st.phi[t.externalSite[e]];
    }
    h.fieldPsi[l] = psi;
  }
  const b0 = t.bondStart[c];
  for (let b = 0; b < solver.geometry.bondCount; b++) h.bondHopping[b] = hoppingAt(st.model, t.bondAxis[b0 + b], t.bondSite[b0 + b]);
  return solver;
}

/** Product of single-site Gutzwiller ground states in the full field of all neighbours. */
function productStart(st: DriverState, c: number, solver: ClusterSolver): Float64Array {
  const g = solver.geometry;
  const h = solver.hamiltonian;
  const t = st.tiling;
  const s0 = t.siteStart[c];
  const base = solver.basis.base;
  const amp = st.amplitudes[t.geometryOf[c]];
  for (let l = 0; l < g.siteCount; l++) {
    let psi = h.fieldPsi[l];
    for (let b = 0; b < g.bondCount; b++) {
      if (g.bondSiteA[b] === l) psi += h.bondHopping[b] * st.phi[t.sites[s0 + g.bondSiteB[b]]];
      else if (g.bondSiteB[b] === l) psi += h.bondHopping[b] * st.phi[t.sites[s0 + g.bondSiteA[b]]];
    }
    solveSiteGround(st.siteWs, h.interactionU[l], h.muLocal[l], psi, NaN);
    for (let n = 0; n < base; n++) amp[l * base + n] = st.siteWs.amplitudes[n];
  }
  const out = st.start[t.geometryOf[c]];
  productState(solver.basis, amp, out);
  return out;
}

/** Solve cluster c at the current fields. */
function solveCluster(st: DriverState, c: number): ClusterSolver {
  const solver = loadCluster(st, c);
  const iterative = st.temperature > 0 ? solver.thermalMethod === 'lanczos' : solver.method === 'lanczos';
  let start: Float64Array | null = null;
  if (iterative) start = st.warm !== null && st.warm[c].length > 0 && st.warm[c][0] === st.warm[c][0] ? st.warm[c] : productStart(st, c, solver);
  const out =
    st.temperature > 0 ? solveClusterThermal(solver, st.temperature, start, st.looseTolerance) : solveClusterGround(solver, start, st.looseTolerance);
  if (iterative && st.warm !== null) st.warm[c].set(solver.groundVector);
  st.matvecs += out.matvecs;
  if (!out.converged) st.allConverged = false;
  if (out.truncationWeight > st.maxTruncation) st.maxTruncation = out.truncationWeight;
  return solver;
}

export function solveClusterLattice(request: ClusterLatticeRequest): ClusterLatticeResult {
  const { model, mu, temperature, tolerance, maxSweeps } = request;
  const geometry = model.geometry;
  const n = geometry.siteCount;
  const tiling = createClusterTiling(geometry.shape, geometry.periodic, request.cluster);
  const solvers = tiling.geometries.map((g) => createClusterSolver(g.shape, model.nmax, request.solverOptions));
  const phi = request.initialPhi ? Float64Array.from(request.initialPhi) : atomicGuess(model, mu);
  if (phi.length !== n) throw new Error(`initialPhi: expected ${n} values, got ${phi.length}`);
  let warmBytes = 0;
  for (let c = 0; c < tiling.clusterCount; c++) warmBytes += 8 * solvers[tiling.geometryOf[c]].basis.dim;
  const keepWarm = warmBytes <= (request.warmStartBytes ?? 256 * 1024 * 1024);
  const st: DriverState = {
    model,
    tiling,
    solvers,
    warm: keepWarm ? Array.from({ length: tiling.clusterCount }, (_, c) => new Float64Array(solvers[tiling.geometryOf[c]].basis.dim).fill(NaN)) : null,
    siteWs: createSiteWorkspace(model.nmax),
    amplitudes: solvers.map((s) => new Float64Array(s.basis.sites * s.basis.base)),
    start: solvers.map((s) => new Float64Array(s.basis.dim)),
    phi,
    mu,
    temperature,
    matvecs: 0,
    maxTruncation: 0,
    allConverged: true,
    looseTolerance: 0,
  };
  // Inexact early sweeps: the eigen-solves need only be accurate to a small fraction of the
  // change of phi per sweep (common practice for nested iterations); the residual allowed
  // is 1e-3 U_max times the last sweep's change, and the measuring pass is solved tight.
  let uMax = 0;
  for (let i = 0; i < n; i++) uMax = Math.max(uMax, interactionAt(model, i));

  const history: number[] = [];
  let sweeps = 0;
  let change = Infinity;
  let converged = false;
  let stopped = false;
  while (sweeps < maxSweeps) {
    change = 0;
    for (let colour = 0; colour < tiling.colourCount; colour++) {
      for (let k = tiling.colourStart[colour]; k < tiling.colourStart[colour + 1]; k++) {
        const c = tiling.colourOrder[k];
        const solver = solveCluster(st, c);
        const s0 = tiling.siteStart[c];
        const out = solver.observables;
        for (let l = 0; l < solver.geometry.siteCount; l++) {
          const g = tiling.sites[s0 + l];
          const d = Math.abs(out.phi[l] - phi[g]);
          if (d > change) change = d;
          phi[g] = out.phi[l];
        }
      }
    }
    sweeps++;
    history.push(change);
    st.looseTolerance = 1e-3 * uMax * Math.min(change, 1);
    if (change < tolerance) {
      converged = true;
      break;
    }
    if (!(change === change)) break;
    if (request.observer?.({ sweep: sweeps, change }) === 'stop') {
      stopped = true;
      break;
    }
  }
  st.looseTolerance = 0;
  return measure(st, { converged, stopped, sweeps, change, history });
}

/** 0.5 sqrt(n_atomic) + 0.05 per site, the single-site solver's starting field. */
function atomicGuess(model: LatticeModel, mu: number): Float64Array {
  const out = new Float64Array(model.geometry.siteCount);
  for (let i = 0; i < out.length; i++) {
    const local = mu - model.eps[i];
    const occupation = local <= 0 ? 0 : Math.min(model.nmax, Math.ceil(local / interactionAt(model, i)));
    out[i] = 0.5 * Math.sqrt(occupation) + 0.05;
  }
  return out;
}

function measure(
  st: DriverState,
  run: { converged: boolean; stopped: boolean; sweeps: number; change: number; history: number[] },
): ClusterLatticeResult {
  const { model, tiling, phi } = st;
  const n = model.geometry.siteCount;
  const dims = model.geometry.dims;
  const density = new Float64Array(n);
  const variance = new Float64Array(n);
  const parity = new Float64Array(n);
  const top = new Float64Array(n);
  const entropy = new Float64Array(n);
  const psiOut = new Float64Array(n);
  const omega = new Float64Array(n);
  const bondCorrelation = Array.from({ length: dims }, () => new Float64Array(n).fill(NaN));
  const bondExact = Array.from({ length: dims }, () => new Uint8Array(n));
  for (let c = 0; c < tiling.clusterCount; c++) {
    const solver = solveCluster(st, c);
    const out = solver.observables;
    const h = solver.hamiltonian;
    const s0 = tiling.siteStart[c];
    const size = solver.geometry.siteCount;
    for (let l = 0; l < size; l++) {
      const g = tiling.sites[s0 + l];
      density[g] = out.density[l];
      variance[g] = out.densitySq[l] - out.density[l] * out.density[l];
      parity[g] = out.parityOdd[l];
      top[g] = out.topWeight[l];
      entropy[g] = out.entropy / size;
      psiOut[g] = h.fieldPsi[l];
      omega[g] = out.energy / size + h.fieldPsi[l] * phi[g];
      // Decoupled bonds stored at this site: the factorised correlation.
      for (let e = tiling.externalStart[s0 + l]; e < tiling.externalStart[s0 + l + 1]; e++) {
        if (tiling.externalBondSite[e] === g) bondCorrelation[tiling.externalAxis[e]][g] = phi[g] * phi[tiling.externalSite[e]];
      }
    }
    const b0 = tiling.bondStart[c];
    for (let b = 0; b < solver.geometry.bondCount; b++) {
      const axis = tiling.bondAxis[b0 + b];
      const site = tiling.bondSite[b0 + b];
      bondCorrelation[axis][site] = out.bondCorrelation[b];
      bondExact[axis][site] = 1;
    }
  }
  let atoms = 0;
  let condensed = 0;
  let grand = 0;
  let s = 0;
  let maxTop = 0;
  for (let i = 0; i < n; i++) {
    atoms += density[i];
    condensed += phi[i] * phi[i];
    grand += omega[i];
    s += entropy[i];
    if (top[i] > maxTop) maxTop = top[i];
  }
  return {
    phi,
    density,
    numberVariance: variance,
    parityOdd: parity,
    topWeight: top,
    entropy,
    psi: psiOut,
    grandPotential: omega,
    bondCorrelation,
    bondExact,
    totals: { atoms, condensedAtoms: condensed, grandPotential: grand, freeEnergy: grand + st.mu * atoms, entropy: s, maxTopWeight: maxTop },
    converged: run.converged,
    stopped: run.stopped,
    sweeps: run.sweeps,
    residual: run.change,
    residualHistory: run.history,
    maxTruncationWeight: st.maxTruncation,
    clusterSolvesConverged: st.allConverged,
    matvecs: st.matvecs,
    clusterCount: tiling.clusterCount,
    colourCount: tiling.colourCount,
    warmStarts: st.warm !== null,
  };
}
