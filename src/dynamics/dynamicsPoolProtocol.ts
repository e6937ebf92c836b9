// The shared-memory protocol between the parallel dynamics runner (parallelRunner.ts) and
// its persistent worker threads (dynamicsWorker.ts). One Int32Array of control words and
// one Float64Array of parameters live on SharedArrayBuffers mapped by every thread:
//
//   control[GENERATION]  bumped by the calling thread to start a pass (Atomics.notify)
//   control[DONE]        workers that finished the pass (Atomics.add + notify)
//   control[FAILED]      set by a worker whose pass threw (its message follows on its port)
//   control[OP ...]      the pass: operation, colour, stage count, array ids
//   parameters[...]      step size, tolerances, Runge-Kutta coefficients, frame scalars
//   results[w]           the maximum a reduction pass found on worker w's range
//
// Arrays (the state, the Runge-Kutta stages, phi and Psi, the frame's arrays) are sent once
// per worker as SharedArrayBuffers over a MessagePort and named by a small integer id
// afterwards; a worker reads pending messages synchronously (receiveMessageOnPort) at the
// start of every pass, so the port never needs the worker's event loop. Every pass is a
// per-site or per-component kernel of equationsOfMotion.ts, rungeKuttaKernels.ts or
// siteExponential.ts on the worker's own range, and reductions are maxima: the results do
// not depend on the split (bit-identical for any thread count).

import type { MessagePort } from 'node:worker_threads';

export const Control = {
  GENERATION: 0,
  DONE: 1,
  FAILED: 2,
  OP: 3,
  COLOUR: 4,
  COUNT: 5,
  /** array ids: out, y, y1, then up to 7 stages */
  OUT: 6,
  Y: 7,
  Y1: 8,
  STAGES: 9,
  /** words in the control block */
  SIZE: 16,
} as const;

export const Parameter = {
  H: 0,
  TAU: 1,
  ATOL: 2,
  RTOL: 3,
  /** 7 coefficients */
  COEFFICIENTS: 4,
  INTERACTION_U: 11,
  INTERACTION_SCALE: 12,
  MU: 13,
  RATE: 14,
  SIZE: 16,
} as const;

export const Op = {
  /** phi on the range (from y) */
  ORDER_PARAMETER: 1,
  /** Psi (all sites of the range) and dc/dt into out */
  HAMILTONIAN_ACTION: 2,
  /** Psi only */
  MEAN_FIELD: 3,
  COMBINE: 4,
  ERROR_NORM: 5,
  SCALED_MAX: 6,
  /** Psi of one colour and the exact one-colour propagation */
  PROPAGATE_COLOUR: 7,
  EXIT: 99,
} as const;

/** Fixed ids of the runner's own arrays; others are numbered from FIRST_FREE_ID. */
export const ArrayId = {
  PHI_RE: 0,
  PHI_IM: 1,
  PSI_RE: 2,
  PSI_IM: 3,
  FIRST_FREE: 16,
} as const;

/** The static layout of a frame as a worker rebuilds it (arrays on SharedArrayBuffers). */
export interface FrameLayoutMessage {
  type: 'bind';
  runnerId: number;
  dims: number;
  inner: [number, number, number];
  innerPeriodic: [boolean, boolean, boolean];
  nmax: number;
  siteCount: number;
  hopArrays: [Float64Array | null, Float64Array | null, Float64Array | null];
  hopUniform: Float64Array;
  hopScale: Float64Array;
  interactionArray: Float64Array | null;
  eps: Float64Array;
  sqrtN: Float64Array;
  phiRe: Float64Array;
  phiIm: Float64Array;
  psiRe: Float64Array;
  psiIm: Float64Array;
  /** this worker's sites */
  siteStart: number;
  siteEnd: number;
}

export interface ArrayMessage {
  type: 'array';
  id: number;
  array: Float64Array;
}

export type WorkerInbound = FrameLayoutMessage | ArrayMessage;

export interface WorkerStart {
  control: Int32Array;
  parameters: Float64Array;
  results: Float64Array;
  index: number;
  port: MessagePort;
}
