// One complete lattice run, independent of files and terminals: solve at fixed mu or N,
// at fixed temperature or fixed entropy per atom, guard the Fock-space truncation
// (raise nmax and solve again when |nmax> carries weight), and optionally measure the
// local compressibility dn_i/dmu by two extra warm-started solves at mu +- dmu.
//
// Fixed entropy: S/N at fixed N grows monotonically with T, so T comes from Brent's
// method on S(T)/N - target, each evaluation a fixed-N solve warm-started from the last.

import type { LatticeModel } from '../lattice/latticeModel.js';
import { maxHopping, maxInteraction } from '../lattice/latticeModel.js';
import { brentRootAsync } from '../numerics/brentRoot.js';
import { initialOrderParameter, solveLattice, type ChemicalPotentialMode, type LatticeSolveResult, type SolveProgress } from './latticeSolve.js';
import { relaxAtFixedMu, shiftLowerBounds } from './relaxation.js';
import type { SweepExecutor } from './sweepExecutor.js';
import { createSolverState, type SolverState } from './solverState.js';

export type ThermalMode =
  | { kind: 'temperature'; kT: number }
  /** kTGuess: where the search for T starts (e.g. the temperature of a neighbouring scan point) */
  | { kind: 'entropy'; entropyPerAtom: number; relativeTolerance: number; kTGuess?: number };

export interface RunRequest {
  model: LatticeModel;
  chemical: ChemicalPotentialMode;
  thermal: ThermalMode;
  tolerance: number;
  maxSweeps: number;
  accelerate: boolean;
  /** step: how much nmax grows per retry (default 2; 1 for clusters, whose cost grows as (nmax + 1)^sites) */
  truncation: { automatic: boolean; topWeightMax: number; nmaxLimit: number; step?: number };
  compressibility: boolean;
  /** starting order parameter (e.g. from a checkpoint); default: atomic-limit guess */
  initialPhi?: Float64Array;
  /**
   * The solver state of an earlier run of the same model (a fit evaluates one model many
   * times): reused, with its eigenvalue bounds, when the truncation and the thermal storage
   * match; its phi is replaced by initialPhi (or the atomic-limit guess).
   */
  warm?: WarmState;
  observer?: (progress: RunProgress) => void | 'stop';
}

/** A solver state and its executor kept between runs of one model (RunOutcome.warm). */
export interface WarmState {
  state: SolverState;
  executor: SweepExecutor;
  /** the site potential the state was made for (the model's eps array itself) */
  eps: Float64Array;
  /** chemical potential of the last relaxation on the state */
  mu: number;
}

export interface RunProgress extends SolveProgress {
  stage: 'solve' | 'temperature' | 'compressibility';
  nmax: number;
  temperature: number;
}

export interface TruncationReport {
  nmaxUsed: number;
  nmaxTried: number[];
  maxTopWeight: number;
  maxTopWeightSite: number;
  ok: boolean;
}

export interface RunOutcome {
  model: LatticeModel;
  state: SolverState;
  solve: LatticeSolveResult;
  temperature: number;
  temperatureSearch: { evaluations: number; converged: boolean; history: Array<{ kT: number; entropyPerAtom: number }> } | null;
  truncation: TruncationReport;
  /** dn_i/dmu per site (energy unit^-1), or null when not requested */
  compressibility: Float64Array | null;
  compressibilityStep: number;
  converged: boolean;
  stopped: boolean;
  totalSweeps: number;
  /** the state of this run, for RunRequest.warm of a later run of the same model */
  warm: WarmState;
}

/** Makes the executor of a new state; `model` is the one the state was made for (its nmax may be raised). */
export type ExecutorFactory = (state: SolverState, model: LatticeModel) => SweepExecutor;

/** Copy of the model with a different truncation. */
function withNmax(model: LatticeModel, nmax: number): LatticeModel {
  return { ...model, nmax };
}

export async function runLattice(request: RunRequest, makeExecutor: ExecutorFactory): Promise<RunOutcome> {
  let model = request.model;
  const tried: number[] = [];
  let phiStart = request.initialPhi ?? initialOrderParameter(model, request.chemical.kind === 'mu' ? request.chemical.mu : 0);
  let sweepsUsed = 0;
  for (;;) {
    tried.push(model.nmax);
    const thermal = request.thermal.kind === 'entropy' || request.thermal.kT > 0;
    const warm = request.warm;
    let state: SolverState;
    let executor: SweepExecutor;
    if (
      warm !== undefined &&
      warm.eps === model.eps &&
      warm.state.layout.nmax === model.nmax &&
      (warm.state.fields.spectrum !== null) === thermal &&
      warm.state.fields.phi.length === phiStart.length
    ) {
      state = warm.state;
      executor = warm.executor;
      state.fields.phi.set(phiStart);
      // The stored bounds hold at the last mu; a change of mu widens them (Weyl), an
      // unknown first mu (a fixed-N search without a guess) drops them.
      const firstMu = request.chemical.kind === 'mu' ? request.chemical.mu : request.chemical.muGuess;
      if (firstMu === undefined) {
        state.fields.lowerEnergy.fill(NaN);
        state.fields.spectrum?.fill(NaN);
      } else {
        shiftLowerBounds(state, firstMu - warm.mu);
      }
    } else {
      state = createSolverState(model, phiStart, { thermal });
      executor = makeExecutor(state, model);
    }
    const stageObserver = (stage: RunProgress['stage'], temperature: number) => (p: SolveProgress) =>
      request.observer?.({ ...p, stage, nmax: model.nmax, temperature, totalSweeps: sweepsUsed + p.totalSweeps });

    const solveAt = async (kT: number, stage: RunProgress['stage']): Promise<LatticeSolveResult> => {
      const result = await solveLattice(model, state, executor, {
        mode: request.chemical,
        temperature: kT,
        tolerance: request.tolerance,
        maxSweeps: Math.max(1, request.maxSweeps - sweepsUsed),
        accelerate: request.accelerate,
        observer: stageObserver(stage, kT),
      });
      sweepsUsed += result.muSearch.totalSweeps;
      return result;
    };

    let temperature: number;
    let solve: LatticeSolveResult;
    let temperatureSearch: RunOutcome['temperatureSearch'] = null;
    if (request.thermal.kind === 'temperature') {
      temperature = request.thermal.kT;
      solve = await solveAt(temperature, 'solve');
    } else {
      const target = request.thermal.entropyPerAtom;
      const history: Array<{ kT: number; entropyPerAtom: number }> = [];
      const entropyAt = async (kT: number): Promise<number> => {
        solve = await solveAt(kT, 'temperature');
        const s = solve.totals.entropy / solve.totals.atoms;
        history.push({ kT, entropyPerAtom: s });
        return s - target;
      };
      const scale = Math.max(maxInteraction(model), 2 * model.geometry.dims * maxHopping(model));
      // Without a guess the bracket starts wide and grows by fixed factors; with a guess
      // (a neighbouring solution) it starts +-5 % around it and the factor squares on
      // every failed step, so a good guess costs two evaluations before Brent.
      const guess = request.thermal.kTGuess;
      const guessed = guess !== undefined && guess > 0 && Number.isFinite(guess);
      let lo = guessed ? guess / 1.05 : 0.02 * scale;
      let hi = guessed ? guess * 1.05 : 0.2 * scale;
      let down = guessed ? 1.05 : 3;
      let up = guessed ? 1.05 : 2.5;
      let flo = await entropyAt(lo);
      // f at hi once known (when lo moved down, hi is the old lo): not evaluated twice
      let fhiKnown: number | undefined;
      let k = 0;
      while (flo > 0 && k++ < 30 && !solve!.stopped) {
        hi = lo;
        fhiKnown = flo;
        if (guessed) down = Math.min(down * down, 3);
        lo /= down;
        flo = await entropyAt(lo);
      }
      let fhi = flo > 0 ? flo : (fhiKnown ?? (await entropyAt(hi)));
      k = 0;
      while (fhi < 0 && k++ < 30 && !solve!.stopped) {
        lo = hi;
        flo = fhi;
        if (guessed) up = Math.min(up * up, 2.5);
        hi *= up;
        fhi = await entropyAt(hi);
      }
      let converged = false;
      if (flo <= 0 && fhi >= 0 && !solve!.stopped) {
        const root = await brentRootAsync(entropyAt, lo, hi, flo, fhi, 1e-12 * hi, request.thermal.relativeTolerance * target, 80, () => solve.stopped);
        converged = root.converged;
        if (history[history.length - 1].kT !== root.root) await entropyAt(root.root);
        temperature = root.root;
      } else {
        temperature = history[history.length - 1].kT;
      }
      temperatureSearch = { evaluations: history.length, converged, history };
      solve = solve!;
    }

    const totals = solve.totals;
    const truncationOk = totals.maxTopWeight <= request.truncation.topWeightMax;
    const nmaxStep = request.truncation.step ?? 2;
    if (!truncationOk && request.truncation.automatic && model.nmax + nmaxStep <= request.truncation.nmaxLimit && !solve.stopped) {
      // Keep the field: it is a good start for the larger Fock space.
      phiStart = Float64Array.from(state.fields.phi);
      model = withNmax(model, model.nmax + nmaxStep);
      continue;
    }

    let compressibility: Float64Array | null = null;
    const step = 1e-3 * Math.max(maxInteraction(model), 2 * model.geometry.dims * maxHopping(model), temperature);
    if (request.compressibility && !solve.stopped) {
      compressibility = await localCompressibility(state, executor, solve.mu, temperature, step, request, (p) =>
        request.observer?.({ ...p, stage: 'compressibility', nmax: model.nmax, temperature, totalSweeps: sweepsUsed + p.sweep, mu: solve.mu, atoms: totals.atoms, muEvaluation: 0 }),
      );
    }
    return {
      model,
      state,
      solve,
      temperature,
      temperatureSearch,
      truncation: {
        nmaxUsed: model.nmax,
        nmaxTried: tried,
        maxTopWeight: totals.maxTopWeight,
        maxTopWeightSite: totals.maxTopWeightSite,
        ok: truncationOk,
      },
      compressibility,
      compressibilityStep: step,
      converged: solve.converged && truncationOk && (temperatureSearch?.converged ?? true),
      stopped: solve.stopped,
      totalSweeps: sweepsUsed,
      warm: { state, executor, eps: model.eps, mu: solve.mu },
    };
  }
}

/**
 * dn_i/dmu by central differences of two converged solves at mu +- step (same T), each
 * warm-started from the solution; the solution's phi and measured fields are restored.
 */
async function localCompressibility(
  state: SolverState,
  executor: SweepExecutor,
  mu: number,
  temperature: number,
  step: number,
  request: RunRequest,
  observer: (p: { sweep: number; change: number; rate: number; errorEstimate: number }) => void | 'stop',
): Promise<Float64Array> {
  const phi = state.fields.phi;
  const saved = Float64Array.from(phi);
  const densityAt = async (m: number): Promise<Float64Array> => {
    phi.set(saved);
    shiftLowerBounds(state, Math.abs(m - mu) * 2);
    await relaxAtFixedMu(state, executor, {
      mu: m,
      temperature,
      tolerance: Math.min(request.tolerance, 1e-9),
      maxSweeps: 5000,
      accelerate: request.accelerate,
      observer,
    });
    await executor.measure(m, temperature);
    return Float64Array.from(state.measure.density);
  };
  const up = await densityAt(mu + step);
  const down = await densityAt(mu - step);
  const out = new Float64Array(phi.length);
  for (let i = 0; i < out.length; i++) out[i] = (up[i] - down[i]) / (2 * step);
  phi.set(saved);
  shiftLowerBounds(state, 4 * step);
  await executor.measure(mu, temperature);
  return out;
}
