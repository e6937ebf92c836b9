// Site-resolved Gutzwiller solution of a lattice model at fixed chemical potential or at
// fixed atom number. N(mu) is monotone, so mu at fixed N comes from Brent's method on
// N(mu) - N_target (brentRoot.ts), each evaluation a full self-consistent relaxation
// warm-started from the previous one (the order parameter field and the eigenvalue bounds
// carry over; a change of mu only widens the bounds, see shiftLowerBounds).

import type { LatticeModel } from '../lattice/latticeModel.js';
import { maxHopping, maxInteraction } from '../lattice/latticeModel.js';
import { brentRootAsync } from '../numerics/brentRoot.js';
import { relaxAtFixedMu, shiftLowerBounds, type RelaxResult, type SweepProgress } from './relaxation.js';
import type { SweepExecutor } from './sweepExecutor.js';
import type { SolverState } from './solverState.js';

export type ChemicalPotentialMode =
  | { kind: 'mu'; mu: number }
  /**
   * muGuess: a starting point for the search (e.g. from a checkpoint); slopeGuess: dN/dmu
   * near the answer (e.g. of a neighbouring scan point), for the first step
   */
  | { kind: 'atoms'; atoms: number; relativeTolerance: number; muGuess?: number; slopeGuess?: number };

export interface LatticeSolveOptions {
  mode: ChemicalPotentialMode;
  temperature: number;
  tolerance: number;
  maxSweeps: number;
  accelerate: boolean;
  /** progress after each sweep; 'stop' interrupts */
  observer?: (progress: SolveProgress) => void | 'stop';
}

export interface SolveProgress extends SweepProgress {
  mu: number;
  /** atoms at the last completed mu evaluation (NaN before the first) */
  atoms: number;
  muEvaluation: number;
  totalSweeps: number;
}

export interface LatticeTotals {
  atoms: number;
  condensedAtoms: number;
  /** Omega = sum_i (Omega_i + psi_i phi_i) */
  grandPotential: number;
  /** Omega + mu N: energy at T = 0, free energy at T > 0 */
  freeEnergy: number;
  entropy: number;
  /** largest weight on |nmax| over all sites */
  maxTopWeight: number;
  /** site index where maxTopWeight occurs */
  maxTopWeightSite: number;
}

export interface LatticeSolveResult {
  mu: number;
  temperature: number;
  converged: boolean;
  stopped: boolean;
  /** the final relaxation */
  relax: RelaxResult;
  totals: LatticeTotals;
  muSearch: { evaluations: number; converged: boolean; totalSweeps: number; atomHistory: Array<{ mu: number; atoms: number; sweeps: number }> };
  /** max |delta phi| of every sweep of every evaluation, in order */
  residualHistory: number[];
}

/** Sums of the measured fields, in a fixed serial order (identical for any thread count). */
/** The per-site fields that latticeTotals sums (the solver's measure fields, or a cluster solve's). */
export interface SiteTotalsFields {
  phi: ArrayLike<number>;
  density: ArrayLike<number>;
  grandPotential: ArrayLike<number>;
  entropy: ArrayLike<number>;
  topWeight: ArrayLike<number>;
}

export function latticeTotals(state: SolverState, mu: number): LatticeTotals {
  const m = state.measure;
  return sumSiteTotals({ phi: state.fields.phi, density: m.density, grandPotential: m.grandPotential, entropy: m.entropy, topWeight: m.topWeight }, mu);
}

/** Lattice totals of per-site fields, summed in site order (so the same doubles for any thread count). */
export function sumSiteTotals(m: SiteTotalsFields, mu: number): LatticeTotals {
  const phi = m.phi;
  let atoms = 0;
  let condensed = 0;
  let omega = 0;
  let entropy = 0;
  let maxTop = 0;
  let maxTopSite = 0;
  for (let i = 0; i < phi.length; i++) {
    atoms += m.density[i];
    condensed += phi[i] * phi[i];
    omega += m.grandPotential[i];
    entropy += m.entropy[i];
    if (m.topWeight[i] > maxTop) {
      maxTop = m.topWeight[i];
      maxTopSite = i;
    }
  }
  return {
    atoms,
    condensedAtoms: condensed,
    grandPotential: omega,
    freeEnergy: omega + mu * atoms,
    entropy,
    maxTopWeight: maxTop,
    maxTopWeightSite: maxTopSite,
  };
}

/**
 * Starting order parameter: a fraction of the atomic-limit amplitude, sqrt(n) with n the
 * J = 0 occupation at the site, plus a small seed everywhere so that no region starts
 * at the always-self-consistent phi = 0.
 */
export function initialOrderParameter(model: LatticeModel, mu: number): Float64Array {
  const n = model.geometry.siteCount;
  const out = new Float64Array(n);
  const u = model.interactionU;
  for (let i = 0; i < n; i++) {
    const ui = typeof u === 'number' ? u : u[i];
    const local = mu - model.eps[i];
    const occupation = local <= 0 ? 0 : Math.min(model.nmax, Math.ceil(local / ui));
    out[i] = 0.5 * Math.sqrt(occupation) + 0.05;
  }
  return out;
}

/** Atomic-limit (J = 0, T = 0) atom number at mu: a cheap guess for the mu search. */
export function atomicLimitAtoms(model: LatticeModel, mu: number): number {
  const u = model.interactionU;
  let total = 0;
  for (let i = 0; i < model.eps.length; i++) {
    const ui = typeof u === 'number' ? u : u[i];
    const local = mu - model.eps[i];
    if (local > 0) total += Math.min(model.nmax, Math.ceil(local / ui));
  }
  return total;
}

export async function solveLattice(
  model: LatticeModel,
  state: SolverState,
  executor: SweepExecutor,
  options: LatticeSolveOptions,
): Promise<LatticeSolveResult> {
  const { temperature, tolerance, maxSweeps, accelerate } = options;
  const history: number[] = [];
  const atomHistory: Array<{ mu: number; atoms: number; sweeps: number }> = [];
  let totalSweeps = 0;
  let evaluations = 0;
  let lastMu = NaN;
  let lastAtoms = NaN;
  let lastRelax: RelaxResult | null = null;
  let stopped = false;

  // While mu is still far from the answer, a relaxation need only be accurate enough to
  // rank N(mu) against the target: the tolerance tightens with the best atom-number error
  // so far and reaches the requested one for the final steps.
  let bestRelativeError = Infinity;
  let lastTolerance = tolerance;
  const toleranceNow = (): number =>
    options.mode.kind === 'atoms' ? Math.max(tolerance, Math.min(1e-5, 0.01 * bestRelativeError)) : tolerance;

  // Predictor for a new mu: extrapolate the field linearly from the last two solutions,
  // phi(mu) ~ phi(mu1) + (mu - mu1) (phi(mu1) - phi(mu0))/(mu1 - mu0).
  const phi = state.fields.phi;
  let previousPhi: Float64Array | null = null;
  let previousMu = NaN;
  const predict = (mu: number): void => {
    if (previousPhi !== null && lastMu === lastMu && previousMu !== lastMu) {
      const t = (mu - lastMu) / (lastMu - previousMu);
      if (Math.abs(t) <= 4) {
        for (let i = 0; i < phi.length; i++) {
          const next = phi[i] + t * (phi[i] - previousPhi[i]);
          const floor = 0.01 * phi[i];
          previousPhi[i] = phi[i];
          phi[i] = next > floor ? next : floor;
        }
        previousMu = lastMu;
        return;
      }
    }
    previousPhi ??= new Float64Array(phi.length);
    previousPhi.set(phi);
    previousMu = lastMu;
  };

  const evaluate = async (mu: number): Promise<number> => {
    if (stopped) return NaN;
    if (lastMu === lastMu) shiftLowerBounds(state, mu - lastMu);
    if (options.mode.kind === 'atoms' && lastMu === lastMu && mu !== lastMu) predict(mu);
    evaluations++;
    lastTolerance = toleranceNow();
    const relax = await relaxAtFixedMu(state, executor, {
      mu,
      temperature,
      tolerance: lastTolerance,
      maxSweeps: Math.max(1, maxSweeps - totalSweeps),
      accelerate,
      observer: (p) =>
        options.observer?.({ ...p, mu, atoms: lastAtoms, muEvaluation: evaluations, totalSweeps: totalSweeps + p.sweep }),
    });
    totalSweeps += relax.sweeps;
    for (const r of relax.residualHistory) history.push(r);
    lastRelax = relax;
    lastMu = mu;
    if (relax.stopped) stopped = true;
    await executor.measure(mu, temperature);
    const totals = latticeTotals(state, mu);
    lastAtoms = totals.atoms;
    atomHistory.push({ mu, atoms: totals.atoms, sweeps: relax.sweeps });
    if (options.mode.kind === 'atoms') {
      bestRelativeError = Math.min(bestRelativeError, Math.abs(totals.atoms - options.mode.atoms) / options.mode.atoms);
    }
    return totals.atoms;
  };

  let mu: number;
  let searchConverged = true;
  if (options.mode.kind === 'mu') {
    mu = options.mode.mu;
    await evaluate(mu);
  } else {
    const target = options.mode.atoms;
    const relTol = options.mode.relativeTolerance;
    const uMax = maxInteraction(model);
    const zJ = 2 * model.geometry.dims * maxHopping(model);
    // Guess from the atomic limit (bisection on the cheap staircase count), then bracket.
    let lo = -zJ - uMax;
    let hi = lo + uMax;
    while (atomicLimitAtoms(model, hi) < target && hi < 1e12) hi += (hi - lo) * 2;
    for (let k = 0; k < 60; k++) {
      const mid = 0.5 * (lo + hi);
      if (atomicLimitAtoms(model, mid) < target) lo = mid;
      else hi = mid;
    }
    let guess = options.mode.muGuess ?? 0.5 * (lo + hi) - 0.5 * zJ;
    let nGuess = (await evaluate(guess)) - target;
    // First step from the caller's slope dN/dmu, else from a smoothed atomic-limit slope,
    // a little long so that one step usually brackets the root. A measured slope (a
    // neighbouring solution) may take steps far below the atomic-limit floor of 1e-3 U.
    const h = 0.1 * uMax;
    const given = options.mode.slopeGuess;
    const measured = given !== undefined && given > 0 && Number.isFinite(given);
    const slope = measured ? given : (atomicLimitAtoms(model, guess + h) - atomicLimitAtoms(model, guess - h)) / (2 * h);
    const newton = slope > 0 ? (1.3 * Math.abs(nGuess)) / slope : 0.25 * uMax;
    const step0 = Math.min(Math.max(newton, (measured ? 1e-9 : 1e-3) * uMax), 0.5 * uMax + zJ);
    let other = guess;
    let nOther = nGuess;
    let step = nGuess > 0 ? -step0 : step0;
    while (nOther > 0 === nGuess > 0 && !stopped && totalSweeps < maxSweeps) {
      guess = other;
      nGuess = nOther;
      other = guess + step;
      nOther = (await evaluate(other)) - target;
      step *= 2;
      if (Math.abs(step) > 1e9) throw new Error('could not bracket the chemical potential for the requested atom number');
    }
    if (stopped || nOther > 0 === nGuess > 0) {
      mu = lastMu;
      searchConverged = false;
    } else {
      const result = await brentRootAsync(
        async (m) => (await evaluate(m)) - target,
        guess,
        other,
        nGuess,
        nOther,
        1e-15 * (Math.abs(guess) + uMax),
        relTol * target,
        100,
        () => stopped || totalSweeps >= maxSweeps,
      );
      searchConverged = result.converged;
      mu = result.root;
      if (lastMu !== mu || lastTolerance > tolerance) await evaluate(mu);
    }
  }
  const finalRelax = lastRelax as unknown as RelaxResult;
  const totals = latticeTotals(state, mu);
  return {
    mu,
    temperature,
    converged: finalRelax.converged && searchConverged && !stopped,
    stopped,
    relax: finalRelax,
    totals,
    muSearch: { evaluations, converged: searchConverged, totalSweeps, atomHistory },
    residualHistory: history,
  };
}
