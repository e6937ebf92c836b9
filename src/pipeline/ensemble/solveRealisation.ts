// One realisation of a disorder ensemble, without files or terminals: the scenario JSON
// with the realisation's seed (realisationSeed.ts) -> validated scenario -> model arrays
// -> Gutzwiller lattice solve (runLattice, the same request `tiercake solve` builds) ->
// the per-site quantities the ensemble accumulates and a one-line record of scalars.
// Runs on the main thread or in a worker thread (realisationWorker.ts); the solve is
// deterministic, so both give the same bits.

import { validateScenario } from '../../scenario/loadScenario.js';
import { resolveScenario, type ResolvedScenario } from '../../scenario/resolveScenario.js';
import type { EnergyUnits } from '../../scenario/scenarioEnergyUnit.js';
import type { Scenario } from '../../scenario/scenarioSchema.js';
import { runLattice, type ExecutorFactory, type RunProgress } from '../../solver/runLattice.js';
import { classifyOutcome, runRequestOf } from '../runRequest.js';
import { createSweepExecutor } from '../../solver/sweepExecutor.js';
import { clusterExecutorFactory } from '../../solver/cluster/clusterSweepExecutor.js';
import { siteFieldsFrom } from '../../observables/siteFields.js';
import { siteArraysOf } from '../../solver/siteArrays.js';
import { defaultPhaseThresholds, type PhaseThresholds } from '../../observables/siteClassification.js';
import { phaseNames } from '../../observables/phaseCodes.js';
import { withRealisationSeed, realisationSeed } from './realisationSeed.js';
import { meanSuperfluidFraction, stiffnessOfSolve } from '../solveStiffness.js';


/** Scalars of one realisation (one row of realisations.csv). */
export interface RealisationRecord {
  index: number;
  converged: boolean;
  /** sweeps of every stage of the solve */
  sweeps: number;
  nmaxUsed: number;
  /** chemical potential, internal energy unit */
  mu: number;
  /** k_B T, internal energy unit */
  temperature: number;
  atoms: number;
  condensedAtoms: number;
  superfluidSpans: boolean;
  superfluidClusters: number;
  largestClusterSites: number;
  /** sites per phase, in phase-code order (phaseNames) */
  phaseSites: number[];
  /**
   * superfluid fraction from a phase twist, mean over the periodic axes (solver.stiffness,
   * src/pipeline/solveStiffness.ts); null when the scenario does not ask for it or no axis is periodic
   */
  superfluidFraction: number | null;
  /** its numerical error (largest over the axes), null with it */
  superfluidFractionError: number | null;
  /** the twist curvature converged on every periodic axis (true when not asked for) */
  stiffnessConverged: boolean;
}

/** What the ensemble accumulates from one realisation. */
export interface RealisationResult {
  record: RealisationRecord;
  density: Float64Array;
  condensateDensity: Float64Array;
  /** PhaseCode per site */
  phaseCodes: Uint8Array;
}

/**
 * Facts shared by every realisation, for the output files. They do not depend on the
 * disorder field, so they come from the scenario with its own seed.
 */
export interface EnsembleContext {
  shape: number[];
  periodic: boolean[];
  trapCentre: number[];
  latticeSpacingUm: number | null;
  units: EnergyUnits;
  mode: ResolvedScenario['mode'];
  /** phase thresholds in use (defaults merged with scenario.phases) */
  thresholds: PhaseThresholds;
}

export function ensembleContextOf(resolved: ResolvedScenario): EnsembleContext {
  return {
    shape: [...resolved.geometry.shape],
    periodic: [...resolved.geometry.periodic],
    trapCentre: [...resolved.trapCentre],
    latticeSpacingUm: resolved.latticeSpacingUm,
    units: { ...resolved.units },
    mode: resolved.mode,
    thresholds: { ...defaultPhaseThresholds, ...resolved.scenario.phases },
  };
}

/** Validated scenario of realisation `index` (throws the scenario's InputError). */
export function realisationScenario(raw: Readonly<Record<string, unknown>>, baseSeed: string, index: number): Scenario {
  return validateScenario(withRealisationSeed(raw, baseSeed, index), `realisation ${index} (seed ${JSON.stringify(realisationSeed(baseSeed, index))})`);
}

/** The serial executor: the whole lattice on the calling thread. */
export const serialExecutor: ExecutorFactory = (state) => createSweepExecutor(state, null, 1);

/**
 * Solve realisation `index` of the ensemble whose scenario JSON is `raw` (overrides
 * applied) and whose scenario seed is `baseSeed`.
 */
export async function solveRealisation(
  raw: Readonly<Record<string, unknown>>,
  baseSeed: string,
  index: number,
  makeExecutor: ExecutorFactory = serialExecutor,
  observer?: (p: RunProgress) => void | 'stop',
  /** folder of the scenario file: landscape files are read relative to it (as in `solve`) */
  scenarioDirectory?: string,
): Promise<RealisationResult> {
  const scenario = realisationScenario(raw, baseSeed, index);
  const resolved = resolveScenario(scenario, scenarioDirectory !== undefined ? { scenarioDirectory } : {});
  const outcome = await runLattice(runRequestOf(resolved, observer), clusterExecutorFactory(scenario.solver.cluster) ?? makeExecutor);
  const fields = siteFieldsFrom(siteArraysOf(outcome.state), outcome.compressibility);
  const classification = classifyOutcome(resolved, outcome, fields, false);
  // The same twisted solves `solve` runs (solveScenario.ts), from this realisation's solution.
  const stiffness = stiffnessOfSolve(scenario.solver, outcome);
  const record: RealisationRecord = {
    index,
    converged: outcome.converged,
    sweeps: outcome.totalSweeps,
    nmaxUsed: outcome.truncation.nmaxUsed,
    mu: outcome.solve.mu,
    temperature: outcome.temperature,
    atoms: outcome.solve.totals.atoms,
    condensedAtoms: outcome.solve.totals.condensedAtoms,
    superfluidSpans: classification.superfluidSpans,
    superfluidClusters: classification.clusters.count,
    largestClusterSites: classification.clusters.largestSize,
    phaseSites: phaseNames.map((name) => classification.counts[name]),
    ...meanSuperfluidFraction(stiffness),
    stiffnessConverged: stiffness?.converged ?? true,
  };
  return { record, density: fields.density, condensateDensity: fields.condensateDensity, phaseCodes: classification.codes };
}
