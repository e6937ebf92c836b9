// The passes of the time-dependent Gutzwiller integrators over the whole lattice. Each
// method is one unit of parallel work: a worker-thread runner splits [0, siteCount) into
// ranges, runs the same range kernels on SharedArrayBuffer views, and combines maxima; the
// integrators only ever call this interface, so they stay unchanged. The calls are
// asynchronous for that reason; this serial runner resolves them at once.
//
// Barrier points: `derivative` needs phi of every site before any mean field, so a
// parallel runner does pass 1 on all ranges, waits, then passes 2+3. `propagateColour`
// likewise: phi everywhere, wait, then mean field and exponential for one colour.

import type { DynamicsFrame } from './dynamicsFrame.js';
import { hamiltonianActionRange, meanFieldRange, orderParameterRange } from './equationsOfMotion.js';
import { sharedFloat64 } from './gutzwillerState.js';
import { combineRange, errorNormRange, scaledMaxRange } from './rungeKuttaKernels.js';
import { createExponentialWorkspace, propagateColourRange } from './siteExponential.js';

/**
 * phi_i and Psi_i of every site, on shared memory so that the worker threads of a parallel
 * runner write their ranges in place and the integrators read them without a copy.
 */
export interface MeanFieldArrays {
  readonly phiRe: Float64Array;
  readonly phiIm: Float64Array;
  readonly psiRe: Float64Array;
  readonly psiIm: Float64Array;
}

/** Zeroed mean-field arrays for siteCount sites, on SharedArrayBuffers. */
export function createMeanFieldArrays(siteCount: number): MeanFieldArrays {
  return { phiRe: sharedFloat64(siteCount), phiIm: sharedFloat64(siteCount), psiRe: sharedFloat64(siteCount), psiIm: sharedFloat64(siteCount) };
}

/**
 * The arguments of a range kernel of rungeKuttaKernels.ts without its trailing component
 * range [start, end): a runner applies the kernel to every component, split as it likes, so
 * the pass takes exactly what the kernel takes, declared once there.
 */
type OverAllComponents<F> = F extends (...args: [...infer Inputs, start: number, end: number]) => unknown ? Inputs : never;

/** The passes; phiRe .. psiIm hold phi_i and Psi_i of the last pass. */
export interface DynamicsRunner extends MeanFieldArrays {
  /** compute threads in use, the calling thread included */
  readonly threads: number;
  /** the Hamiltonian the passes read; drives write it between passes */
  readonly frame: DynamicsFrame;
  /** out = dy/dt at the frame's parameters */
  derivative(y: Float64Array, out: Float64Array): Promise<void>;
  /** phi and Psi of every site (for observables) */
  meanFields(y: Float64Array): Promise<void>;
  /** out = y + h sum_j coefficients[j] stages[j], j < count (combineRange over every component) */
  combine(...args: OverAllComponents<typeof combineRange>): Promise<void>;
  /** scaled maximum norm of the embedded error estimate (errorNormRange over every component) */
  errorNorm(...args: OverAllComponents<typeof errorNormRange>): Promise<number>;
  /** max |v| / (atol + rtol |y|) (scaledMaxRange over every component) */
  scaledMax(...args: OverAllComponents<typeof scaledMaxRange>): Promise<number>;
  /** sites of one colour: c_i <- exp(-i rate H_i tau) c_i with the other colour frozen */
  propagateColour(y: Float64Array, colour: number, tau: number): Promise<void>;
}

/** Everything on the calling thread. */
export function createSerialRunner(frame: DynamicsFrame): DynamicsRunner {
  const n = frame.siteCount;
  const width = 2 * frame.states;
  const fields = createMeanFieldArrays(n);
  const { phiRe, phiIm, psiRe, psiIm } = fields;
  const work = createExponentialWorkspace(frame.nmax);
  const components = n * width;
  return {
    threads: 1,
    frame,
    ...fields,
    async derivative(y, out) {
      orderParameterRange(y, frame.states, frame.sqrtN, phiRe, phiIm, 0, n);
      meanFieldRange(frame, phiRe, phiIm, psiRe, psiIm, -1, 0, n);
      hamiltonianActionRange(frame, y, psiRe, psiIm, out, 0, n);
    },
    async meanFields(y) {
      orderParameterRange(y, frame.states, frame.sqrtN, phiRe, phiIm, 0, n);
      meanFieldRange(frame, phiRe, phiIm, psiRe, psiIm, -1, 0, n);
    },
    async combine(out, y, h, coefficients, stages, count) {
      combineRange(out, y, h, coefficients, stages, count, 0, components);
    },
    async errorNorm(y0, y1, h, errorWeights, stages, count, atol, rtol) {
      return errorNormRange(y0, y1, h, errorWeights, stages, count, atol, rtol, 0, components);
    },
    async scaledMax(v, y, atol, rtol) {
      return scaledMaxRange(v, y, atol, rtol, 0, components);
    },
    async propagateColour(y, colour, tau) {
      orderParameterRange(y, frame.states, frame.sqrtN, phiRe, phiIm, 0, n);
      meanFieldRange(frame, phiRe, phiIm, psiRe, psiIm, colour, 0, n);
      propagateColourRange(frame, y, psiRe, psiIm, colour, tau, work, 0, n);
    },
  };
}
