// Linear response of a Mott cluster to the mean fields at T = 0: the criterion for the
// edge of a Mott lobe in cluster mean-field theory (the stability analysis of the phi = 0
// fixed point of the self-consistency map, as in Buonsante, Penna & Vezzani, Laser Phys.
// 15, 361 (2005), and the susceptibility criterion of McIntosh et al., arXiv:1111.4102).
//
// At Psi = 0 the cluster Hamiltonian conserves the boson number; in the Mott state of
// filling n its ground state |0> lies in the sector N = n * sites. Second-order
// perturbation theory in the fields, H = H_0 - sum_k Psi_k (b_k^+ + b_k), gives
//
//   <b_i> = sum_k chi_ik Psi_k,
//   chi_ik = <0| b_i R_+ b_k^+ |0> + <0| b_k^+ R_- b_i |0>,   R_+- = (H_0 - E_0)^{-1} on N +- 1,
//
// (chi is symmetric with non-negative entries: H_0 - E_0 is an M-matrix on each sector).
// In the uniform embedding Psi = J A phi, with A_kj the number of external bonds of site k
// whose periodic image is site j (clusterGeometry.ts), so phi = J chi A phi, and phi = 0
// becomes unstable when J lambda(J) = 1, lambda the Perron root of chi A. lambda is found
// by power iteration with Collatz-Wielandt bounds min_i (Mx)_i/x_i <= lambda <= max_i
// (Mx)_i/x_i, each product being two conjugate-gradient solves in the N +- 1 sectors
// (for a cluster whose sites are all equivalent the uniform vector is exact at once).
//
// The Mott sector must hold the cluster ground state: the lowest energies of N +- 1 are
// checked, and `mottGround` is false when one of them lies lower (the cluster has left
// the lobe through a level crossing before the linear instability).

import { createClusterGeometry, type ClusterGeometry } from './clusterGeometry.js';
import { createFockBasis, numberSector, type FockBasis, type NumberSector } from './fockBasis.js';
import { createClusterHamiltonian, denseFromSparse, updateClusterHamiltonian, type ClusterHamiltonian } from './clusterHamiltonian.js';
import { createPartialEigenWorkspace, partialEigenvalues, partialEigenvectors, type PartialEigenWorkspace } from './partialSymmetricEigen.js';
import { createLanczosWorkspace, lanczosLowest, type LanczosWorkspace } from './blockLanczos.js';
import { conjugateGradient, createConjugateGradientWorkspace, type ConjugateGradientWorkspace } from './conjugateGradient.js';

/** Sector dimension up to which the lowest state comes from the dense solver. */
const DENSE_SECTOR_MAX = 100;

interface SectorProblem {
  sector: NumberSector;
  hamiltonian: ClusterHamiltonian;
  dense: PartialEigenWorkspace | null;
  lanczos: LanczosWorkspace | null;
  /** lowest eigenvector after lowestState */
  vector: Float64Array;
  energy: number;
}

export interface MottResponseWorkspace {
  readonly geometry: ClusterGeometry;
  readonly basis: FockBasis;
  readonly filling: number;
  readonly particles: number;
  readonly centre: SectorProblem;
  readonly plus: SectorProblem | null;
  readonly minus: SectorProblem | null;
  readonly cgPlus: ConjugateGradientWorkspace | null;
  readonly cgMinus: ConjugateGradientWorkspace | null;
  readonly sourcePlus: Float64Array;
  readonly sourceMinus: Float64Array;
  /** Perron vector of chi A after mottResponse (max component 1) */
  readonly mode: Float64Array;
  readonly scratchIn: Float64Array;
  readonly scratchOut: Float64Array;
}

export interface MottResponse {
  /** the Mott sector holds the cluster ground state at Psi = 0 */
  mottGround: boolean;
  groundEnergy: number;
  /** E_{N+1} - E_N and E_{N-1} - E_N (Infinity where the sector does not exist) */
  particleGap: number;
  holeGap: number;
  /** Perron root of chi A (energy^-1): the lobe edge is at J lambda = 1 */
  eigenvalue: number;
  /** Collatz-Wielandt bounds on it */
  lowerBound: number;
  upperBound: number;
  powerIterations: number;
  /** CG and eigen-solves met their tolerances */
  converged: boolean;
}

function sectorProblem(geometry: ClusterGeometry, basis: FockBasis, particles: number): SectorProblem {
  const sector = numberSector(basis, particles);
  const hamiltonian = createClusterHamiltonian(geometry, basis, sector);
  const dim = sector.dim;
  const dense = dim <= DENSE_SECTOR_MAX ? createPartialEigenWorkspace(dim) : null;
  const lanczos = dense === null ? createLanczosWorkspace(dim, { blockSize: 1, maxBasis: 30, maxWanted: 1 }) : null;
  return { sector, hamiltonian, dense, lanczos, vector: new Float64Array(dim), energy: NaN };
}

export function createMottResponseWorkspace(shape: readonly number[], nmax: number, filling: number): MottResponseWorkspace {
  const geometry = createClusterGeometry(shape);
  const basis = createFockBasis(geometry.siteCount, nmax);
  if (!Number.isInteger(filling) || filling < 0 || filling >= nmax) {
    throw new Error(`filling: expected an integer from 0 to nmax - 1 = ${nmax - 1}, got ${filling}; raise nmax for higher lobes`);
  }
  const particles = filling * geometry.siteCount;
  const centre = sectorProblem(geometry, basis, particles);
  const plus = sectorProblem(geometry, basis, particles + 1);
  const minus = particles > 0 ? sectorProblem(geometry, basis, particles - 1) : null;
  return {
    geometry,
    basis,
    filling,
    particles,
    centre,
    plus,
    minus,
    cgPlus: createConjugateGradientWorkspace(plus.sector.dim),
    cgMinus: minus === null ? null : createConjugateGradientWorkspace(minus.sector.dim),
    sourcePlus: new Float64Array(plus.sector.dim),
    sourceMinus: new Float64Array(minus === null ? 0 : minus.sector.dim),
    mode: new Float64Array(geometry.siteCount),
    scratchIn: new Float64Array(geometry.siteCount),
    scratchOut: new Float64Array(geometry.siteCount),
  };
}

/** Lowest eigenpair of a sector Hamiltonian (inputs already set); `start` for Lanczos. */
function lowestState(p: SectorProblem, start: Float64Array | null, tolerance: number): boolean {
  updateClusterHamiltonian(p.hamiltonian);
  const dim = p.sector.dim;
  let ok: boolean;
  if (p.dense !== null) {
    denseFromSparse(p.hamiltonian.matrix, p.dense.a);
    ok = partialEigenvalues(p.dense, dim);
    partialEigenvectors(p.dense, dim, 1);
    p.energy = p.dense.values[0];
    for (let r = 0; r < dim; r++) p.vector[r] = p.dense.vectors[r];
  } else {
    const ws = p.lanczos as LanczosWorkspace;
    lanczosLowest(ws, p.hamiltonian.matrix, 1, start, start === null ? 0 : 1, tolerance, 20_000);
    ok = ws.converged;
    p.energy = ws.values[0];
    for (let r = 0; r < dim; r++) p.vector[r] = ws.vectors[r];
  }
  let sum = 0;
  for (let r = 0; r < dim; r++) sum += p.vector[r];
  if (sum < 0) for (let r = 0; r < dim; r++) p.vector[r] = -p.vector[r];
  return ok;
}

function setInputs(p: SectorProblem, hopping: number, interactionU: number, mu: number): void {
  const h = p.hamiltonian;
  h.interactionU.fill(interactionU);
  h.muLocal.fill(mu);
  h.bondHopping.fill(hopping);
}

/**
 * Response of the Mott cluster with internal hopping J, uniform U and mu (any energy
 * unit). Fills ws.mode with the Perron vector.
 */
export function mottResponse(ws: MottResponseWorkspace, hopping: number, interactionU: number, mu: number): MottResponse {
  const { centre, plus, minus, basis, geometry } = ws;
  const scale = interactionU * basis.nmax * basis.nmax * geometry.siteCount + 4 * hopping * basis.nmax * geometry.bondCount + Math.abs(mu) * basis.nmax * geometry.siteCount;
  const tol = 1e-13 * scale;
  for (const p of [centre, plus, minus]) if (p !== null) setInputs(p, hopping, interactionU, mu);

  // Ground state of the Mott sector, started from the Fock state |n, n, ..., n>.
  let fock = 0;
  for (let i = 0; i < basis.sites; i++) fock += ws.filling * basis.stride[i];
  let converged = lowestState(centre, oneHot(centre, fock), tol);
  const e0 = centre.energy;
  const g = centre.vector;

  // Lowest states of N +- 1, started from b^+ and b applied to |0> (positive vectors).
  const sitesOnes = ws.scratchIn;
  sitesOnes.fill(1);
  applyLadder(ws, sitesOnes, ws.sourcePlus, 1);
  converged = lowestState(plus as SectorProblem, ws.sourcePlus, tol) && converged;
  const particleGap = (plus as SectorProblem).energy - e0;
  let holeGap = Infinity;
  if (minus !== null) {
    applyLadder(ws, sitesOnes, ws.sourceMinus, -1);
    converged = lowestState(minus, ws.sourceMinus, tol) && converged;
    holeGap = minus.energy - e0;
  }
  const gapFloor = 1e-12 * scale;
  const mottGround = particleGap > gapFloor && holeGap > gapFloor;
  const result: MottResponse = {
    mottGround,
    groundEnergy: e0,
    particleGap,
    holeGap,
    eigenvalue: NaN,
    lowerBound: NaN,
    upperBound: NaN,
    powerIterations: 0,
    converged,
  };
  if (!mottGround) return result;

  // Power iteration on M = chi A from the uniform vector.
  const x = ws.mode;
  x.fill(1);
  const v = ws.scratchIn;
  const y = ws.scratchOut;
  const start0 = geometry.externalStart;
  const image = geometry.externalImage;
  for (let it = 1; it <= 500; it++) {
    for (let k = 0; k < basis.sites; k++) {
      let s = 0;
      for (let e = start0[k]; e < start0[k + 1]; e++) s += x[image[e]];
      v[k] = s;
    }
    const ok = applyChi(ws, g, e0, v, y);
    result.converged = result.converged && ok;
    let lo = Infinity;
    let hi = 0;
    let top = 0;
    for (let i = 0; i < basis.sites; i++) {
      const ratio = y[i] / x[i];
      if (ratio < lo) lo = ratio;
      if (ratio > hi) hi = ratio;
      if (y[i] > top) top = y[i];
    }
    result.lowerBound = lo;
    result.upperBound = hi;
    result.eigenvalue = 0.5 * (lo + hi);
    result.powerIterations = it;
    if (!(top > 0)) break;
    for (let i = 0; i < basis.sites; i++) x[i] = y[i] / top;
    if (hi - lo <= 1e-12 * hi) break;
  }
  return result;
}

/** One-hot start vector in the sector (the scratch source of the centre sector). */
function oneHot(p: SectorProblem, fullIndex: number): Float64Array | null {
  if (p.lanczos === null) return null;
  const v = p.lanczos.vectors; // overwritten by the solve only after the start is copied
  v.fill(0, 0, p.sector.dim);
  v[p.sector.position[fullIndex]] = 1;
  return v;
}

/**
 * out = sum_k w_k b_k^+ |0> in sector N + 1 (step +1) or sum_k w_k b_k |0> in sector N - 1
 * (step -1). One loop for both ladders: b^+ meets a full site (n = nmax) and reads
 * sqrt(n + 1), b meets an empty one (n = 0) and reads sqrt(n); the state index moves by
 * +-stride[k].
 */
function applyLadder(ws: MottResponseWorkspace, w: Float64Array, out: Float64Array, step: 1 | -1): void {
  const { basis, centre } = ws;
  const target = (step === 1 ? ws.plus : ws.minus) as SectorProblem;
  const g = centre.vector;
  const occ = basis.occupation;
  const sites = basis.sites;
  const edge = step === 1 ? basis.nmax : 0; // occupations run over 0 .. nmax
  const shift = step === 1 ? 1 : 0;
  const root = centre.hamiltonian.sqrtInteger;
  out.fill(0);
  for (let r = 0; r < centre.sector.dim; r++) {
    const s = centre.sector.states[r];
    for (let k = 0; k < sites; k++) {
      const n = occ[s * sites + k];
      if (n !== edge) out[target.sector.position[s + step * basis.stride[k]]] += w[k] * root[n + shift] * g[r];
    }
  }
}

/** y = chi v: y_i = <b_i^+ 0| R_+ sum_k v_k b_k^+ |0> + <b_i 0| R_- sum_k v_k b_k |0>. */
function applyChi(ws: MottResponseWorkspace, g: Float64Array, e0: number, v: Float64Array, y: Float64Array): boolean {
  const { basis, centre } = ws;
  const plus = ws.plus as SectorProblem;
  const minus = ws.minus;
  const cgPlus = ws.cgPlus as ConjugateGradientWorkspace;
  const occ = basis.occupation;
  const sites = basis.sites;
  const nmax = basis.nmax;
  const root = centre.hamiltonian.sqrtInteger;
  applyLadder(ws, v, ws.sourcePlus, 1);
  conjugateGradient(cgPlus, plus.hamiltonian.matrix, e0, ws.sourcePlus, 1e-13, 50_000);
  let ok = cgPlus.converged;
  if (minus !== null) {
    applyLadder(ws, v, ws.sourceMinus, -1);
    const cgMinus = ws.cgMinus as ConjugateGradientWorkspace;
    conjugateGradient(cgMinus, minus.hamiltonian.matrix, e0, ws.sourceMinus, 1e-13, 50_000);
    ok = ok && cgMinus.converged;
  }
  y.fill(0);
  const u = cgPlus.x;
  const w = minus === null ? null : (ws.cgMinus as ConjugateGradientWorkspace).x;
  for (let r = 0; r < centre.sector.dim; r++) {
    const s = centre.sector.states[r];
    const gr = g[r];
    for (let i = 0; i < sites; i++) {
      const n = occ[s * sites + i];
      let acc = 0;
      if (n < nmax) acc += root[n + 1] * u[plus.sector.position[s + basis.stride[i]]];
      if (n > 0 && w !== null && minus !== null) acc += root[n] * w[minus.sector.position[s - basis.stride[i]]];
      y[i] += gr * acc;
    }
  }
  return ok;
}
