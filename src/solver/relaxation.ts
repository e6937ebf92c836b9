// Self-consistency at fixed chemical potential and temperature: red-black sweeps until the
// order parameter stops changing, with an extrapolation step against critical slowing down.
//
// Stopping rule. A fixed-point iteration that contracts by a rate r per sweep leaves an
// error of about |delta| r/(1 - r) when the last change was |delta| (geometric tail). So we
// estimate r from successive max-norm changes and stop only when that error estimate, not
// just the last change, is below the tolerance; both are reported.
//
// Acceleration. Near a phase boundary one slow mode dominates and r -> 1. When three
// successive rate estimates agree, the remaining tail is extrapolated in one step,
// phi <- phi + delta r/(1 - r) (Aitken's delta-squared process applied to the dominant
// mode; Brezinski & Redivo-Zaglia, Extrapolation Methods, 1991). The extrapolated
// value is floored at a small fraction of the current one so that phi stays positive
// (the ground state has phi >= 0 everywhere) and no region is set exactly to zero. Max
// norms only are used, so the step is identical for any thread count.

import type { SweepExecutor } from './sweepExecutor.js';
import type { SolverState } from './solverState.js';

export interface RelaxOptions {
  mu: number;
  temperature: number;
  /** stop when max |delta phi| and its geometric-tail error estimate are both below this */
  tolerance: number;
  maxSweeps: number;
  /** extrapolate the slow mode (on by default) */
  accelerate: boolean;
  /** called after every sweep; return 'stop' to interrupt */
  observer?: (progress: SweepProgress) => void | 'stop';
  /** cap on the extrapolation factor r/(1 - r) */
  maxExtrapolation?: number;
}

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
  const rates: number[] = [];
  let sinceExtrapolation = 0;
  let extrapolations = 0;
  let maxFactor = options.maxExtrapolation ?? 5000;
  let rate = NaN;
  let errorEstimate = Infinity;
  let converged = false;
  let stopped = false;
  let sweep = 0;
  let lastChangeBeforeExtrapolation = NaN;

  while (sweep < maxSweeps) {
    const c0 = await executor.sweep(0, mu, temperature);
    const c1 = await executor.sweep(1, mu, temperature);
    sweep++;
    sinceExtrapolation++;
    const change = c0 > c1 ? c0 : c1;
    history.push(change);
    if (!(change === change)) break; // NaN: give up, reported as not converged

    if (history.length >= 2 && sinceExtrapolation >= 2) {
      const prev = history[history.length - 2];
      rate = prev > 0 ? change / prev : 0;
      rates.push(rate);
    } else {
      rate = NaN;
    }
    if (sinceExtrapolation === 1 && extrapolations > 0 && change > 10 * lastChangeBeforeExtrapolation) {
      // The last extrapolation overshot: be more careful from now on.
      maxFactor = Math.max(2, maxFactor / 8);
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

    const factor = accelerate ? slowModeFactor(rates, sinceExtrapolation, maxFactor) : 0;
    if (factor > 0) {
      for (let i = 0; i < n; i++) {
        const current = phi[i];
        const next = current + factor * delta[i];
        const floor = 0.01 * current;
        phi[i] = next > floor ? next : floor;
      }
      extrapolations++;
      sinceExtrapolation = 0;
      rates.length = 0;
      lastChangeBeforeExtrapolation = change;
    }
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
