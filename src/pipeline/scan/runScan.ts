// The scan runner: the points of the given chains (scanPlan.ts), each solved as `solve`
// would solve it (solveScenario). The first point of a chain starts from the solver's own
// atomic-limit guess; every later one from the solutions before it (warm start):
//   - order parameter, chemical potential and k_B T: extrapolated linearly from the two
//     previous points when the three lie on one grid line (x = the axis value, its
//     logarithm on a log axis; q(new) = q1 + t (q1 - q0), t = (x - x1)/(x1 - x0), used
//     for 0 < t <= 2), else the previous point's values; the fixed-N search starts at
//     that mu, the fixed-entropy search brackets around that T;
//   - the fixed-N search's first step uses the previous point's dN/dmu (the secant of its
//     last two chemical-potential evaluations) instead of the atomic-limit slope;
//   - the truncation nmax of the previous point.
//
// The warm order parameter is floored at WARM_PHI_FLOOR (phi >= 0 in the ground state,
// relaxation.ts). phi = 0 solves the mean-field equations everywhere (an unstable solution
// where the state is superfluid), so a Mott region of the previous point carried over
// unchanged could never turn superfluid, and a tiny proximity phi (1e-10) takes many
// sweeps to grow; the floor is a fifth of the cold start's smallest value (0.05,
// latticeSolve.ts initialOrderParameter) and decays in a few sweeps where the new point
// is insulating.
//
// Points already done (a resumed run) are skipped: the done points of a chain are always a
// prefix of it, and the chain continues from the stored solutions of the last two, the
// same start an uninterrupted run gives it, so a resumed scan has the same bits. A chain
// whose stored solutions are missing is solved again from its start.
// Nothing here touches files: the scenario of a point comes from the injected `prepare`,
// results go to `onPoint`, progress to `observer`.

import { solveScenario, type SolveArtifacts } from '../solveScenario.js';
import type { PreparedScenario } from '../prepareScenario.js';
import type { RunProgress } from '../../solver/runLattice.js';
import type { SweepPool } from '../../solver/sweepExecutor.js';
import { chainPoints, pointCoordinates, pointValues, type ScanPlan } from './scanPlan.js';
import { scenarioOfPoint, type DensityHold } from './scanPoint.js';
import { scanRowOf, type ScanRow } from './scanRow.js';
import { combineRealisationRows } from './realisationRows.js';
import { realisationSeed } from '../ensemble/realisationSeed.js';
import { InputError } from '../../scenario/inputError.js';

const yieldToEventLoop = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

/** Smallest phi a warm start begins with (see the file header). */
export const WARM_PHI_FLOOR = 0.01;
/** Largest extrapolation of the predictor, in steps of the last two points. */
const MAX_PREDICTOR_STEPS = 2;

/** A point's solution, what the next points of its chain start from (internal energy unit). */
export interface WarmStart {
  phi: Float64Array;
  mu: number;
  nmax: number;
  kT: number;
  /** dN/dmu near the solution (fixed-N searches), or NaN */
  atomSlope: number;
}

export interface DonePoint {
  row: ScanRow;
  /** the point's solution, when it was kept (the last two done points of each chain) */
  warm: WarmStart | null;
}

export interface ScanPointResult {
  point: number;
  chain: number;
  /** position in the chain (0: cold start) */
  position: number;
  row: ScanRow;
  artifacts: SolveArtifacts;
  warm: WarmStart;
  /** the --set overrides that made this point's scenario */
  overrides: string[];
  /** the point is the last of its chain */
  lastOfChain: boolean;
}

export interface ScanProgress {
  point: number;
  /** points finished in this run (done ones not counted) and points this run solves */
  finished: number;
  toSolve: number;
  solve: RunProgress;
}

export interface RunScanOptions {
  plan: ScanPlan;
  /** chains to solve, in this order */
  chains: readonly number[];
  hold: DensityHold;
  /** scenario with the user's overrides and then `extra` */
  prepare: (extra: readonly string[]) => PreparedScenario;
  threads: number;
  sweepPool?: SweepPool | null;
  /** a point already done, or undefined */
  done?: (point: number) => DonePoint | undefined;
  /** start each point from its predecessors (default true; false gives the cold solves a benchmark compares with) */
  warmStarts?: boolean;
  onPoint: (result: ScanPointResult) => void | Promise<void>;
  observer?: (p: ScanProgress) => void;
  shouldStop?: () => boolean;
}

export interface ScanRunSummary {
  stopped: boolean;
  solved: number;
  skipped: number;
  sweeps: number;
}

/** phi raised to the floor wherever it is below (phi >= 0 in the ground state). */
export function flooredPhi(phi: Float64Array, floor = WARM_PHI_FLOOR): Float64Array {
  const out = new Float64Array(phi.length);
  for (let i = 0; i < phi.length; i++) out[i] = phi[i] > floor ? phi[i] : floor;
  return out;
}

/** dN/dmu from the two evaluations of a fixed-N search nearest its answer (NaN if there are not two). */
export function searchSlope(history: ReadonlyArray<{ mu: number; atoms: number }>, mu: number): number {
  const byDistance = [...history].sort((a, b) => Math.abs(a.mu - mu) - Math.abs(b.mu - mu));
  const first = byDistance[0];
  const second = byDistance.find((h) => h.mu !== first?.mu);
  if (first === undefined || second === undefined) return NaN;
  const slope = (first.atoms - second.atoms) / (first.mu - second.mu);
  return slope > 0 && Number.isFinite(slope) ? slope : NaN;
}

interface Solved {
  point: number;
  warm: WarmStart;
}

/**
 * The predictor's step t = (x - x1)/(x1 - x0) when points p0, p1, p lie on one grid line
 * with p1 between p0 and p on the same side, else null.
 */
export function predictorStep(plan: ScanPlan, p0: number, p1: number, p: number): number | null {
  const c0 = pointCoordinates(plan, p0);
  const c1 = pointCoordinates(plan, p1);
  const c = pointCoordinates(plan, p);
  const moving = c.map((_, a) => c0[a] !== c1[a] || c1[a] !== c[a]);
  const axis = moving.indexOf(true);
  if (axis < 0 || moving.lastIndexOf(true) !== axis) return null;
  const a = plan.axes[axis];
  const x = (k: number): number => (a.spacing === 'log' ? Math.log(a.values[k]) : a.values[k]);
  const t = (x(c[axis]) - x(c1[axis])) / (x(c1[axis]) - x(c0[axis]));
  return t > 0 && t <= MAX_PREDICTOR_STEPS && Number.isFinite(t) ? t : null;
}

/** The start of point p from the chain's last (and second to last) solutions. */
export function warmStartFor(plan: ScanPlan, before: readonly Solved[], p: number, sites: number): WarmStart | null {
  const last = before[before.length - 1];
  if (last === undefined || last.warm.phi.length !== sites) return null;
  const prev = before[before.length - 2];
  const t = prev !== undefined && prev.warm.phi.length === sites ? predictorStep(plan, prev.point, last.point, p) : null;
  const w1 = last.warm;
  if (t === null) return { ...w1, phi: flooredPhi(w1.phi) };
  const w0 = (prev as Solved).warm;
  const phi = new Float64Array(sites);
  for (let i = 0; i < sites; i++) {
    const v = w1.phi[i] + t * (w1.phi[i] - w0.phi[i]);
    phi[i] = v > WARM_PHI_FLOOR ? v : WARM_PHI_FLOOR;
  }
  const kT = w1.kT + t * (w1.kT - w0.kT);
  return { phi, mu: w1.mu + t * (w1.mu - w0.mu), nmax: Math.max(w1.nmax, w0.nmax), kT: kT > 0 ? kT : w1.kT, atomSlope: w1.atomSlope };
}

/** Where a chain resumes: the done prefix and the solutions the next point needs (up to two). */
function resumeChain(plan: ScanPlan, chain: number, done: RunScanOptions['done']): { points: number[]; start: number; before: Solved[] } {
  const points = chainPoints(plan, chain);
  let k = 0;
  while (k < points.length && done?.(points[k]) !== undefined) k++;
  if (k === 0 || k === points.length) return { points, start: k, before: [] };
  const before: Solved[] = [];
  for (let j = Math.max(0, k - 2); j < k; j++) {
    const warm = done?.(points[j])?.warm ?? null;
    if (warm === null) return { points, start: 0, before: [] };
    before.push({ point: points[j], warm });
  }
  return { points, start: k, before };
}

export async function runScan(options: RunScanOptions): Promise<ScanRunSummary> {
  const { plan } = options;
  const useWarm = options.warmStarts ?? true;
  const chains = options.chains.map((c) => ({ chain: c, ...resumeChain(plan, c, options.done) }));
  const toSolve = chains.reduce((n, s) => n + s.points.length - s.start, 0);
  const summary: ScanRunSummary = { stopped: false, solved: 0, skipped: chains.reduce((n, s) => n + s.start, 0), sweeps: 0 };
  // Several disorder realisations per point: realisation r of every point uses the seed
  // "<disorder.seed>/r" (the ensemble's rule), each solved cold (see scanPlan.ts).
  const realisations = plan.realisations;
  let baseSeed = '';
  if (realisations > 1) {
    const disorder = options.prepare([]).scenario.disorder;
    if (!disorder) throw new InputError('--realisations: the scenario has no disorder block, so every realisation would be the same; add one, e.g. "disorder": {"kind": "box", "width": 0.5, "seed": "run1"}');
    baseSeed = disorder.seed;
  }
  for (const { chain, points, start, before } of chains) {
    const solved = [...before];
    for (let position = start; position < points.length; position++) {
      const point = points[position];
      await yieldToEventLoop(); // lets signal handlers run between points (a one-thread solve never yields)
      if (options.shouldStop?.()) {
        summary.stopped = true;
        return summary;
      }
      let stopped = false;
      const rows: ScanRow[] = [];
      let first: { artifacts: SolveArtifacts; overrides: string[]; from: WarmStart | null } | null = null;
      for (let r = 0; r < realisations; r++) {
        const seeded = realisations > 1 ? (extra: readonly string[]): PreparedScenario => options.prepare([...extra, `disorder.seed=${realisationSeed(baseSeed, r)}`]) : options.prepare;
        const { prepared, overrides } = scenarioOfPoint(plan, point, options.hold, seeded);
        const sites = prepared.resolved.geometry.siteCount;
        const from = useWarm && realisations === 1 ? warmStartFor(plan, solved, point, sites) : null;
        const solvedRealisation = await solveScenario(prepared, {
          threads: options.threads,
          ...(options.sweepPool ? { sweepPool: options.sweepPool } : {}),
          ...(from ? { resume: { phi: from.phi, mu: from.mu, nmax: from.nmax, kT: from.kT, ...(from.atomSlope > 0 ? { atomSlope: from.atomSlope } : {}) } } : {}),
          observer: (p) => {
            options.observer?.({ point, finished: summary.solved, toSolve, solve: p });
            if (options.shouldStop?.()) stopped = true;
            return stopped ? 'stop' : undefined;
          },
        });
        if (solvedRealisation.outcome.stopped || stopped) {
          summary.stopped = true;
          return summary;
        }
        rows.push(scanRowOf(point, pointValues(plan, point), solvedRealisation, from !== null));
        if (r === 0) first = { artifacts: solvedRealisation, overrides: realisations > 1 ? [...overrides, `disorder.seed=${realisationSeed(baseSeed, 0)}`] : overrides, from };
        if (r < realisations - 1) await yieldToEventLoop();
      }
      const { artifacts, overrides } = first as NonNullable<typeof first>;
      const o = artifacts.outcome;
      const warm: WarmStart = {
        phi: Float64Array.from(o.state.fields.phi),
        mu: o.solve.mu,
        nmax: o.model.nmax,
        kT: o.temperature,
        atomSlope: searchSlope(o.solve.muSearch.atomHistory, o.solve.mu),
      };
      solved.push({ point, warm });
      if (solved.length > 2) solved.shift();
      // realisation 0's solution is the point's kept folder and warm start; the row is the mean of all
      const row = combineRealisationRows(rows);
      summary.solved++;
      summary.sweeps += row.sweeps;
      await options.onPoint({ point, chain, position, row, artifacts, warm, overrides, lastOfChain: position === points.length - 1 });
    }
  }
  return summary;
}
