// The `solve` pipeline without the command-line parsing: scenario -> model -> parallel
// solve -> per-site fields, phases, shells and profiles. Returns plain data that the
// writers (solveOutputs.ts) turn into files. Nothing here prints.

import { availableParallelism, totalmem } from 'node:os';
import { InputError } from '../scenario/inputError.js';
import { loadScenario } from '../scenario/loadScenario.js';
import { estimateMemoryBytes, resolveScenario, type ResolvedScenario } from '../scenario/resolveScenario.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { runLattice, type RunOutcome, type RunProgress } from '../solver/runLattice.js';
import { kernelModule } from '../solver/kernel/kernelModule.js';
import { defaultKernelChoice } from '../solver/kernel/sweepKernels.js';
import { createSweepExecutor, createSweepPool, type SweepPool } from '../solver/sweepExecutor.js';
import { siteFieldsOf, type SiteFields } from '../observables/siteFields.js';
import type { SiteClassification } from '../observables/siteClassification.js';
import { classifyOutcome, NMAX_CEILING, runRequestOf } from './runRequest.js';
import { scaledRadii, shellSummary, type ShellSummary } from '../observables/shellSummary.js';
import { radialProfile, type RadialProfile } from '../observables/radialProfile.js';

/** Below this many sites the worker round trips cost more than they save. */
export const PARALLEL_MIN_SITES = 8192;


export interface SolveRunOptions {
  scenarioPath: string;
  overrides: string[];
  threads: number;
  observer?: (p: RunProgress) => void | 'stop';
  /** starting order parameter (resume) */
  initialPhi?: Float64Array;
  /** worker module override (tests) */
  pool?: { filename: string; execArgv: string[] };
  /** an already prepared scenario (skips loading it again) */
  prepared?: { scenario: Scenario; raw: Record<string, unknown>; resolved: ResolvedScenario };
  /** continue from an interrupted run */
  resume?: { phi: Float64Array; mu: number; nmax: number };
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
  threadsUsed: number;
  timings: { resolveSeconds: number; solveSeconds: number; analysisSeconds: number };
}

export function parseThreads(text: string | undefined): number {
  if (text === undefined) return Math.max(1, Math.min(availableParallelism(), 64));
  const n = Number(text);
  if (!Number.isInteger(n) || n < 1 || n > 256) throw new InputError(`--threads: expected a whole number from 1 to 256, got ${JSON.stringify(text)}`);
  return n;
}

/** Validate, resolve and refuse what cannot run; allocates only the model arrays. */
export function prepareScenario(path: string, overrides: readonly string[]): { scenario: Scenario; raw: Record<string, unknown>; resolved: ResolvedScenario } {
  const { scenario, raw } = loadScenario(path, overrides);
  const sites = scenario.lattice.shape.reduce((a, b) => a * b, 1);
  const t = scenario.temperature;
  const thermal = (t.kT ?? 0) > 0 || (t.nanokelvin ?? 0) > 0 || (t.entropyPerAtom ?? 0) > 0;
  const bytes = estimateMemoryBytes(sites, true, thermal, scenario.truncation.nmax);
  const limit = 0.6 * totalmem();
  if (bytes > limit) {
    throw new InputError(
      `lattice.shape: ${scenario.lattice.shape.join(' x ')} = ${sites} sites needs about ${(bytes / 2 ** 30).toFixed(1)} GiB, ` +
        `more than the ${(limit / 2 ** 30).toFixed(1)} GiB this machine can spare; use a smaller lattice`,
    );
  }
  const resolved = resolveScenario(scenario);
  checkPhysicalConsistency(resolved);
  return { scenario, raw, resolved };
}

/** Inputs that validate but cannot give a meaningful answer. */
function checkPhysicalConsistency(resolved: ResolvedScenario): void {
  const { scenario, model, chemical } = resolved;
  const nmax = scenario.truncation.nmax;
  if (chemical.kind === 'atoms') {
    const capacity = model.geometry.siteCount * nmax;
    if (chemical.atoms >= capacity) {
      throw new InputError(
        `particles.atoms: ${chemical.atoms} atoms cannot fit on ${model.geometry.siteCount} sites with at most nmax = ${nmax} per site; ` +
          `raise truncation.nmax or enlarge lattice.shape`,
      );
    }
  } else {
    const u = typeof model.interactionU === 'number' ? model.interactionU : Math.min(...model.interactionU);
    let minEps = Infinity;
    for (let i = 0; i < model.eps.length; i++) if (model.eps[i] < minEps) minEps = model.eps[i];
    const expectedFilling = Math.ceil((chemical.mu - minEps) / u);
    const ceiling = Math.max(nmax, NMAX_CEILING);
    if (expectedFilling >= 60) {
      throw new InputError(
        `particles.chemicalPotential: gives about ${expectedFilling} atoms per site at the trap centre, beyond what a Gutzwiller ` +
          `truncation can hold (nmax <= 60); lower particles.chemicalPotential`,
      );
    }
    if (expectedFilling >= ceiling && scenario.truncation.automatic) {
      throw new InputError(
        `truncation.nmax: the chemical potential gives about ${expectedFilling} atoms per site at the trap centre, above the ` +
          `automatic limit nmax = ${ceiling}; set truncation.nmax to at least ${expectedFilling + 3}`,
      );
    }
    if (expectedFilling >= nmax && !scenario.truncation.automatic) {
      throw new InputError(
        `truncation.nmax: the chemical potential gives about ${expectedFilling} atoms per site at the trap centre, ` +
          `but nmax = ${nmax}; raise truncation.nmax above ${expectedFilling} or set truncation.automatic to true`,
      );
    }
  }
}

function trapAxisScale(coefficients: readonly number[]): number[] {
  const nonZero = coefficients.filter((k) => k > 0);
  if (nonZero.length === 0) return coefficients.map(() => 1);
  const reference = coefficients[0] > 0 ? coefficients[0] : nonZero[0];
  return coefficients.map((k) => (k > 0 ? Math.sqrt(k / reference) : 1));
}

export async function solveScenario(options: SolveRunOptions): Promise<SolveArtifacts> {
  const t0 = performance.now();
  const { scenario, raw, resolved } = options.prepared ?? prepareScenario(options.scenarioPath, options.overrides);
  const t1 = performance.now();
  const model = options.resume ? { ...resolved.model, nmax: options.resume.nmax } : resolved.model;
  const chemical =
    options.resume && resolved.chemical.kind === 'atoms' ? { ...resolved.chemical, muGuess: options.resume.mu } : resolved.chemical;
  const threads = model.geometry.siteCount >= PARALLEL_MIN_SITES ? options.threads : 1;
  // TIERCAKE_KERNEL (set process-wide by the command line) overrides the scenario.
  const kernel = defaultKernelChoice() !== 'auto' ? defaultKernelChoice() : scenario.solver.kernel;
  if (kernel === 'wasm' && kernelModule.module === null) {
    throw new InputError(`solver.kernel: "wasm" is not available: ${kernelModule.reason}; use "auto" or "js"`);
  }
  let pool: SweepPool | null = null;
  if (threads > 1) {
    pool = createSweepPool({ workers: threads - 1, ...(options.pool ? { filename: options.pool.filename, execArgv: options.pool.execArgv } : {}) });
  }
  let outcome: RunOutcome;
  try {
    outcome = await runLattice(
      {
        ...runRequestOf(resolved, options.observer),
        model,
        chemical,
        ...(options.initialPhi ? { initialPhi: options.initialPhi } : {}),
        ...(options.resume ? { initialPhi: options.resume.phi } : {}),
      },
      (state) => createSweepExecutor(state, pool, threads, { kernel }),
    );
  } finally {
    if (pool) await pool.destroy();
  }
  const t2 = performance.now();
  const fields = siteFieldsOf(outcome.state, outcome.compressibility);
  const geometry = model.geometry;
  const classification = classifyOutcome(resolved, outcome, fields);
  const axisScale = trapAxisScale(resolved.trapCoefficient);
  const radius = scaledRadii(geometry.shape, resolved.trapCentre, axisScale);
  const shells = shellSummary(fields.density, fields.condensateDensity, classification.codes, classification.mottFilling, radius);
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
  const t3 = performance.now();
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
    threadsUsed: threads,
    timings: { resolveSeconds: (t1 - t0) / 1000, solveSeconds: (t2 - t1) / 1000, analysisSeconds: (t3 - t2) / 1000 },
  };
}
