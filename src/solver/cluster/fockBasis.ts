// Truncated Fock basis of a cluster: every site holds 0..nmax bosons, so the cluster space
// has (nmax + 1)^sites occupation states |n_0, n_1, ...>. A state is the integer whose
// base-(nmax + 1) digits are the occupations, site 0 the least significant digit:
// index = sum_i n_i stride_i with stride_i = (nmax + 1)^i. Then b_i^+ moves index s to
// s + stride_i, and the hopping b_i^+ b_j to s + stride_i - stride_j.
//
// A number sector (all states with sum_i n_i = N) is a sorted list of full indices plus the
// inverse map; the Hamiltonian without mean fields conserves N, so it is block diagonal
// over sectors (used by the linear-response criterion of the lobe boundary).

import { ParameterError } from '../../physics/parameterError.js';

export interface FockBasis {
  readonly sites: number;
  readonly nmax: number;
  /** nmax + 1 */
  readonly base: number;
  /** (nmax + 1)^sites */
  readonly dim: number;
  /** stride_i = (nmax + 1)^i */
  readonly stride: Int32Array;
  /** occupation of site i in state s at occupation[s * sites + i] */
  readonly occupation: Uint8Array;
  /** total boson number of state s */
  readonly total: Uint16Array;
}

/** Largest cluster Fock dimension accepted (memory of the sparse Hamiltonian and Lanczos vectors). */
export const MAX_CLUSTER_STATES = 2_000_000;

export function createFockBasis(sites: number, nmax: number): FockBasis {
  if (!Number.isInteger(nmax) || nmax < 1 || nmax > 15) throw new ParameterError('nmax', `expected an integer from 1 to 15 for a cluster, got ${nmax}`);
  if (!Number.isInteger(sites) || sites < 1) throw new ParameterError('cluster', `expected at least one site, got ${sites}`);
  const base = nmax + 1;
  const dimExact = base ** sites;
  if (dimExact > MAX_CLUSTER_STATES) {
    throw new ParameterError(
      'cluster',
      `the cluster Fock space (nmax + 1)^sites = ${base}^${sites} = ${dimExact} exceeds ${MAX_CLUSTER_STATES} states; use a smaller cluster or a lower nmax`,
    );
  }
  const dim = dimExact;
  const stride = new Int32Array(sites);
  for (let i = 0, s = 1; i < sites; i++, s *= base) stride[i] = s;
  const occupation = new Uint8Array(dim * sites);
  const total = new Uint16Array(dim);
  for (let s = 0; s < dim; s++) {
    let r = s;
    let n = 0;
    for (let i = 0; i < sites; i++) {
      const digit = r % base;
      r = (r - digit) / base;
      occupation[s * sites + i] = digit;
      n += digit;
    }
    total[s] = n;
  }
  return { sites, nmax, base, dim, stride, occupation, total };
}

export interface NumberSector {
  /** total boson number N */
  readonly particles: number;
  readonly dim: number;
  /** full-basis index of each sector state, ascending */
  readonly states: Int32Array;
  /** sector position of a full-basis state, -1 outside the sector (length = full dim) */
  readonly position: Int32Array;
}

export function numberSector(basis: FockBasis, particles: number): NumberSector {
  if (!Number.isInteger(particles) || particles < 0 || particles > basis.sites * basis.nmax) {
    throw new ParameterError('particles', `expected an integer from 0 to ${basis.sites * basis.nmax}, got ${particles}`);
  }
  let count = 0;
  for (let s = 0; s < basis.dim; s++) if (basis.total[s] === particles) count++;
  const states = new Int32Array(count);
  const position = new Int32Array(basis.dim).fill(-1);
  for (let s = 0, k = 0; s < basis.dim; s++) {
    if (basis.total[s] === particles) {
      states[k] = s;
      position[s] = k++;
    }
  }
  return { particles, dim: count, states, position };
}

/**
 * The product state c_s = prod_i a_i(n_i(s)) from per-site amplitudes a_i(n) (stored at
 * amplitudes[i * (nmax + 1) + n]) into out[0 .. dim): a Gutzwiller state, the natural
 * start vector for the cluster ground state. Built digit by digit like the diagonal
 * (site 0 the least significant digit), O(dim).
 */
export function productState(basis: FockBasis, amplitudes: Float64Array, out: Float64Array): void {
  const base = basis.base;
  let len = 1;
  out[0] = 1;
  for (let i = basis.sites - 1; i >= 0; i--) {
    const off = i * base;
    for (let m = len - 1; m >= 0; m--) {
      const v = out[m];
      const t = m * base;
      for (let n = base - 1; n >= 0; n--) out[t + n] = v * amplitudes[off + n];
    }
    len *= base;
  }
}
