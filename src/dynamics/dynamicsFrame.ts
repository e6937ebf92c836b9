// The Bose-Hubbard Hamiltonian at one instant, as the time-dependent Gutzwiller equations
// read it (DESIGN.md section 1):
//
//   H_i(t) = U_i(t) n(n-1)/2 + (eps_i(t) - mu) n - (Psi_i b^+ + Psi_i^* b),
//   Psi_i = sum_j J_ij(t) phi_j,   J_ij(t) = hopScale_axis(t) * J_ij(base),
//   U_i(t) = interactionScale(t) * U_i(base).
//
// The base hoppings and interactions are those of a LatticeModel (uniform numbers or
// per-bond / per-site arrays, referenced, never copied); a drive (drive.ts) changes only the
// scale factors, the uniform values, and, when the potential moves, the eps array (a copy
// owned by the frame). mu is a gauge: it adds the phase exp(i mu n t) to every occupation
// and changes no observable, but with mu near the local chemical potential the state
// rotates slowly, which keeps Runge-Kutta steps long.
//
// Units: dc/dt = -i rate H c. Dimensionless mode: energies in the scenario unit E and times
// in hbar/E, rate = 1. Laboratory mode: energies are E/h in Hz, so with times in seconds
// rate = 2 pi, and with times in milliseconds rate = 2 pi * 1e-3 (laboratoryRate below).

import type { LatticeModel } from '../lattice/latticeModel.js';
import { ParameterError } from '../physics/parameterError.js';

export interface DynamicsFrame {
  /** physical dimension (1, 2 or 3); physical axis d is internal axis 3 - dims + d */
  readonly dims: number;
  readonly inner: readonly [number, number, number];
  readonly innerPeriodic: readonly [boolean, boolean, boolean];
  readonly nmax: number;
  /** nmax + 1 */
  readonly states: number;
  readonly siteCount: number;
  /** base hopping per bond along each internal axis (bond i -> i + e_axis stored at i), or null */
  readonly hopArrays: readonly [Float64Array | null, Float64Array | null, Float64Array | null];
  /** base uniform hopping per internal axis, used where hopArrays[axis] is null */
  readonly hopUniform: Float64Array;
  /** factor on the base hopping of each internal axis (1 = static model) */
  readonly hopScale: Float64Array;
  /** base on-site interaction per site, or null for the uniform interactionU */
  readonly interactionArray: Float64Array | null;
  interactionU: number;
  /** factor on the base interaction (1 = static model) */
  interactionScale: number;
  /** site potential eps_i at the current time (owned by the frame; a drive may rewrite it) */
  readonly eps: Float64Array;
  /** chemical potential of the rotating frame (gauge), energy unit */
  mu: number;
  /** dc/dt = -i rate H c (1 in dimensionless units; see laboratoryRate) */
  rate: number;
  /** sqrt(n), n = 0 .. nmax + 1 */
  readonly sqrtN: Float64Array;
}

export interface FrameOptions {
  /** gauge chemical potential (use the initial ground state's mu) */
  mu: number;
  /** dc/dt = -i rate H c; default 1 (dimensionless) */
  rate?: number;
}

/** A frame holding the static model's parameters (all scales 1). */
export function frameFromModel(model: LatticeModel, options: FrameOptions): DynamicsFrame {
  const g = model.geometry;
  const pad = 3 - g.dims;
  const hopArrays: [Float64Array | null, Float64Array | null, Float64Array | null] = [null, null, null];
  const hopUniform = new Float64Array(3);
  for (let d = 0; d < g.dims; d++) {
    const h = model.hopping[d];
    if (typeof h === 'number') hopUniform[pad + d] = h;
    else hopArrays[pad + d] = h;
  }
  const rate = options.rate ?? 1;
  if (!(rate > 0 && Number.isFinite(rate))) throw new ParameterError('rate', `expected a positive finite number, got ${rate}`);
  if (!Number.isFinite(options.mu)) throw new ParameterError('mu', `expected a finite chemical potential, got ${options.mu}`);
  const states = model.nmax + 1;
  const sqrtN = new Float64Array(states + 1);
  for (let n = 0; n <= states; n++) sqrtN[n] = Math.sqrt(n);
  return {
    dims: g.dims,
    inner: [...g.inner] as [number, number, number],
    innerPeriodic: [...g.innerPeriodic] as [boolean, boolean, boolean],
    nmax: model.nmax,
    states,
    siteCount: g.siteCount,
    hopArrays,
    hopUniform,
    hopScale: Float64Array.of(1, 1, 1),
    interactionArray: typeof model.interactionU === 'number' ? null : model.interactionU,
    interactionU: typeof model.interactionU === 'number' ? model.interactionU : NaN,
    interactionScale: 1,
    eps: Float64Array.from(model.eps),
    mu: options.mu,
    rate,
    sqrtN,
  };
}

/** Independent copy (own eps, scales and uniform values; base arrays shared). */
export function copyFrame(frame: DynamicsFrame): DynamicsFrame {
  return {
    ...frame,
    hopUniform: Float64Array.from(frame.hopUniform),
    hopScale: Float64Array.from(frame.hopScale),
    eps: Float64Array.from(frame.eps),
  };
}

/**
 * rate for laboratory mode: energies as E/h in Hz, times in units of `timeUnitSeconds`
 * (1e-3 for milliseconds): dc/dt = -i (2 pi E/h) c, so rate = 2 pi timeUnitSeconds.
 */
export function laboratoryRate(timeUnitSeconds: number): number {
  if (!(timeUnitSeconds > 0)) throw new ParameterError('timeUnitSeconds', `expected a positive number, got ${timeUnitSeconds}`);
  return 2 * Math.PI * timeUnitSeconds;
}

/** Hopping of the bond from site i along internal axis `axis` at the frame's time. */
export function bondHopping(frame: DynamicsFrame, axis: number, i: number): number {
  const h = frame.hopArrays[axis];
  return frame.hopScale[axis] * (h === null ? frame.hopUniform[axis] : h[i]);
}

/** Largest on-site interaction at the frame's time. */
export function frameMaxInteraction(frame: DynamicsFrame): number {
  if (frame.interactionArray === null) return frame.interactionScale * frame.interactionU;
  let m = -Infinity;
  for (let i = 0; i < frame.interactionArray.length; i++) if (frame.interactionArray[i] > m) m = frame.interactionArray[i];
  return frame.interactionScale * m;
}
