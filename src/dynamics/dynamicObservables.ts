// Observables of a Gutzwiller product state at one time, from the amplitudes and the
// Hamiltonian of that time. With P_i(n) = |c_{i,n}|^2 and phi_i = <b_i>:
//
//   energy         <H> = sum_i sum_n P_i(n) [U_i n(n-1)/2 + eps_i n] - sum_i Re(phi_i^* Psi_i),
//                  the mean-field energy; the hopping sum over i counts every bond once
//                  (sum_i phi_i^* Psi_i = sum_<ij> J_ij (phi_i^* phi_j + c.c.)); the gauge mu
//                  is not included, so this is the energy the static solver reports at T = 0
//   atoms          sum_i <n_i>;  condensedAtoms  sum_i |phi_i|^2
//   numberVariance sum_i (<n_i^2> - <n_i>^2)
//   doublonsExactlyTwo  sum_i P_i(2)          (doubly occupied sites)
//   multiplyOccupied    sum_i sum_{n>=2} P_i(n) (sites holding two or more atoms)
//   with a shell map k_i (the Mott filling a site should have, 0 = not in a shell):
//   shellHoles     sum_{k_i>0} sum_{n<k_i} P_i(n)  (fewer atoms than the shell filling; for
//                  the n = 1 shell this is P_i(0))
//   shellDefects   sum_{k_i>0} (1 - P_i(k_i))    (any occupation other than the filling)
//
// Sums run over sites in index order (the same for any thread count). Nothing is allocated
// per site; a workspace holds the per-site phi and Psi.

import type { DynamicsFrame } from './dynamicsFrame.js';
import { meanFieldRange, orderParameterRange } from './equationsOfMotion.js';
import type { GutzwillerState } from './gutzwillerState.js';

export interface ObservableWorkspace {
  readonly phiRe: Float64Array;
  readonly phiIm: Float64Array;
  readonly psiRe: Float64Array;
  readonly psiIm: Float64Array;
}

export function createObservableWorkspace(siteCount: number): ObservableWorkspace {
  return {
    phiRe: new Float64Array(siteCount),
    phiIm: new Float64Array(siteCount),
    psiRe: new Float64Array(siteCount),
    psiIm: new Float64Array(siteCount),
  };
}

export interface EvolutionTotals {
  energy: number;
  atoms: number;
  condensedAtoms: number;
  numberVariance: number;
  doublonsExactlyTwo: number;
  multiplyOccupied: number;
  /** NaN without a shell map */
  shellHoles: number;
  /** NaN without a shell map */
  shellDefects: number;
  /** largest weight on |nmax> (the truncation is doubtful above ~1e-6) */
  maxTopWeight: number;
  /** largest |1 - norm| of a site */
  maxNormError: number;
}

/** phi and Psi of every site into the workspace. */
export function fillMeanFields(state: GutzwillerState, frame: DynamicsFrame, ws: ObservableWorkspace): void {
  const n = state.siteCount;
  orderParameterRange(state.amplitudes, state.states, frame.sqrtN, ws.phiRe, ws.phiIm, 0, n);
  meanFieldRange(frame, ws.phiRe, ws.phiIm, ws.psiRe, ws.psiIm, -1, 0, n);
}

export function evolutionTotals(
  state: GutzwillerState,
  frame: DynamicsFrame,
  ws: ObservableWorkspace,
  shellFilling: Int32Array | null = null,
): EvolutionTotals {
  fillMeanFields(state, frame, ws);
  const S = state.states;
  const y = state.amplitudes;
  const uArr = frame.interactionArray;
  const uScale = frame.interactionScale;
  let energy = 0;
  let atoms = 0;
  let condensed = 0;
  let variance = 0;
  let exactlyTwo = 0;
  let multiple = 0;
  let holes = 0;
  let defects = 0;
  let top = 0;
  let normError = 0;
  for (let i = 0; i < state.siteCount; i++) {
    const u = uArr === null ? uScale * frame.interactionU : uScale * uArr[i];
    const eps = frame.eps[i];
    const base = 2 * i * S;
    const shell = shellFilling === null ? 0 : shellFilling[i];
    let norm = 0;
    let n1 = 0;
    let n2 = 0;
    let onsite = 0;
    let many = 0;
    let below = 0;
    let atFilling = 0;
    for (let n = 0; n < S; n++) {
      const p = y[base + 2 * n] * y[base + 2 * n] + y[base + 2 * n + 1] * y[base + 2 * n + 1];
      norm += p;
      n1 += n * p;
      n2 += n * n * p;
      onsite += p * (0.5 * u * n * (n - 1) + eps * n);
      if (n >= 2) many += p;
      if (n < shell) below += p;
      if (n === shell) atFilling = p;
    }
    const pr = ws.phiRe[i];
    const pi = ws.phiIm[i];
    energy += onsite - (pr * ws.psiRe[i] + pi * ws.psiIm[i]);
    atoms += n1;
    condensed += pr * pr + pi * pi;
    variance += n2 - n1 * n1;
    if (S > 2) exactlyTwo += y[base + 4] * y[base + 4] + y[base + 5] * y[base + 5];
    multiple += many;
    if (shell > 0) {
      holes += below;
      defects += 1 - atFilling;
    }
    const w = y[base + 2 * (S - 1)] * y[base + 2 * (S - 1)] + y[base + 2 * S - 1] * y[base + 2 * S - 1];
    if (w > top) top = w;
    const e = Math.abs(1 - norm);
    if (e > normError) normError = e;
  }
  return {
    energy,
    atoms,
    condensedAtoms: condensed,
    numberVariance: variance,
    doublonsExactlyTwo: exactlyTwo,
    multiplyOccupied: multiple,
    shellHoles: shellFilling === null ? NaN : holes,
    shellDefects: shellFilling === null ? NaN : defects,
    maxTopWeight: top,
    maxNormError: normError,
  };
}

export interface SiteSnapshot {
  density: Float64Array;
  phiRe: Float64Array;
  phiIm: Float64Array;
  /** |phi_i|^2 */
  condensateDensity: Float64Array;
  numberVariance: Float64Array;
  /** P_i(0), P_i(1), P_i(2) */
  emptyProbability: Float64Array;
  singleProbability: Float64Array;
  doubleProbability: Float64Array;
  /** sum_{n odd} P_i(n): what parity-projected imaging detects */
  parityOdd: Float64Array;
}

/** Per-site fields for snapshots (new arrays; not for the hot loop). */
export function siteSnapshot(state: GutzwillerState, frame: DynamicsFrame): SiteSnapshot {
  const n = state.siteCount;
  const S = state.states;
  const y = state.amplitudes;
  const snap: SiteSnapshot = {
    density: new Float64Array(n),
    phiRe: new Float64Array(n),
    phiIm: new Float64Array(n),
    condensateDensity: new Float64Array(n),
    numberVariance: new Float64Array(n),
    emptyProbability: new Float64Array(n),
    singleProbability: new Float64Array(n),
    doubleProbability: new Float64Array(n),
    parityOdd: new Float64Array(n),
  };
  orderParameterRange(y, S, frame.sqrtN, snap.phiRe, snap.phiIm, 0, n);
  for (let i = 0; i < n; i++) {
    const base = 2 * i * S;
    let m1 = 0;
    let m2 = 0;
    let odd = 0;
    for (let k = 0; k < S; k++) {
      const p = y[base + 2 * k] * y[base + 2 * k] + y[base + 2 * k + 1] * y[base + 2 * k + 1];
      m1 += k * p;
      m2 += k * k * p;
      if (k & 1) odd += p;
      if (k === 0) snap.emptyProbability[i] = p;
      else if (k === 1) snap.singleProbability[i] = p;
      else if (k === 2) snap.doubleProbability[i] = p;
    }
    snap.density[i] = m1;
    snap.numberVariance[i] = m2 - m1 * m1;
    snap.parityOdd[i] = odd;
    snap.condensateDensity[i] = snap.phiRe[i] * snap.phiRe[i] + snap.phiIm[i] * snap.phiIm[i];
  }
  return snap;
}
