// Expectation values in a cluster state: per site <n_i>, <n_i^2>, phi_i = <b_i>, the
// probability of an odd occupation and the weight on the truncation level |nmax>, and
// for every internal bond <b_i^+ b_j> (real and symmetric for real states). A thermal
// state rho = sum_k w_k |k><k| is accumulated state by state with its weight w_k.
//
// Matrix elements in the occupation basis (fockBasis.ts): b_i |s> = sqrt(n_i) |s - stride_i>,
// so <b_i> = sum_s c_s c_{s + stride_i} sqrt(n_i(s) + 1) and
// <b_i^+ b_j> = sum_s c_{s + stride_i - stride_j} c_s sqrt((n_i(s) + 1) n_j(s)).

import type { ClusterGeometry } from './clusterGeometry.js';
import type { FockBasis } from './fockBasis.js';

export interface ClusterObservables {
  /** ground energy (T = 0) or -kT ln Z (T > 0) of the cluster Hamiltonian at the given fields */
  energy: number;
  /** lowest eigenvalue */
  groundEnergy: number;
  /** von Neumann entropy of the cluster state / k_B (0 at T = 0) */
  entropy: number;
  readonly phi: Float64Array;
  readonly density: Float64Array;
  readonly densitySq: Float64Array;
  readonly parityOdd: Float64Array;
  readonly topWeight: Float64Array;
  /** <b_i^+ b_j> for internal bond b */
  readonly bondCorrelation: Float64Array;
  /** eigenstates used (1 at T = 0) */
  keptStates: number;
  /** Boltzmann weight of the highest kept state of a Lanczos thermal solve: the truncation measure (0 at T = 0 and for dense solves, which drop nothing above 1e-17) */
  truncationWeight: number;
  /** every state with a Boltzmann weight above 1e-17 of the ground state's was kept (dense thermal solve) */
  exhaustive: boolean;
  /** the eigen-solve met its tolerance */
  converged: boolean;
  /** matrix-vector products (Lanczos) or 0 (dense) */
  matvecs: number;
  /** largest Ritz residual norm (Lanczos) or 0 (dense) */
  residual: number;
  /** 'dense' or 'lanczos' */
  method: 'dense' | 'lanczos';
}

export function createClusterObservables(geometry: ClusterGeometry): ClusterObservables {
  const n = geometry.siteCount;
  return {
    energy: NaN,
    groundEnergy: NaN,
    entropy: 0,
    phi: new Float64Array(n),
    density: new Float64Array(n),
    densitySq: new Float64Array(n),
    parityOdd: new Float64Array(n),
    topWeight: new Float64Array(n),
    bondCorrelation: new Float64Array(geometry.bondCount),
    keptStates: 0,
    truncationWeight: 0,
    exhaustive: false,
    converged: false,
    matvecs: 0,
    residual: NaN,
    method: 'dense',
  };
}

export function clearStateAverages(out: ClusterObservables): void {
  out.phi.fill(0);
  out.density.fill(0);
  out.densitySq.fill(0);
  out.parityOdd.fill(0);
  out.topWeight.fill(0);
  out.bondCorrelation.fill(0);
}

/** Add weight * <c| . |c> for the normalised real state c = vectors[offset .. offset + dim). */
export function accumulateState(
  geometry: ClusterGeometry,
  basis: FockBasis,
  roots: Float64Array,
  vectors: Float64Array,
  offset: number,
  weight: number,
  out: ClusterObservables,
): void {
  const sites = basis.sites;
  const dim = basis.dim;
  const nmax = basis.nmax;
  const occ = basis.occupation;
  const stride = basis.stride;
  const density = out.density;
  const densitySq = out.densitySq;
  const odd = out.parityOdd;
  const top = out.topWeight;
  const phi = out.phi;
  for (let s = 0; s < dim; s++) {
    const c = vectors[offset + s];
    if (c === 0) continue;
    const p = weight * c * c;
    const o = s * sites;
    for (let i = 0; i < sites; i++) {
      const n = occ[o + i];
      density[i] += n * p;
      densitySq[i] += n * n * p;
      if (n & 1) odd[i] += p;
      if (n === nmax) top[i] += p;
      else phi[i] += weight * roots[n + 1] * c * vectors[offset + s + stride[i]];
    }
  }
  const bonds = geometry.bondCount;
  const A = geometry.bondSiteA;
  const B = geometry.bondSiteB;
  const corr = out.bondCorrelation;
  for (let b = 0; b < bonds; b++) {
    const i = A[b];
    const j = B[b];
    const shift = stride[i] - stride[j];
    let acc = 0;
    for (let s = 0; s < dim; s++) {
      const ni = occ[s * sites + i];
      const nj = occ[s * sites + j];
      if (nj === 0 || ni === nmax) continue;
      acc += roots[ni + 1] * roots[nj] * vectors[offset + s + shift] * vectors[offset + s];
    }
    corr[b] += weight * acc;
  }
}
