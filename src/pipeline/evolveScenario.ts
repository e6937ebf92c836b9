// The pipeline of `tiercake evolve`: a prepared scenario with an `evolution` section ->
// start (T = 0 ground state) -> reference ground state at the final parameters (for the
// verdict and the shell map of the defect counts) -> time evolution with ramps and
// modulation, recording evolution rows, snapshots and animation frames -> adiabaticity
// verdict -> optional modulation spectrum of the loaded cloud. Returns plain data for the
// writers (src/output/evolveOutputs.ts). No files, no console, no clock: progress goes to
// an observer, interruption through `shouldStop`, event-loop turns through `pause`.
//
// Parallel: lattices of at least `parallelMinSites` sites run on the calling thread plus
// persistent dynamics workers (src/dynamics/parallelRunner.ts); the results are identical
// for any thread count. The static solves use the solver's sweep pool as `solve` does.

import { adiabaticityVerdict, type AdiabaticityVerdict } from '../dynamics/adiabaticity.js';
import type { Drive } from '../dynamics/drive.js';
import { copyFrame, frameFromModel, type DynamicsFrame } from '../dynamics/dynamicsFrame.js';
import { createSerialRunner, type DynamicsRunner } from '../dynamics/dynamicsRunner.js';
import { evolve, type EvolveResult } from '../dynamics/evolve.js';
import { copyState, maxNormError, type GutzwillerState } from '../dynamics/gutzwillerState.js';
import { createDynamicsPool, createParallelRunner, shareFrame, type DynamicsPool } from '../dynamics/parallelRunner.js';
import type { RunProgress } from '../solver/runLattice.js';
import { createSweepPool, type SweepPool } from '../solver/sweepExecutor.js';
import { InputError } from '../scenario/inputError.js';
import { evolutionPlan, type EvolutionPlan, type EvolutionPlanWarning } from './evolutionPlan.js';
import { groundState, modelOfFrame, type GroundRequest, type StaticState } from './evolveGround.js';
import { evolveCamera } from './evolvePictures.js';
import { createEvolveRecorder, type AnimationFrame, type EvolutionSeries, type EvolutionSnapshot } from './evolveRecorder.js';
import { runModulationScan, type SpectrumResult } from './modulationScan.js';
import type { PreparedScenario } from './prepareScenario.js';
import { scenarioDrive } from './scenarioDrive.js';
import { PARALLEL_MIN_SITES, type WorkerModule } from './solveScenario.js';
import { interruptibleRunner, EvolutionInterrupted } from './interruptibleRunner.js';

/** Below this many sites one thread is faster than the barrier round trips (bench/dynamicsBench.mjs). */
export const DYNAMICS_PARALLEL_MIN_SITES = 2048;

export interface EvolveProgress {
  stage: 'start' | 'reference' | 'evolve' | 'spectrum';
  /** evolve: time reached; spectrum: points done */
  done: number;
  total: number;
  detail?: string;
  solver?: RunProgress;
}

export interface EvolveOptions {
  threads: number;
  /** h f of the spectrum points in the energy unit (command line); replaces the scenario's */
  modulationFrequencies?: number[];
  observer?: (p: EvolveProgress) => void;
  /** polled between passes; true stops the run (result status 'stopped', nothing to write) */
  shouldStop?: () => boolean;
  /** an event-loop turn (the command line passes setImmediate), so that signals arrive */
  pause?: () => Promise<void>;
  /** lattices from this many sites use the worker threads (default DYNAMICS_PARALLEL_MIN_SITES) */
  parallelMinSites?: number;
  /** worker modules (tests pass the TypeScript sources and a loader) */
  dynamicsWorkerModule?: WorkerModule;
  sweepWorkerModule?: WorkerModule;
  /** milliseconds of a monotonic clock, for the timings; default none */
  clock?: () => number;
  /** bytes the run may use */
  memoryLimitBytes?: number;
  /** folder of the scenario file (landscape files are read again for a term ramped from 0) */
  scenarioDirectory?: string;
}

export interface EvolveVerdict extends AdiabaticityVerdict {
  /** excess energy and every shell's excess defects within their thresholds */
  adiabaticOverall: boolean;
  energyCriterion: boolean;
  defectCriterion: boolean;
  excessEnergyThresholdU: number;
  excessDefectsThreshold: number;
  /** U at the trap centre at the end, internal unit */
  finalInteraction: number;
}

export interface EvolveArtifacts {
  prepared: PreparedScenario;
  plan: EvolutionPlan;
  start: StaticState;
  reference: StaticState;
  series: EvolutionSeries;
  snapshots: EvolutionSnapshot[];
  frames: AnimationFrame[];
  verdict: EvolveVerdict | null;
  spectrum: SpectrumResult | null;
  result: EvolveResult;
  status: 'done' | 'failed' | 'stopped';
  /** the start or the reference did not converge, or the integrator failed */
  trustworthy: boolean;
  warnings: EvolutionPlanWarning[];
  threadsUsed: number;
  timings: { startSeconds: number; referenceSeconds: number; evolveSeconds: number; spectrumSeconds: number };
}

/** Bytes the evolution needs (integrator stages and copies of the state), to refuse what cannot run. */
export function evolveMemoryBytes(siteCount: number, nmax: number): number {
  const stateBytes = 2 * siteCount * (nmax + 1) * 8;
  return 14 * stateBytes + 40 * siteCount * 8;
}

/** Refuse a scenario without an `evolution` section (named by its file), before any output folder is checked. */
export function requireEvolutionSection(prepared: PreparedScenario, scenarioPath: string): void {
  if (!prepared.scenario.evolution) {
    throw new InputError(`evolution: ${scenarioPath} has no "evolution" section; add one with at least "duration" (and "ramps"), e.g. --set 'evolution={"duration": 10}'`);
  }
}

const stopped = (): never => {
  throw new EvolutionInterrupted();
};

export async function evolveScenario(prepared: PreparedScenario, options: EvolveOptions): Promise<EvolveArtifacts> {
  const clock = options.clock ?? (() => 0);
  const { resolved, scenario } = prepared;
  const t = scenario.temperature;
  if ((t.kT ?? 0) > 0 || (t.nanokelvin ?? 0) > 0 || (t.entropyPerAtom ?? 0) > 0) {
    throw new InputError(
      'temperature: evolve starts from the T = 0 ground state; a thermal start is not supported (the time-dependent Gutzwiller equations ' +
        'evolve a pure product state, and a thermal mixture of site states is not one). Remove the temperature section or set temperature.kT to 0',
    );
  }
  const plan = evolutionPlan(resolved, {
    ...(options.modulationFrequencies ? { modulationFrequencies: options.modulationFrequencies } : {}),
    ...(options.scenarioDirectory !== undefined ? { scenarioDirectory: options.scenarioDirectory } : {}),
  });
  const sites = resolved.geometry.siteCount;
  const need = evolveMemoryBytes(sites, scenario.truncation.nmax);
  if (options.memoryLimitBytes !== undefined && need > options.memoryLimitBytes) {
    throw new InputError(
      `lattice.shape: the evolution of ${sites} sites at nmax = ${scenario.truncation.nmax} needs about ${(need / 2 ** 30).toFixed(1)} GiB, ` +
        `more than the ${(options.memoryLimitBytes / 2 ** 30).toFixed(1)} GiB this machine can spare; use a smaller lattice or a lower truncation.nmax`,
    );
  }
  const warnings: EvolutionPlanWarning[] = [...plan.warnings];
  const shouldStop = options.shouldStop ?? (() => false);
  const solverObserver = (stage: 'start' | 'reference') => (p: RunProgress) => {
    options.observer?.({ stage, done: 0, total: 1, solver: p });
    return shouldStop() ? ('stop' as const) : undefined;
  };
  const threads = Math.max(1, options.threads);
  const staticThreads = sites >= PARALLEL_MIN_SITES ? threads : 1;
  const dynamicThreads = sites >= (options.parallelMinSites ?? DYNAMICS_PARALLEL_MIN_SITES) ? Math.min(threads, sites) : 1;
  let sweepPool: SweepPool | null = null;
  let dynamicsPool: DynamicsPool | null = null;
  const timings = { startSeconds: 0, referenceSeconds: 0, evolveSeconds: 0, spectrumSeconds: 0 };
  try {
    if (staticThreads > 1) sweepPool = createSweepPool({ workers: staticThreads - 1, ...(options.sweepWorkerModule ?? {}) });
    // Both static solves (the start and the reference at the end) on the same pool and
    // threads, each timed and ended by SIGINT the same way.
    const timedGroundState = async (stage: 'start' | 'reference', request: Pick<GroundRequest, 'model' | 'chemical' | 'automaticTruncation'>): Promise<StaticState> => {
      const t0 = clock();
      const solved = await groundState({ resolved, ...request, pool: sweepPool, threads: staticThreads, observer: solverObserver(stage) });
      timings[`${stage}Seconds`] = (clock() - t0) / 1000;
      if (solved.outcome.stopped) stopped();
      return solved;
    };
    // --- the start
    const start = await timedGroundState('start', {
      model: resolved.model,
      chemical: resolved.chemical.kind === 'mu' ? { kind: 'mu', mu: resolved.chemical.mu } : { kind: 'atoms', atoms: resolved.chemical.atoms, relativeTolerance: Math.min(1e-10, resolved.chemical.relativeTolerance) },
      automaticTruncation: true,
    });
    const model = start.outcome.model;
    const mu = start.outcome.solve.mu;
    const atoms = start.outcome.solve.totals.atoms;
    if (!start.outcome.converged) warnings.push({ code: 'start-not-converged', message: 'the initial ground state did not converge: the start is not stationary and the evolution inherits its error' });
    if (!start.outcome.truncation.ok) warnings.push({ code: 'truncation-weight', message: `the initial ground state has weight ${start.outcome.truncation.maxTopWeight.toExponential(2)} on |nmax = ${model.nmax}>; raise truncation.nmax` });
    if (start.amplitudes.maxOrderResidual > 1e-8) {
      warnings.push({ code: 'start-not-stationary', message: `the start reproduces its order parameter only to ${start.amplitudes.maxOrderResidual.toExponential(2)}: it moves by itself at that level` });
    }

    // --- frame, drive, the Hamiltonian at the end and its ground state
    const baseFrame = frameFromModel(model, { mu, rate: plan.rate });
    const frame: DynamicsFrame = dynamicThreads > 1 ? shareFrame(baseFrame) : baseFrame;
    const scenario0 = scenarioDrive(frame, resolved.geometry, plan.targets);
    const endFrame = copyFrame(frame);
    scenario0.apply(plan.duration, endFrame, false);
    const reference = await timedGroundState('reference', {
      model: modelOfFrame(endFrame, model),
      chemical: { kind: 'atoms', atoms, relativeTolerance: 1e-10 },
      automaticTruncation: false,
    });
    if (!reference.outcome.converged) {
      warnings.push({
        code: 'reference-not-converged',
        message: 'the ground state at the final parameters (the reference of the verdict) did not converge at the atom number of the start; the verdict is doubtful',
      });
    }
    if (scenario0.envelopeApproximation && !warnings.some((w) => w.code === 'envelope-approximation')) {
      warnings.push({ code: 'envelope-approximation', message: 'per-site J and U are rescaled by the central-depth ratio during the depth ramp' });
    }
    const shellFilling = reference.classification.mottFilling;

    // --- the evolution
    if (dynamicThreads > 1) dynamicsPool = await createDynamicsPool({ workers: dynamicThreads - 1, ...(options.dynamicsWorkerModule ?? {}) });
    const inner: DynamicsRunner = dynamicsPool ? createParallelRunner(frame, dynamicsPool) : createSerialRunner(frame);
    // the latest time the integrator set the Hamiltonian to: progress between output times
    let reached = 0;
    const drive: Drive = {
      breakpoints: scenario0.breakpoints,
      envelopeApproximation: scenario0.envelopeApproximation,
      apply(time, f, leftLimit) {
        reached = time;
        scenario0.apply(time, f, leftLimit);
      },
    };
    const runner = interruptibleRunner(inner, {
      shouldStop,
      ...(options.pause ? { pause: options.pause } : {}),
      every: 64,
      onTick: () => options.observer?.({ stage: 'evolve', done: reached, total: plan.duration }),
    });
    const state: GutzwillerState = copyState(start.amplitudes.state);
    const camera = evolveCamera(resolved);
    const label = (time: number): string => `t = ${Number(time.toPrecision(6))} ${plan.timeUnit}`;
    const recorder = createEvolveRecorder({ resolved, camera, shellFilling, snapshotTimes: plan.snapshotTimes, frameTimes: plan.frameTimes, label });
    let c0 = clock();
    const result = await evolve({
      state,
      frame,
      drive,
      runner,
      outputTimes: plan.outputTimes,
      integrator: plan.integrator,
      onOutput: (context) => recorder.record(context),
      observer: (p) => {
        options.observer?.({ stage: 'evolve', done: p.time, total: p.endTime, detail: `${p.statistics.steps} steps` });
        return shouldStop() ? 'stop' : undefined;
      },
    });
    timings.evolveSeconds = (clock() - c0) / 1000;
    if (result.status === 'stopped') stopped();
    const failed = result.status === 'failed';
    if (failed) warnings.push({ code: 'integrator-failed', message: `the integrator stopped at t = ${result.time} ${plan.timeUnit}: ${result.message}; the rows up to there are written` });
    warnings.push(...seriesWarnings(recorder.series, plan, scenario.truncation.topWeightMax, result, maxNormError(state)));

    // --- verdict
    let verdict: EvolveVerdict | null = null;
    if (!failed) {
      const finalInteraction = frame.interactionScale * resolved.units.interaction;
      const core = adiabaticityVerdict({
        final: state,
        frame,
        ground: reference.amplitudes.state,
        shellFilling,
        energyScale: finalInteraction,
        excessEnergyThreshold: plan.settings.verdict.excessEnergyPerAtomU * finalInteraction,
      });
      const defectCriterion = core.shells.every((s) => s.excessDefectsPerSite <= plan.settings.verdict.excessDefectsPerSite);
      verdict = {
        ...core,
        adiabaticOverall: core.adiabatic && defectCriterion,
        energyCriterion: core.adiabatic,
        defectCriterion,
        excessEnergyThresholdU: plan.settings.verdict.excessEnergyPerAtomU,
        excessDefectsThreshold: plan.settings.verdict.excessDefectsPerSite,
        finalInteraction,
      };
      for (const w of core.warnings) warnings.push({ code: 'verdict', message: w });
    }

    // --- spectrum of the loaded cloud
    let spectrum: SpectrumResult | null = null;
    if (plan.spectrum && !failed) {
      const finalInteraction = frame.interactionScale * resolved.units.interaction;
      const duration = plan.spectrum.duration ?? (10 * 2 * Math.PI) / (plan.rate * finalInteraction);
      c0 = clock();
      spectrum = await runModulationScan({
        plan,
        start: state,
        frame,
        runner,
        geometry: resolved.geometry,
        atTime: plan.duration,
        duration,
        integrator: plan.integrator,
        shellFilling,
        onPoint: (k, n) => options.observer?.({ stage: 'spectrum', done: k, total: n }),
      });
      timings.spectrumSeconds = (clock() - c0) / 1000;
      const bad = spectrum.points.filter((p) => p.status !== 'done');
      if (bad.length > 0) warnings.push({ code: 'spectrum-point-failed', message: `${bad.length} spectrum point(s) did not finish: ${bad[0].message}` });
      if (spectrum.reference.status !== 'done') warnings.push({ code: 'spectrum-reference-failed', message: 'the unmodulated reference of the spectrum did not finish; doublons created are doubtful' });
    }
    return {
      prepared,
      plan,
      start,
      reference,
      series: recorder.series,
      snapshots: recorder.snapshots,
      frames: recorder.frames,
      verdict,
      spectrum,
      result,
      status: failed ? 'failed' : 'done',
      trustworthy: !failed && start.outcome.converged,
      warnings,
      threadsUsed: dynamicThreads,
      timings,
    };
  } finally {
    if (dynamicsPool) await dynamicsPool.destroy();
    if (sweepPool) await sweepPool.destroy();
  }
}

/** Warnings read off the recorded rows: atom-number and norm drift, truncation weight, rejections, energy drift. */
function seriesWarnings(s: EvolutionSeries, plan: EvolutionPlan, topWeightMax: number, result: EvolveResult, finalNormError: number): EvolutionPlanWarning[] {
  const out: EvolutionPlanWarning[] = [];
  if (s.time.length === 0) return out;
  const n0 = s.atoms[0];
  let atomDrift = 0;
  for (const n of s.atoms) atomDrift = Math.max(atomDrift, Math.abs(n - n0) / Math.max(n0, 1e-300));
  if (atomDrift > 1e-6) out.push({ code: 'atom-number-drift', message: `the atom number drifted by ${atomDrift.toExponential(2)} (relative); tighten evolution.integrator` });
  const norm = Math.max(finalNormError, ...s.maxNormError);
  if (norm > 1e-7) out.push({ code: 'norm-drift', message: `a site's norm drifted from 1 by ${norm.toExponential(2)}; tighten evolution.integrator (or use the norm-preserving splitting)` });
  let top = 0;
  let topTime = 0;
  s.maxTopWeight.forEach((w, k) => {
    if (w > top) {
      top = w;
      topTime = s.time[k];
    }
  });
  if (top > topWeightMax) {
    out.push({ code: 'truncation-weight', message: `weight ${top.toExponential(2)} on |nmax> at t = ${topTime} ${plan.timeUnit} (limit ${topWeightMax}): raise truncation.nmax` });
  }
  const st = result.statistics;
  if (st.rejectedSteps > 0.25 * Math.max(1, st.steps)) {
    out.push({ code: 'step-rejections', message: `${st.rejectedSteps} of ${st.steps + st.rejectedSteps} integrator steps were rejected: the drive changes fast against the tolerances (set integrator.maxStep)` });
  }
  const driven = plan.ramps.length > 0 || plan.modulation !== null;
  if (!driven && s.energy.length > 1) {
    const e0 = s.energy[0];
    let drift = 0;
    for (const e of s.energy) drift = Math.max(drift, Math.abs(e - e0));
    const scale = Math.max(Math.abs(e0), 1e-300);
    if (drift / scale > 1e-6) out.push({ code: 'energy-drift', message: `the energy of the undriven evolution drifted by ${(drift / scale).toExponential(2)} (relative); tighten evolution.integrator` });
  }
  return out;
}
