// The Gutzwiller product state of the time-dependent problem: complex amplitudes c_{i,n},
// n = 0 .. nmax, of every site's local state sum_n c_{i,n} |n>. One flat Float64Array,
// site-major and interleaved: amplitudes[2 (i S + n)] = Re c_{i,n} and
// amplitudes[2 (i S + n) + 1] = Im c_{i,n}, S = nmax + 1. The array lives on a
// SharedArrayBuffer so that worker threads can later update ranges of sites in place.
//
// The initial state is the static ground state: the static solver keeps only the real
// order parameter phi_i; each site's amplitudes are the ground vector of its site problem
// at psi_i = sum_j J_ij phi_j (src/solver/site), which is the converged Gutzwiller state.

import type { LatticeModel } from '../lattice/latticeModel.js';
import { ParameterError } from '../physics/parameterError.js';
import { createSiteWorkspace, solveSiteGround } from '../solver/site/index.js';
import { frameFromModel } from './dynamicsFrame.js';
import { meanFieldRange } from './equationsOfMotion.js';

export interface GutzwillerState {
  readonly siteCount: number;
  readonly nmax: number;
  /** nmax + 1 */
  readonly states: number;
  /** 2 * siteCount * states numbers: (re, im) of c_{i,n} at 2 (i S + n) */
  readonly amplitudes: Float64Array;
}

/** A Float64Array on a SharedArrayBuffer (worker threads can map the same memory). */
export function sharedFloat64(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * 8));
}

/** All amplitudes zero. */
export function createGutzwillerState(siteCount: number, nmax: number): GutzwillerState {
  if (!Number.isInteger(nmax) || nmax < 1) throw new ParameterError('nmax', `expected an integer >= 1, got ${nmax}`);
  if (!Number.isInteger(siteCount) || siteCount < 1) throw new ParameterError('siteCount', `expected an integer >= 1, got ${siteCount}`);
  const states = nmax + 1;
  return { siteCount, nmax, states, amplitudes: sharedFloat64(2 * siteCount * states) };
}

export function copyState(source: GutzwillerState): GutzwillerState {
  const out = createGutzwillerState(source.siteCount, source.nmax);
  out.amplitudes.set(source.amplitudes);
  return out;
}

/** Largest |1 - sum_n |c_{i,n}|^2| over all sites. */
export function maxNormError(state: GutzwillerState): number {
  const y = state.amplitudes;
  const width = 2 * state.states;
  let worst = 0;
  for (let i = 0; i < state.siteCount; i++) {
    let norm = 0;
    const base = i * width;
    for (let k = 0; k < width; k++) norm += y[base + k] * y[base + k];
    const e = Math.abs(1 - norm);
    if (e > worst) worst = e;
  }
  return worst;
}

export interface GroundAmplitudes {
  state: GutzwillerState;
  /** max_i |phi_i(from the amplitudes) - phi_i(given)|: how self-consistent the start is */
  maxOrderResidual: number;
  /** largest weight on |nmax> */
  maxTopWeight: number;
}

/**
 * Amplitudes of the static Gutzwiller ground state with order parameter `phi` (real, as
 * the static solver returns it) at chemical potential mu: site by site the lowest
 * eigenvector of H_i at psi_i = sum_j J_ij phi_j. A converged phi reproduces itself
 * (maxOrderResidual at the solver's tolerance); a larger residual means the start is not
 * stationary and the evolution shows it.
 */
export function groundStateAmplitudes(model: LatticeModel, phi: Float64Array, mu: number): GroundAmplitudes {
  const n = model.geometry.siteCount;
  if (phi.length !== n) throw new ParameterError('phi', `expected ${n} values (one per site), got ${phi.length}`);
  const frame = frameFromModel(model, { mu });
  const psi = new Float64Array(n);
  const zero = new Float64Array(n);
  meanFieldRange(frame, phi, zero, psi, new Float64Array(n), -1, 0, n);
  const state = createGutzwillerState(n, model.nmax);
  const S = state.states;
  const y = state.amplitudes;
  const ws = createSiteWorkspace(model.nmax);
  const u = model.interactionU;
  let residual = 0;
  let top = 0;
  for (let i = 0; i < n; i++) {
    const ui = typeof u === 'number' ? u : u[i];
    solveSiteGround(ws, ui, mu - model.eps[i], psi[i], NaN, NaN);
    // For psi < 0 the workspace holds the vector for |psi|; (-1)^n maps it to psi.
    const flip = psi[i] < 0;
    const amp = ws.amplitudes;
    const base = 2 * i * S;
    let phiSite = 0;
    for (let k = 0; k < S; k++) {
      y[base + 2 * k] = flip && k & 1 ? -amp[k] : amp[k];
      y[base + 2 * k + 1] = 0;
      if (k + 1 < S) phiSite += Math.sqrt(k + 1) * amp[k] * amp[k + 1];
    }
    if (flip) phiSite = -phiSite;
    const r = Math.abs(phiSite - phi[i]);
    if (r > residual) residual = r;
    const w = amp[S - 1] * amp[S - 1];
    if (w > top) top = w;
  }
  return { state, maxOrderResidual: residual, maxTopWeight: top };
}
