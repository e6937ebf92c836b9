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
import type { MeasureFields } from '../sweepKernel.js';
import { sumSiteTotals } from '../latticeSolve.js';
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
  /** per-cluster warm vectors, allocated at a cluster's first iterative solve (null: not kept) */
  warm: Array<Float64Array | null> | null;
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
  const kept = st.warm !== null ? st.warm[c] : null;
  if (iterative) start = kept !== null && kept[0] === kept[0] ? kept : productStart(st, c, solver);
  const out =
    st.temperature > 0 ? solveClusterThermal(solver, st.temperature, start, st.looseTolerance) : solveClusterGround(solver, start, st.looseTolerance);
  if (iterative && st.warm !== null) {
    if (st.warm[c] === null) st.warm[c] = new Float64Array(solver.basis.dim);
    st.warm[c]!.set(solver.groundVector);
  }
  st.matvecs += out.matvecs;
  if (!out.converged) st.allConverged = false;
  if (out.truncationWeight > st.maxTruncation) st.maxTruncation = out.truncationWeight;
  return solver;
}

/** What a driver needs besides the model: the cluster shape and the eigen-solver settings. */
export interface ClusterDriverOptions {
  cluster: readonly number[];
  solverOptions?: ClusterSolverOptions;
  /** memory for per-cluster warm-start vectors (default 256 MiB) */
  warmStartBytes?: number;
}

/**
 * The sweep machinery of the cluster method over one lattice, reading and writing the
 * caller's phi array in place: `sweep` is one block Gauss-Seidel pass over every colour
 * at (mu, kT), `measure` solves every cluster tight at the current phi and fills the
 * per-site fields. Used by solveClusterLattice (its own loop) and by the cluster sweep
 * executor (clusterSweepExecutor.ts: the solver's relaxation, fixed-N and fixed-S searches).
 */
export interface ClusterDriver {
  readonly tiling: ClusterTiling;
  readonly phi: Float64Array;
  readonly warmStarts: boolean;
  /** one sweep over every colour; writes new - old phi into `delta` when given; returns max |delta phi| */
  sweep(mu: number, temperature: number, delta?: Float64Array): number;
  /**
   * One colour, or this thread's share of it (the colour's clusters split into `share.count`
   * contiguous blocks): the building block of parallel sweeps. The eigen-solves may stop
   * at the absolute residual `looseTolerance` (0: tight); the caller keeps the policy, so
   * that every thread uses the same value. Returns max |delta phi| (NaN if phi became NaN).
   */
  sweepColour(colour: number, mu: number, temperature: number, looseTolerance: number, delta?: Float64Array, share?: ClusterShare): number;
  /** tight solve of every cluster (or of this share of all clusters) at the current phi, into `out` */
  measure(mu: number, temperature: number, out: ClusterMeasureTargets, share?: ClusterShare): void;
  /** the loose residual the single-threaded sweep uses after a sweep with this change */
  looseToleranceAfter(change: number): number;
  /** cumulative matrix-vector products, largest thermal truncation weight, all eigen-solves converged */
  statistics(): { matvecs: number; maxTruncationWeight: number; clusterSolvesConverged: boolean };
}

/** Block `index` of `count` contiguous blocks of a list of clusters. */
export interface ClusterShare {
  index: number;
  count: number;
}

function shareRange(first: number, end: number, share: ClusterShare | undefined): [number, number] {
  if (share === undefined) return [first, end];
  const n = end - first;
  return [first + Math.floor((n * share.index) / share.count), first + Math.floor((n * (share.index + 1)) / share.count)];
}

/** Arrays `measure` fills: the solver's measured fields, plus the bonds per physical axis. */
export interface ClusterMeasureTargets extends MeasureFields {
  bondCorrelation: Float64Array[];
  bondExact: Uint8Array[];
}

export function createClusterDriver(model: LatticeModel, phi: Float64Array, options: ClusterDriverOptions): ClusterDriver {
  const geometry = model.geometry;
  const n = geometry.siteCount;
  if (phi.length !== n) throw new Error(`initialPhi: expected ${n} values, got ${phi.length}`);
  const tiling = createClusterTiling(geometry.shape, geometry.periodic, options.cluster);
  const solvers = tiling.geometries.map((g) => createClusterSolver(g.shape, model.nmax, options.solverOptions));
  let warmBytes = 0;
  for (let c = 0; c < tiling.clusterCount; c++) warmBytes += 8 * solvers[tiling.geometryOf[c]].basis.dim;
  const keepWarm = warmBytes <= (options.warmStartBytes ?? 256 * 1024 * 1024);
  const st: DriverState = {
    model,
    tiling,
    solvers,
    warm: keepWarm ? Array.from({ length: tiling.clusterCount }, () => null) : null,
    siteWs: createSiteWorkspace(model.nmax),
    amplitudes: solvers.map((s) => new Float64Array(s.basis.sites * s.basis.base)),
    start: solvers.map((s) => new Float64Array(s.basis.dim)),
    phi,
    mu: NaN,
    temperature: NaN,
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
  /** A new (mu, kT): warm vectors and the loose tolerance belong to the old one. */
  const enter = (mu: number, temperature: number): void => {
    if (mu === st.mu && temperature === st.temperature) return;
    st.mu = mu;
    st.temperature = temperature;
    st.looseTolerance = 0;
    if (st.warm !== null) for (const w of st.warm) if (w !== null) w[0] = NaN;
  };
  const looseToleranceAfter = (change: number): number => 1e-3 * uMax * Math.min(change, 1);
  const sweepColour = (colour: number, mu: number, temperature: number, loose: number, delta?: Float64Array, share?: ClusterShare): number => {
    enter(mu, temperature);
    st.looseTolerance = loose;
    let change = 0;
    let failed = false; // a NaN phi: reported as a NaN change (not converged)
    const [k0, k1] = shareRange(tiling.colourStart[colour], tiling.colourStart[colour + 1], share);
    for (let k = k0; k < k1; k++) {
      const c = tiling.colourOrder[k];
      const solver = solveCluster(st, c);
      const s0 = tiling.siteStart[c];
      const out = solver.observables;
      for (let l = 0; l < solver.geometry.siteCount; l++) {
        const g = tiling.sites[s0 + l];
        const step = out.phi[l] - phi[g];
        const d = Math.abs(step);
        if (d > change) change = d;
        else if (d !== d) failed = true;
        if (delta !== undefined) delta[g] = step;
        phi[g] = out.phi[l];
      }
    }
    return failed ? NaN : change;
  };
  return {
    tiling,
    phi,
    warmStarts: keepWarm,
    sweep(mu, temperature, delta) {
      enter(mu, temperature);
      const loose = st.looseTolerance;
      let change = 0;
      for (let colour = 0; colour < tiling.colourCount; colour++) {
        const c = sweepColour(colour, mu, temperature, loose, delta);
        if (c !== c) change = NaN;
        else if (c > change) change = c;
      }
      if (change !== change) return NaN;
      st.looseTolerance = looseToleranceAfter(change);
      return change;
    },
    sweepColour,
    looseToleranceAfter,
    measure(mu, temperature, out, share) {
      enter(mu, temperature);
      st.looseTolerance = 0;
      measureInto(st, out, share);
    },
    statistics: () => ({ matvecs: st.matvecs, maxTruncationWeight: st.maxTruncation, clusterSolvesConverged: st.allConverged }),
  };
}

export function solveClusterLattice(request: ClusterLatticeRequest): ClusterLatticeResult {
  const { model, mu, temperature, tolerance, maxSweeps } = request;
  const n = model.geometry.siteCount;
  const dims = model.geometry.dims;
  const phi = request.initialPhi ? Float64Array.from(request.initialPhi) : atomicGuess(model, mu);
  const driver = createClusterDriver(model, phi, {
    cluster: request.cluster,
    ...(request.solverOptions ? { solverOptions: request.solverOptions } : {}),
    ...(request.warmStartBytes !== undefined ? { warmStartBytes: request.warmStartBytes } : {}),
  });
  const history: number[] = [];
  let sweeps = 0;
  let change = Infinity;
  let converged = false;
  let stopped = false;
  while (sweeps < maxSweeps) {
    change = driver.sweep(mu, temperature);
    sweeps++;
    history.push(change);
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
  const f = () => new Float64Array(n);
  const out: ClusterMeasureTargets = {
    density: f(),
    densitySq: f(),
    parityOdd: f(),
    topWeight: f(),
    entropy: f(),
    psi: f(),
    grandPotential: f(),
    bondCorrelation: Array.from({ length: dims }, () => new Float64Array(n).fill(NaN)),
    bondExact: Array.from({ length: dims }, () => new Uint8Array(n)),
  };
  driver.measure(mu, temperature, out);
  const variance = new Float64Array(n);
  for (let i = 0; i < n; i++) variance[i] = out.densitySq[i] - out.density[i] * out.density[i];
  const { maxTopWeightSite: _site, ...totals } = sumSiteTotals({ phi, density: out.density, grandPotential: out.grandPotential, entropy: out.entropy, topWeight: out.topWeight }, mu);
  const stats = driver.statistics();
  return {
    phi,
    density: out.density,
    numberVariance: variance,
    parityOdd: out.parityOdd,
    topWeight: out.topWeight,
    entropy: out.entropy,
    psi: out.psi,
    grandPotential: out.grandPotential,
    bondCorrelation: out.bondCorrelation,
    bondExact: out.bondExact,
    totals,
    converged,
    stopped,
    sweeps,
    residual: change,
    residualHistory: history,
    maxTruncationWeight: stats.maxTruncationWeight,
    clusterSolvesConverged: stats.clusterSolvesConverged,
    matvecs: stats.matvecs,
    clusterCount: driver.tiling.clusterCount,
    colourCount: driver.tiling.colourCount,
    warmStarts: driver.warmStarts,
  };
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

/** Solve every cluster at the current phi (tight) and write the per-site fields. */
function measureInto(st: DriverState, out: ClusterMeasureTargets, share?: ClusterShare): void {
  const { tiling, phi } = st;
  if (share === undefined) {
    for (const b of out.bondCorrelation) b.fill(NaN);
    for (const b of out.bondExact) b.fill(0);
  }
  const [c0, c1] = shareRange(0, tiling.clusterCount, share);
  for (let c = c0; c < c1; c++) {
    const solver = solveCluster(st, c);
    const obs = solver.observables;
    const h = solver.hamiltonian;
    const s0 = tiling.siteStart[c];
    const size = solver.geometry.siteCount;
    for (let l = 0; l < size; l++) {
      const g = tiling.sites[s0 + l];
      out.density[g] = obs.density[l];
      out.densitySq[g] = obs.densitySq[l];
      out.parityOdd[g] = obs.parityOdd[l];
      out.topWeight[g] = obs.topWeight[l];
      out.entropy[g] = obs.entropy / size;
      out.psi[g] = h.fieldPsi[l];
      out.grandPotential[g] = obs.energy / size + h.fieldPsi[l] * phi[g];
      // Decoupled bonds stored at this site: the factorised correlation.
      for (let e = tiling.externalStart[s0 + l]; e < tiling.externalStart[s0 + l + 1]; e++) {
        if (tiling.externalBondSite[e] === g) out.bondCorrelation[tiling.externalAxis[e]][g] = phi[g] * phi[tiling.externalSite[e]];
      }
    }
    const b0 = tiling.bondStart[c];
    for (let b = 0; b < solver.geometry.bondCount; b++) {
      const axis = tiling.bondAxis[b0 + b];
      const site = tiling.bondSite[b0 + b];
      out.bondCorrelation[axis][site] = obs.bondCorrelation[b];
      out.bondExact[axis][site] = 1;
    }
  }
}
