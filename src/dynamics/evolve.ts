// Time evolution of a Gutzwiller state from startTime through a list of output times, with
// either integrator (adaptive Dormand-Prince 5(4) or the red-black splitting). The interval is
// cut at every output time and every breakpoint of the drive; each piece is advanced
// exactly to its end. At every output time the frame holds the Hamiltonian of that time and
// `onOutput` is called (observables, snapshots); it may return 'stop'. Pure: no clock, no
// files; progress through `observer`.

import { createDormandPrince, type AdaptiveRungeKuttaOptions } from './dormandPrince.js';
import type { Drive } from './drive.js';
import type { DynamicsFrame } from './dynamicsFrame.js';
import { createSerialRunner, type DynamicsRunner } from './dynamicsRunner.js';
import type { GutzwillerState } from './gutzwillerState.js';
import { createRedBlackSplitting, type SplittingOptions } from './redBlackSplitting.js';
import type { StepStatistics, Stepper } from './stepper.js';

export type IntegratorOptions = AdaptiveRungeKuttaOptions | SplittingOptions;

export interface OutputContext {
  time: number;
  /** index into outputTimes */
  index: number;
  state: GutzwillerState;
  /** the Hamiltonian at `time` */
  frame: DynamicsFrame;
  statistics: Readonly<StepStatistics>;
}

export interface EvolveProgress {
  time: number;
  endTime: number;
  statistics: Readonly<StepStatistics>;
}

export interface EvolveRequest {
  /** evolved in place */
  state: GutzwillerState;
  /** the Hamiltonian (its base values); the drive writes its scales */
  frame: DynamicsFrame;
  drive?: Drive | null;
  /** default 0 */
  startTime?: number;
  /** ascending, >= startTime (an output at startTime records the initial state) */
  outputTimes: readonly number[];
  integrator: IntegratorOptions;
  /** default: a serial runner on `frame` */
  runner?: DynamicsRunner;
  onOutput?: (context: OutputContext) => void | 'stop';
  observer?: (progress: EvolveProgress) => void | 'stop';
}

export interface EvolveResult {
  status: 'done' | 'stopped' | 'failed';
  /** reason when failed or stopped */
  message: string;
  /** time the state has reached */
  time: number;
  outputsDone: number;
  statistics: StepStatistics;
}

export function createStepper(state: GutzwillerState, runner: DynamicsRunner, drive: Drive | null, integrator: IntegratorOptions): Stepper {
  if (integrator.kind === 'dormand-prince') return createDormandPrince(state, runner, drive, integrator);
  if (integrator.kind === 'splitting') return createRedBlackSplitting(state, runner, drive, integrator);
  throw new RangeError(`integrator.kind: expected 'dormand-prince' or 'splitting', got '${String((integrator as { kind: unknown }).kind)}'`);
}

export async function evolve(request: EvolveRequest): Promise<EvolveResult> {
  const { state, frame, outputTimes } = request;
  const drive = request.drive ?? null;
  const start = request.startTime ?? 0;
  if (state.siteCount !== frame.siteCount || state.nmax !== frame.nmax) {
    throw new RangeError(`state and frame disagree: ${state.siteCount} sites, nmax ${state.nmax} against ${frame.siteCount}, ${frame.nmax}`);
  }
  for (let k = 0; k < outputTimes.length; k++) {
    const t = outputTimes[k];
    if (!Number.isFinite(t) || t < start || (k > 0 && t < outputTimes[k - 1])) {
      throw new RangeError(`outputTimes[${k}]: expected ascending finite times >= startTime ${start}, got ${t}`);
    }
  }
  const runner = request.runner ?? createSerialRunner(frame);
  if (runner.frame !== frame) throw new RangeError('runner: it must run on the request frame');
  const stepper = createStepper(state, runner, drive, request.integrator);
  const end = outputTimes.length ? outputTimes[outputTimes.length - 1] : start;
  const breakpoints = (drive?.breakpoints ?? []).filter((b) => b > start && b < end);
  let t = start;
  let outputsDone = 0;
  let bp = 0;
  const result = (status: EvolveResult['status'], message: string): EvolveResult => ({
    status,
    message,
    time: t,
    outputsDone,
    statistics: { ...stepper.statistics },
  });
  while (outputsDone < outputTimes.length) {
    const nextOutput = outputTimes[outputsDone];
    while (bp < breakpoints.length && breakpoints[bp] <= t) bp++;
    const nextBreak = bp < breakpoints.length ? breakpoints[bp] : Infinity;
    const target = Math.min(nextOutput, nextBreak);
    if (target > t) {
      const status = await stepper.advance(t, target, target === nextBreak);
      if (!status.ok) return result('failed', status.message);
      t = target;
      if (request.observer?.({ time: t, endTime: end, statistics: stepper.statistics }) === 'stop') return result('stopped', 'stopped by the observer');
    }
    while (outputsDone < outputTimes.length && outputTimes[outputsDone] === t) {
      if (drive) drive.apply(t, frame, false);
      const answer = request.onOutput?.({ time: t, index: outputsDone, state, frame, statistics: stepper.statistics });
      outputsDone++;
      if (answer === 'stop') return result('stopped', 'stopped at an output');
    }
  }
  return result('done', '');
}
