// Stage 2 of `solve`: a prepared scenario (prepareScenario.ts) -> parallel lattice solve
// (runLattice, with the request every command shares, runRequest.ts) -> per-site fields,
// phases, shells and radial profiles. Returns plain data that the writers
// (src/output/solveOutputs.ts) turn into files. Nothing here prints, writes or reads the
// clock: progress goes to the observer, timings to an injected clock.

import { InputError } from '../scenario/inputError.js';
import { runLattice, type RunOutcome, type RunProgress } from '../solver/runLattice.js';
import { clusterExecutorFactory, clusterReadingOf, createClusterWorkers, isClusterShape, type ClusterReading, type ClusterWorkers } from '../solver/cluster/clusterSweepExecutor.js';
import { kernelModule } from '../solver/kernel/kernelModule.js';
import { defaultKernelChoice } from '../solver/kernel/sweepKernels.js';
import { createSweepExecutor, createSweepPool, type SweepPool } from '../solver/sweepExecutor.js';
import { siteFieldsFrom, type SiteFields } from '../observables/siteFields.js';
import { siteArraysOf } from '../solver/siteArrays.js';
import type { SiteClassification } from '../observables/siteClassification.js';
import { classifyOutcome, runRequestOf } from './runRequest.js';
import { scaledRadii, shellSummary, type ShellSummary } from '../observables/shellSummary.js';
import { radialProfile, type RadialProfile } from '../observables/radialProfile.js';
import type { PreparedScenario } from './prepareScenario.js';
import { readingWarningsOfSolve, type ReadingWarning } from '../observables/readingWarnings.js';
import type { ResolvedScenario } from '../scenario/resolveScenario.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { stiffnessOfSolve, type StiffnessReading } from './solveStiffness.js';

/** Below this many sites the worker round trips cost more than they save. */
export const PARALLEL_MIN_SITES = 8192;

/** Where the sweep workers' module lives (tests pass the TypeScript source and a loader). */
export interface WorkerModule {
  filename: string;
  execArgv?: string[];
}

export interface SolveOptions {
  /** compute threads, the calling thread included */
  threads: number;
  /** progress after each sweep; 'stop' interrupts (the outcome says stopped) */
  observer?: (p: RunProgress) => void | 'stop';
  /** a sweep pool owned by the caller (kept alive); by default one is made and destroyed here */
  sweepPool?: SweepPool;
  /** worker module override for the pool made here (tests) */
  workerModule?: WorkerModule;
  /** worker module override for the cluster method's threads (tests) */
  clusterWorkerModule?: WorkerModule;
  /**
   * continue from an interrupted run (checkpoint), or start from a neighbouring solution
   * (scans): phi, mu (the fixed-N search starts there), nmax, and optionally k_B T
   * (internal unit; the fixed-entropy search starts there) and dN/dmu (the fixed-N
   * search's first step)
   */
  resume?: { phi: Float64Array; mu: number; nmax: number; kT?: number; atomSlope?: number };
  /** milliseconds of some monotonic clock, for the timings in the summary; default: no timings (0) */
  clock?: () => number;
  /** seconds the caller spent preparing the scenario, echoed in the timings */
  prepareSeconds?: number;
}

export interface SolveArtifacts {
  scenario: Scenario;
  raw: Record<string, unknown>;
  resolved: ResolvedScenario;
  outcome: RunOutcome;
  fields: SiteFields;
  classification: SiteClassification;
  /** trap-scaled radius of each site, in sites */
  radius: Float64Array;
  axisScale: number[];
  shells: ShellSummary;
  profile: RadialProfile;
  /** the cluster method's own reading (shape, bond correlations), null for single sites */
  cluster: ClusterReading | null;
  /** what cannot be trusted in the solution as it stands (readingWarnings.ts) */
  readingWarnings: ReadingWarning[];
  /** superfluid fraction from a phase twist (solver.stiffness), null when not asked for */
  stiffness: StiffnessReading | null;
  /** threads asked for (the caller's `threads`) */
  threadsRequested: number;
  threadsUsed: number;
  /** stiffnessSeconds only with solver.stiffness */
  timings: { resolveSeconds: number; solveSeconds: number; analysisSeconds: number; stiffnessSeconds?: number };
}

/** Threads a lattice of this size uses: below PARALLEL_MIN_SITES one. */
export function threadsFor(siteCount: number, threads: number): number {
  return siteCount >= PARALLEL_MIN_SITES ? Math.max(1, threads) : 1;
}

/** Per-axis factors that make the trap round: sqrt(k_d / k_ref), 1 on untrapped axes. */
export function trapAxisScale(coefficients: readonly number[]): number[] {
  const nonZero = coefficients.filter((k) => k > 0);
  if (nonZero.length === 0) return coefficients.map(() => 1);
  const reference = coefficients[0] > 0 ? coefficients[0] : nonZero[0];
  return coefficients.map((k) => (k > 0 ? Math.sqrt(k / reference) : 1));
}

export async function solveScenario(prepared: PreparedScenario, options: SolveOptions): Promise<SolveArtifacts> {
  const clock = options.clock ?? (() => 0);
  const { scenario, raw, resolved } = prepared;
  const t1 = clock();
  const model = options.resume ? { ...resolved.model, nmax: options.resume.nmax } : resolved.model;
  const chemical =
    options.resume && resolved.chemical.kind === 'atoms'
      ? { ...resolved.chemical, muGuess: options.resume.mu, ...(options.resume.atomSlope !== undefined ? { slopeGuess: options.resume.atomSlope } : {}) }
      : resolved.chemical;
  const thermal =
    options.resume?.kT !== undefined && resolved.thermal.kind === 'entropy' ? { ...resolved.thermal, kTGuess: options.resume.kT } : resolved.thermal;
  // The cluster method shares the clusters of each colour between the calling thread and
  // threads - 1 workers (cluster solves are costly: threads pay off on any lattice).
  const clustered = isClusterShape(scenario.solver.cluster);
  const threads = clustered ? Math.max(1, options.threads) : threadsFor(model.geometry.siteCount, options.threads);
  const clusterWorkers: ClusterWorkers | null = clustered && threads > 1 ? createClusterWorkers(threads - 1, options.clusterWorkerModule ?? {}) : null;
  const clusterFactory = clusterExecutorFactory(scenario.solver.cluster, clusterWorkers);
  let ownPool: SweepPool | null = null;
  // TIERCAKE_KERNEL (set process-wide by the command line) overrides the scenario.
  const kernel = defaultKernelChoice() !== 'auto' ? defaultKernelChoice() : scenario.solver.kernel;
  if (kernel === 'wasm' && kernelModule.module === null) {
    throw new InputError(`solver.kernel: "wasm" is not available: ${kernelModule.reason}; use "auto" or "js"`);
  }
  let pool: SweepPool | null = null;
  if (threads > 1 && !clustered) {
    pool = options.sweepPool ?? null;
    if (pool === null) {
      ownPool = createSweepPool({ workers: threads - 1, ...(options.workerModule ?? {}) });
      pool = ownPool;
    }
  }
  let outcome: RunOutcome;
  try {
    outcome = await runLattice(
      {
        ...runRequestOf(resolved, options.observer),
        model,
        chemical,
        thermal,
        ...(options.resume ? { initialPhi: options.resume.phi } : {}),
      },
      clusterFactory ?? ((state) => createSweepExecutor(state, pool, threads, { kernel })),
    );
  } finally {
    if (ownPool) await ownPool.destroy();
    if (clusterWorkers) await clusterWorkers.destroy();
  }
  const t2 = clock();
  const cluster = clusterReadingOf(outcome.warm.executor, outcome.state.fields.phi);
  const fields = siteFieldsFrom(siteArraysOf(outcome.state), outcome.compressibility);
  const geometry = model.geometry;
  const classification = classifyOutcome(resolved, outcome, fields);
  const axisScale = trapAxisScale(resolved.trapCoefficient);
  const radius = scaledRadii(geometry.shape, resolved.trapCentre, axisScale);
  const shells = shellSummary(fields.density, fields.condensateDensity, classification.codes, classification.mottFilling, radius, scenario.profiles.binWidthSites);
  const readingWarnings = readingWarningsOfSolve(
    outcome,
    fields.density,
    { tolerance: scenario.solver.tolerance, topWeightMax: scenario.truncation.topWeightMax, fixedAtoms: resolved.chemical.kind === 'atoms' },
    { coefficient: resolved.trapCoefficient, centre: resolved.trapCentre },
  );
  const profile = radialProfile(
    {
      density: fields.density,
      condensateDensity: fields.condensateDensity,
      numberVariance: fields.numberVariance,
      entropy: fields.entropy,
      parityOdd: fields.parityOdd,
    },
    {
      shape: geometry.shape,
      binWidth: scenario.profiles.binWidthSites,
      centre: resolved.trapCentre,
      axisScale,
      localChemicalPotential: { mu: outcome.solve.mu, siteEnergy: fields.sitePotential },
    },
  );
  const t3 = clock();
  const stiffness = stiffnessOfSolve(scenario.solver, outcome);
  const t4 = stiffness !== null ? clock() : t3;
  return {
    scenario,
    raw,
    resolved,
    outcome,
    fields,
    classification,
    radius,
    axisScale,
    shells,
    profile,
    cluster,
    readingWarnings: cluster === null ? readingWarnings : [...readingWarnings, ...clusterWarnings(cluster)],
    stiffness,
    threadsRequested: options.threads,
    threadsUsed: outcome.warm.executor.threads,
    timings: { resolveSeconds: options.prepareSeconds ?? 0, solveSeconds: (t2 - t1) / 1000, analysisSeconds: (t3 - t2) / 1000, ...(stiffness !== null ? { stiffnessSeconds: (t4 - t3) / 1000 } : {}) },
  };
}

/** Cluster eigen-solves that missed their tolerance, or a thermal cluster state cut short. */
function clusterWarnings(c: ClusterReading): ReadingWarning[] {
  const out: ReadingWarning[] = [];
  if (!c.clusterSolvesConverged) {
    out.push({
      code: 'cluster-eigensolve',
      message: `some cluster eigen-solves (Lanczos, [${c.shape.join(', ')}] clusters) stopped before their residual tolerance; the fields may be off at that level; a smaller cluster or nmax makes the dense solver take over`,
    });
  }
  if (c.maxTruncationWeight > 1e-10) {
    out.push({
      code: 'cluster-thermal-truncation',
      message: `the thermal cluster state keeps only the lowest eigenstates; the highest kept carries a Boltzmann weight of ${c.maxTruncationWeight.toExponential(2)} (target 1e-10), so entropy and fluctuations are slightly low`,
    });
  }
  return out;
}
