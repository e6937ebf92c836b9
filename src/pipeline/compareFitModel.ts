// The model of the compare fit: physics parameters -> one lattice solve -> per-site density,
// in memory, on the one resolved scenario, with one sweep pool for every evaluation and a
// warm start from the solutions already found.
//
// Parameters. When the atom number is fitted, the solver is driven at fixed chemical
// potential: the fit parameter is muAbove = mu - muFloor, the chemical potential above the
// edge of the empty lattice (muFloor = min eps - zJ, below which a T = 0 lattice holds no
// atoms), so the parameter stays positive and its finite-difference step (relative to its
// size) scales with the cloud's energies. Each evaluation is then one relaxation instead
// of a root search in mu, and the atom number N(mu) of the solution is reported with it;
// least squares is invariant under the change of parameter (the same minimum), and the
// covariance is carried to N by the Jacobian dN/dmu (compareFit.ts). The temperature
// parameter is k_B T in the scenario's energy unit. When only the temperature is fitted,
// the scenario's particles section stays as it is (fixed-N solves keep their root search,
// started at the nearest solution's mu). When the trap frequency is fitted, the last
// physics parameter is a common factor f on every trap frequency of the scenario: the
// harmonic part of the site potential (trapCoefficient, (1/2) m omega^2 a^2 per axis)
// scales by f^2, eps(f) = eps + (f^2 - 1) eps_trap, the rest of eps (disorder, landscape)
// stays. The potential arrays are kept per value of f, so that solves at the same f reuse
// the solver state (runLattice reuses it only for the same eps array).
//
// Warm start. The solutions found so far are kept (up to 64, about 64 MB): a new parameter
// vector starts from the nearest one's order parameter, extrapolated linearly along the
// line to the second nearest (phi(q) ~ phi_A + t (phi_B - phi_A), t the projection of
// q - A on B - A in relative units; latticeSolve.ts does the same between mu steps), and
// nmax starts at the nearest one's. The solver state itself, with the per-site eigenvalue
// bounds of the Laguerre warm start, carries over from one solve to the next (runLattice's
// `warm`).
//
// Steps far below the finite-difference step. Levenberg-Marquardt ends with steps of
// 1e-8 relative and less (chi-square no longer changes), each a new parameter vector.
// Where a solved point A has its finite-difference partners A + h_j e_j (the fit's own
// Jacobian points, h_j = 1e-4 |A_j|) and the new point lies within 1e-2 h_j of A in every
// component, the density is taken from the fit's own linear model at A,
// n(q) = n(A) + sum_j (q_j - A_j)/h_j (n(A + h_j e_j) - n(A)), instead of a new solve:
// the Taylor remainder is of order |q - A| h n'' ~ 1e-10 of n, two orders below the
// solver's tolerance (1e-8). The fit's final values are always solved exactly (`exact`).

import { maxHopping } from '../lattice/latticeModel.js';
import { addHarmonicTrap } from '../lattice/harmonicTrap.js';
import { runLattice, type ExecutorFactory, type RunOutcome, type RunRequest, type WarmState } from '../solver/runLattice.js';
import { createSweepExecutor, type SweepPool } from '../solver/sweepExecutor.js';
import { clusterExecutorFactory } from '../solver/cluster/clusterSweepExecutor.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import { runRequestOf } from './runRequest.js';
import { threadsFor } from './solveScenario.js';

export interface FitPhysics {
  /** the chemical potential is a fit parameter (the atom number follows) */
  fitsAtoms: boolean;
  /** k_B T is a fit parameter */
  fitsTemperature: boolean;
  /** internal energy of one scenario energy unit (k_B T is given in the scenario's unit) */
  internalPerScenarioUnit: number;
  /** a common factor on the trap frequencies is a fit parameter (the last physics one) */
  fitsTrap?: boolean;
}

/** One evaluation of the model. */
export interface FitSolution {
  /** physics parameters as evaluated */
  physics: Float64Array;
  /** atoms per site */
  density: Float64Array;
  converged: boolean;
  atoms: number;
  condensedAtoms: number;
  /** entropy per atom, k_B */
  entropyPerAtom: number;
  /** factor on the trap frequencies of the scenario (1 unless it is fitted) */
  trapFactor: number;
  /** truncation used */
  nmax: number;
  /** chemical potential and k_B T, internal energy unit */
  muInternal: number;
  kTInternal: number;
  /** sweeps of this solve (0 when taken from the linear model between solves) */
  sweeps: number;
  /** taken from the linear model at a solved point (see the file header), not solved */
  interpolated: boolean;
}

export interface FitModelOptions {
  threads: number;
  /** the pool every evaluation shares (when the lattice is large enough for threads) */
  pool: SweepPool | null;
  /** after each new solve */
  onSolve?: (solution: FitSolution, evaluation: number) => void;
}

export interface FitModel {
  /**
   * The model at `physics` (cached: the same vector is evaluated once). With `exact`, a
   * vector the linear model would answer is solved instead.
   */
  solveAt(physics: Float64Array, exact?: boolean): Promise<FitSolution>;
  /** The model at `physics` if it needs no solve (cached, or the linear model reaches it), else undefined. */
  peek(physics: Float64Array): FitSolution | undefined;
  /**
   * When the atom number is fitted: solve at fixed N = `atoms` (k_B T = kTScenario in the
   * scenario's unit when the temperature is fitted, the scenario's trap) and return the
   * physics vector [muAbove, (kT), (trap factor 1)] of that solution, stored as the first
   * evaluation and warm start.
   */
  startAtAtoms(atoms: number, kTScenario: number | null): Promise<{ physics: Float64Array; solution: FitSolution }>;
  /** Lattice solves so far. */
  readonly evaluations: number;
  /** Evaluations answered by the linear model between solves. */
  readonly interpolations: number;
  /** Sweeps of all solves so far. */
  readonly sweeps: number;
  /** The chemical potential the parameter muAbove counts from (internal unit). */
  readonly muFloor: number;
}

/**
 * Relative atom-number tolerance of the starting solve: it only fixes where the fit starts
 * (the start value is reported as solved), so it need not be tight.
 */
export const START_ATOM_TOLERANCE = 1e-3;
/** Largest extrapolation of the warm-start predictor, in units of |B - A|. */
const MAX_PREDICTOR_STEPS = 50;
/** The linear model answers within this fraction of the finite-difference step. */
const LINEAR_MODEL_REACH = 1e-2;

/** mu - muFloor is positive wherever the lattice holds atoms at T = 0. */
export function emptyLatticeEdge(resolved: ResolvedScenario): number {
  const eps = resolved.model.eps;
  let minEps = Infinity;
  for (let i = 0; i < eps.length; i++) if (eps[i] < minEps) minEps = eps[i];
  return minEps - 2 * resolved.geometry.dims * maxHopping(resolved.model);
}

const keyOf = (v: ArrayLike<number>): string => Array.from(v, (x) => String(x)).join(',');

interface Stored {
  physics: Float64Array;
  phi: Float64Array;
  mu: number;
  nmax: number;
}

/** Squared relative distance between parameter vectors (each axis by its size). */
function distance(a: Float64Array, b: Float64Array): number {
  let d = 0;
  for (let j = 0; j < a.length; j++) {
    const scale = Math.max(Math.abs(a[j]), Math.abs(b[j]), 1e-300);
    d += ((a[j] - b[j]) / scale) ** 2;
  }
  return d;
}

/** The harmonic part of the scenario's site potential (internal energy unit). */
export function harmonicTrapPotential(resolved: ResolvedScenario): Float64Array {
  const eps = new Float64Array(resolved.geometry.siteCount);
  if (resolved.trapCoefficient.some((k) => k > 0)) addHarmonicTrap(resolved.geometry, { coefficient: resolved.trapCoefficient, centre: resolved.trapCentre }, eps);
  return eps;
}

export function createFitModel(resolved: ResolvedScenario, physics: FitPhysics, options: FitModelOptions): FitModel {
  const base = runRequestOf(resolved);
  const trapPart = physics.fitsTrap ? harmonicTrapPotential(resolved) : null;
  /** site potentials per trap factor (the same array for the same factor, so warm states carry over) */
  const epsByFactor = new Map<number, Float64Array>([[1, resolved.model.eps]]);
  const epsAt = (factor: number): Float64Array => {
    let eps = epsByFactor.get(factor);
    if (eps === undefined) {
      if (trapPart === null) throw new Error('createFitModel: the trap frequency is not a fit parameter');
      const scale = factor * factor - 1;
      const baseEps = resolved.model.eps;
      eps = new Float64Array(baseEps.length);
      for (let i = 0; i < eps.length; i++) eps[i] = baseEps[i] + scale * trapPart[i];
      if (epsByFactor.size >= 16) epsByFactor.delete(epsByFactor.keys().next().value as number);
      epsByFactor.set(factor, eps);
    }
    return eps;
  };
  const factorOf = (q: Float64Array): number => (physics.fitsTrap ? q[q.length - 1] : 1);
  const muFloor = emptyLatticeEdge(resolved);
  const keep = Math.max(4, Math.min(64, Math.floor(8e6 / Math.max(1, resolved.geometry.siteCount))));
  const threads = threadsFor(resolved.geometry.siteCount, options.threads);
  const pool = threads > 1 ? options.pool : null;
  const makeExecutor: ExecutorFactory =
    clusterExecutorFactory(resolved.scenario.solver.cluster) ?? ((state) => createSweepExecutor(state, pool, threads));
  const cache = new Map<string, FitSolution>();
  /** solved (not interpolated) evaluations, in order */
  const solved: FitSolution[] = [];
  const stored: Stored[] = [];
  let evaluations = 0;
  let interpolations = 0;
  let sweeps = 0;
  /** the solver state of the last solve, reused (with its eigenvalue bounds) by the next */
  let warm: WarmState | undefined;

  const warmStart = (q: Float64Array): { phi: Float64Array; mu: number; nmax: number } | null => {
    if (stored.length === 0) return null;
    const order = stored.map((s, k) => ({ k, d: distance(q, s.physics) })).sort((x, y) => x.d - y.d);
    const a = stored[order[0].k];
    if (order.length < 2) return { phi: Float64Array.from(a.phi), mu: a.mu, nmax: a.nmax };
    const b = stored[order[1].k];
    let num = 0;
    let den = 0;
    for (let j = 0; j < q.length; j++) {
      const scale = Math.max(Math.abs(a.physics[j]), 1e-300);
      const u = (q[j] - a.physics[j]) / scale;
      const v = (b.physics[j] - a.physics[j]) / scale;
      num += u * v;
      den += v * v;
    }
    const t = den > 0 ? num / den : 0;
    const phi = Float64Array.from(a.phi);
    const extrapolate = t !== 0 && Math.abs(t) <= MAX_PREDICTOR_STEPS;
    if (extrapolate) {
      for (let i = 0; i < phi.length; i++) {
        const next = a.phi[i] + t * (b.phi[i] - a.phi[i]);
        const floor = 0.01 * a.phi[i];
        phi[i] = next > floor ? next : floor;
      }
    }
    return { phi, mu: a.mu + (extrapolate ? t * (b.mu - a.mu) : 0), nmax: Math.max(a.nmax, b.nmax) };
  };

  /** The fit's linear model at a solved point near q, when q is within its reach (file header). */
  const linearModel = (q: Float64Array): FitSolution | null => {
    for (const anchor of solved) {
      const partners: Array<{ solution: FitSolution; weight: number }> = [];
      for (let j = 0; j < q.length; j++) {
        const a = anchor.physics[j];
        const partner = solved.find((s) => {
          if (s === anchor) return false;
          for (let k = 0; k < q.length; k++) if (k !== j && s.physics[k] !== anchor.physics[k]) return false;
          const h = Math.abs(s.physics[j] - a);
          return h > 1e-6 * Math.abs(a) && h < 1e-2 * Math.abs(a) && Math.abs(q[j] - a) <= LINEAR_MODEL_REACH * h;
        });
        if (partner === undefined) break;
        partners.push({ solution: partner, weight: (q[j] - a) / (partner.physics[j] - a) });
      }
      if (partners.length !== q.length) continue;
      const density = Float64Array.from(anchor.density);
      const mix = (value: (s: FitSolution) => number): number =>
        partners.reduce((sum, p) => sum + p.weight * (value(p.solution) - value(anchor)), value(anchor));
      for (const p of partners) {
        const w = p.weight;
        const other = p.solution.density;
        for (let i = 0; i < density.length; i++) density[i] += w * (other[i] - anchor.density[i]);
      }
      return {
        physics: Float64Array.from(q),
        density,
        converged: anchor.converged && partners.every((p) => p.solution.converged),
        atoms: mix((s) => s.atoms),
        condensedAtoms: mix((s) => s.condensedAtoms),
        entropyPerAtom: mix((s) => s.entropyPerAtom),
        trapFactor: mix((s) => s.trapFactor),
        nmax: Math.max(anchor.nmax, ...partners.map((p) => p.solution.nmax)),
        muInternal: mix((s) => s.muInternal),
        kTInternal: mix((s) => s.kTInternal),
        sweeps: 0,
        interpolated: true,
      };
    }
    return null;
  };

  const requestFor = (q: Float64Array, start: ReturnType<typeof warmStart>): RunRequest => {
    let j = 0;
    const chemical: RunRequest['chemical'] = physics.fitsAtoms
      ? { kind: 'mu', mu: muFloor + q[j++] }
      : resolved.chemical.kind === 'atoms'
        ? { ...resolved.chemical, ...(start ? { muGuess: start.mu } : {}) }
        : resolved.chemical;
    const thermal: RunRequest['thermal'] = physics.fitsTemperature ? { kind: 'temperature', kT: q[j++] * physics.internalPerScenarioUnit } : resolved.thermal;
    const eps = epsAt(factorOf(q));
    return {
      ...base,
      model: { ...resolved.model, eps, ...(start ? { nmax: start.nmax } : {}) },
      chemical,
      thermal,
      // The picture needs the density only.
      compressibility: false,
      ...(start ? { initialPhi: start.phi } : {}),
      ...(warm ? { warm } : {}),
    };
  };

  const record = (q: Float64Array, outcome: RunOutcome): FitSolution => {
    warm = outcome.warm;
    const totals = outcome.solve.totals;
    const solution: FitSolution = {
      physics: q,
      density: Float64Array.from(outcome.state.measure.density),
      converged: outcome.converged,
      atoms: totals.atoms,
      condensedAtoms: totals.condensedAtoms,
      entropyPerAtom: totals.atoms > 0 ? totals.entropy / totals.atoms : 0,
      trapFactor: factorOf(q),
      nmax: outcome.model.nmax,
      muInternal: outcome.solve.mu,
      kTInternal: outcome.temperature,
      sweeps: outcome.totalSweeps,
      interpolated: false,
    };
    stored.push({ physics: q, phi: Float64Array.from(outcome.state.fields.phi), mu: outcome.solve.mu, nmax: outcome.model.nmax });
    if (stored.length > keep) stored.shift();
    solved.push(solution);
    cache.set(keyOf(q), solution);
    evaluations++;
    sweeps += outcome.totalSweeps;
    options.onSolve?.(solution, evaluations);
    return solution;
  };

  return {
    get evaluations() {
      return evaluations;
    },
    get interpolations() {
      return interpolations;
    },
    get sweeps() {
      return sweeps;
    },
    muFloor,
    async startAtAtoms(atoms: number, kTScenario: number | null) {
      if (!physics.fitsAtoms) throw new Error('startAtAtoms: the atom number is not a fit parameter');
      const request: RunRequest = {
        ...base,
        chemical: { kind: 'atoms', atoms, relativeTolerance: START_ATOM_TOLERANCE },
        thermal: kTScenario !== null ? { kind: 'temperature', kT: kTScenario * physics.internalPerScenarioUnit } : resolved.thermal,
        compressibility: false,
      };
      const outcome = await runLattice(request, makeExecutor);
      const values = [outcome.solve.mu - muFloor, ...(physics.fitsTemperature ? [kTScenario as number] : []), ...(physics.fitsTrap ? [1] : [])];
      const q = Float64Array.from(values);
      return { physics: q, solution: record(q, outcome) };
    },
    peek(physicsVector: Float64Array): FitSolution | undefined {
      const key = keyOf(physicsVector);
      const known = cache.get(key);
      if (known !== undefined) return known;
      const linear = linearModel(physicsVector);
      if (linear === null) return undefined;
      cache.set(key, linear);
      interpolations++;
      return linear;
    },
    async solveAt(physicsVector: Float64Array, exact = false): Promise<FitSolution> {
      const q = Float64Array.from(physicsVector);
      const known = exact ? cache.get(keyOf(q)) : this.peek(q);
      if (known !== undefined && !(exact && known.interpolated)) return known;
      return record(q, await runLattice(requestFor(q, warmStart(q)), makeExecutor));
    },
  };
}
