// Self-consistency at fixed chemical potential and temperature: red-black sweeps until the
// order parameter stops changing, accelerated by Anderson mixing of whole sweeps.
//
// Stopping rule. A fixed-point iteration that contracts by a rate r per sweep leaves an
// error of about |delta| r/(1 - r) when the last change was |delta| (geometric tail). So we
// estimate r and stop only when that error estimate, not just the last change, is below the
// tolerance; both are reported. Plain sweeps take r from successive max-norm changes. Mixed
// sweeps take the contraction of the sweep map itself along the recent steps,
// max|G(x_k) - G(x_k-1)| / max|x_k - x_k-1| (the same number for plain sweeps), the largest
// over the last ANDERSON_DEPTH sweeps, so that a step which happened to miss the slow mode
// does not make the estimate optimistic.
//
// Acceleration (andersonMixing.ts). After every sweep the next input is the Anderson mix of
// the last ANDERSON_DEPTH + 1 sweeps. Safeguards: the history restarts from the last step
// when the change grows, and after GROWTH_RUN growing sweeps in a row a plain sweep follows
// (without it a T > 0 trapped layer ran away for 250 sweeps); columns that are nearly
// dependent or huge coefficients end the history too; the mixed phi is floored at a small
// fraction of the sweep's output so that it stays positive (the ground state has phi >= 0
// everywhere) and no region is set exactly to zero. Sums run over the sites in a fixed
// order on the calling thread, so the step is identical for any thread count. Measured on
// the trapped 48^3 and 64^3 yardstick clouds: 24 sweeps with the former slow-mode
// extrapolation, 18 mixed; in open boxes near the n = 1 lobe tip 2-3x fewer than that.
//
// `slowModeFactor` (Aitken's delta-squared process on the dominant mode; Brezinski &
// Redivo-Zaglia, Extrapolation Methods, 1991) stays for the twisted solver.

import { createAndersonMixer, lastColourSites } from './andersonMixing.js';
import type { SweepExecutor } from './sweepExecutor.js';
import type { SolverState } from './solverState.js';

export interface RelaxOptions {
  mu: number;
  temperature: number;
  /** stop when max |delta phi| and its geometric-tail error estimate are both below this */
  tolerance: number;
  maxSweeps: number;
  /** Anderson-mix whole sweeps (on by default); off: plain sweeps, the reference path */
  accelerate: boolean;
  /** called after every sweep; return 'stop' to interrupt */
  observer?: (progress: SweepProgress) => void | 'stop';
}

/** Difference columns of the Anderson mixing (measured on the yardstick and near lobe edges: 3 to 5 alike, 2 worse). */
export const ANDERSON_DEPTH = 4;
/** Sweeps in a row with a growing change after which a plain sweep follows. */
const GROWTH_RUN = 2;
/** The mixed phi stays at or above this fraction of the sweep's output. */
const PHI_FLOOR_FRACTION = 0.01;

export interface SweepProgress {
  sweep: number;
  change: number;
  rate: number;
  errorEstimate: number;
}

export interface RelaxResult {
  converged: boolean;
  /** full sweeps (both colours) done */
  sweeps: number;
  /** last max |delta phi| */
  residual: number;
  /** estimated contraction rate per sweep (NaN if unknown) */
  contractionRate: number;
  /** estimated remaining error in phi, residual r/(1 - r) */
  errorEstimate: number;
  /** sweeps whose output was replaced by an Anderson mix */
  extrapolations: number;
  /** max |delta phi| of every sweep */
  residualHistory: number[];
  /** interrupted by the observer */
  stopped: boolean;
}

/**
 * The factor of the slow-mode extrapolation phi + factor * delta, or 0 when none is due:
 * after at least 4 sweeps since the last one, when the last three contraction rates agree
 * to 5 % of 1 - r and lie in (0.5, 1), the remaining geometric tail r/(1 - r), at most
 * `maxFactor`. Shared by every relaxation that extrapolates (this one, the twisted solver).
 */
export function slowModeFactor(rates: readonly number[], sinceExtrapolation: number, maxFactor: number): number {
  if (sinceExtrapolation < 4 || rates.length < 3) return 0;
  const r1 = rates[rates.length - 1];
  const r2 = rates[rates.length - 2];
  const r3 = rates[rates.length - 3];
  const gap = 1 - r1;
  if (!(r1 > 0.5 && r1 < 1 && Math.abs(r1 - r2) < 0.05 * gap && Math.abs(r2 - r3) < 0.05 * gap)) return 0;
  return Math.min(r1 / (1 - r1), maxFactor);
}

export async function relaxAtFixedMu(state: SolverState, executor: SweepExecutor, options: RelaxOptions): Promise<RelaxResult> {
  const { mu, temperature, tolerance, maxSweeps, accelerate } = options;
  const phi = state.fields.phi;
  const delta = state.fields.delta;
  const n = phi.length;
  const history: number[] = [];
  const mixer = accelerate
    ? createAndersonMixer(executor.sweepInput === 'lastColour' ? lastColourSites(state.layout.inner) : null, n, ANDERSON_DEPTH)
    : null;
  // Contractions along the last steps (mixed sweeps), newest last.
  const contractions: number[] = [];
  let extrapolations = 0;
  let grewInRow = 0;
  let rate = NaN;
  let errorEstimate = Infinity;
  let converged = false;
  let stopped = false;
  let sweep = 0;

  while (sweep < maxSweeps) {
    const c0 = await executor.sweep(0, mu, temperature);
    const c1 = await executor.sweep(1, mu, temperature);
    sweep++;
    const change = c0 > c1 ? c0 : c1;
    history.push(change);
    if (!(change === change)) break; // NaN: give up, reported as not converged

    if (mixer === null) {
      const prev = history.length >= 2 ? history[history.length - 2] : NaN;
      rate = prev === prev ? (prev > 0 ? change / prev : 0) : NaN;
    } else {
      // A growing change means the secant model no longer describes the map: start afresh
      // from the last step; growing twice in a row, take a plain sweep before mixing again.
      const grew = history.length >= 2 && change > history[history.length - 2];
      if (grew) mixer.restart();
      const contraction = mixer.record(phi, delta);
      grewInRow = grew ? grewInRow + 1 : 0;
      // Where the sweeps move away from a fixed point (contraction >= 1: phi growing out of
      // the normal state phi = 0 below T_c) a secant step would jump onto that unstable
      // point; plain sweeps leave it.
      if (grewInRow >= GROWTH_RUN || contraction >= 1) mixer.restart();
      if (contraction === contraction) {
        contractions.push(contraction);
        if (contractions.length > ANDERSON_DEPTH) contractions.shift();
      }
      rate = contractions.length === 0 ? NaN : Math.max(...contractions);
    }
    errorEstimate = change === 0 ? 0 : rate === rate && rate < 1 ? Math.max(change, (change * rate) / (1 - rate)) : Infinity;
    if (change === 0 || (change <= tolerance && errorEstimate <= tolerance) || change <= 1e-3 * tolerance) {
      converged = true;
    }
    const verdict = options.observer?.({ sweep, change, rate, errorEstimate });
    if (converged) break;
    if (verdict === 'stop') {
      stopped = true;
      break;
    }
    if (mixer !== null && mixer.mix(phi, PHI_FLOOR_FRACTION)) extrapolations++;
  }
  return {
    converged,
    sweeps: sweep,
    residual: history.length ? history[history.length - 1] : NaN,
    contractionRate: rate,
    errorEstimate,
    extrapolations,
    residualHistory: history,
    stopped,
  };
}

/**
 * After a change of mu: lower every stored ground-energy bound by |delta mu| nmax (Weyl),
 * and drop the stored thermal spectra (their prediction only follows psi), so the next
 * thermal update of each site starts from the full QL path.
 */
export function shiftLowerBounds(state: SolverState, muChange: number): void {
  const lower = state.fields.lowerEnergy;
  const shift = Math.abs(muChange) * state.layout.nmax;
  if (shift === 0) return;
  for (let i = 0; i < lower.length; i++) lower[i] -= shift;
  const spectrum = state.fields.spectrum;
  if (spectrum !== null) spectrum.fill(NaN);
}
