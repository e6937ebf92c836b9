// Worker thread of the parallel dynamics runner (parallelRunner.ts; protocol in
// dynamicsPoolProtocol.ts). It sleeps in Atomics.wait on the generation word, runs the
// requested pass of the Gutzwiller kernels on its own range of sites over shared memory,
// adds itself to the done count and sleeps again. Messages (arrays, frame layout) are read
// synchronously from its port at the start of every pass; errors are caught, sent back on
// the port and flagged, so the calling thread never waits for a worker that failed.

import { parentPort, receiveMessageOnPort, workerData } from 'node:worker_threads';
import type { DynamicsFrame } from './dynamicsFrame.js';
import { hamiltonianActionRange, meanFieldRange, orderParameterRange } from './equationsOfMotion.js';
import { combineRange, errorNormRange, scaledMaxRange } from './rungeKuttaKernels.js';
import { createExponentialWorkspace, propagateColourRange, type ExponentialWorkspace } from './siteExponential.js';
import { ArrayId, Control, Op, Parameter, type FrameLayoutMessage, type WorkerInbound, type WorkerStart } from './dynamicsPoolProtocol.js';

const start = workerData as WorkerStart;
const { control, parameters, results, index, port } = start;
const arrays: Float64Array[] = [];
let frame: DynamicsFrame | null = null;
let layout: FrameLayoutMessage | null = null;
let work: ExponentialWorkspace | null = null;
const coefficients = new Float64Array(7);
const stages: Float64Array[] = [];

function drainMessages(): void {
  for (;;) {
    const received = receiveMessageOnPort(port);
    if (received === undefined) return;
    const message = received.message as WorkerInbound;
    if (message.type === 'array') {
      arrays[message.id] = message.array;
    } else {
      layout = message;
      arrays[ArrayId.PHI_RE] = message.phiRe;
      arrays[ArrayId.PHI_IM] = message.phiIm;
      arrays[ArrayId.PSI_RE] = message.psiRe;
      arrays[ArrayId.PSI_IM] = message.psiIm;
      const states = message.nmax + 1;
      frame = {
        dims: message.dims,
        inner: message.inner,
        innerPeriodic: message.innerPeriodic,
        nmax: message.nmax,
        states,
        siteCount: message.siteCount,
        hopArrays: message.hopArrays,
        hopUniform: message.hopUniform,
        hopScale: message.hopScale,
        interactionArray: message.interactionArray,
        interactionU: NaN,
        interactionScale: 1,
        eps: message.eps,
        mu: 0,
        rate: 1,
        sqrtN: message.sqrtN,
      };
      if (work === null || work.site.nmax !== message.nmax) work = createExponentialWorkspace(message.nmax);
    }
  }
}

function array(slot: number): Float64Array {
  const a = arrays[control[slot]];
  if (a === undefined) throw new Error(`dynamics worker ${index}: array ${control[slot]} was never sent`);
  return a;
}

/** One pass on this worker's range; returns the range's maximum for reductions (else 0). */
function runPass(op: number): number {
  if (frame === null || layout === null) throw new Error(`dynamics worker ${index}: no frame bound`);
  const f = frame;
  f.interactionU = parameters[Parameter.INTERACTION_U];
  f.interactionScale = parameters[Parameter.INTERACTION_SCALE];
  f.mu = parameters[Parameter.MU];
  f.rate = parameters[Parameter.RATE];
  const s0 = layout.siteStart;
  const s1 = layout.siteEnd;
  const width = 2 * f.states;
  const phiRe = arrays[ArrayId.PHI_RE];
  const phiIm = arrays[ArrayId.PHI_IM];
  const psiRe = arrays[ArrayId.PSI_RE];
  const psiIm = arrays[ArrayId.PSI_IM];
  const count = control[Control.COUNT];
  const gatherStages = (): void => {
    stages.length = 0;
    for (let j = 0; j < count; j++) stages.push(array(Control.STAGES + j));
    for (let j = 0; j < 7; j++) coefficients[j] = parameters[Parameter.COEFFICIENTS + j];
  };
  switch (op) {
    case Op.ORDER_PARAMETER:
      orderParameterRange(array(Control.Y), f.states, f.sqrtN, phiRe, phiIm, s0, s1);
      return 0;
    case Op.HAMILTONIAN_ACTION:
      meanFieldRange(f, phiRe, phiIm, psiRe, psiIm, -1, s0, s1);
      hamiltonianActionRange(f, array(Control.Y), psiRe, psiIm, array(Control.OUT), s0, s1);
      return 0;
    case Op.MEAN_FIELD:
      meanFieldRange(f, phiRe, phiIm, psiRe, psiIm, -1, s0, s1);
      return 0;
    case Op.COMBINE:
      gatherStages();
      combineRange(array(Control.OUT), array(Control.Y), parameters[Parameter.H], coefficients, stages, count, s0 * width, s1 * width);
      return 0;
    case Op.ERROR_NORM:
      gatherStages();
      return errorNormRange(
        array(Control.Y),
        array(Control.Y1),
        parameters[Parameter.H],
        coefficients,
        stages,
        count,
        parameters[Parameter.ATOL],
        parameters[Parameter.RTOL],
        s0 * width,
        s1 * width,
      );
    case Op.SCALED_MAX:
      return scaledMaxRange(array(Control.OUT), array(Control.Y), parameters[Parameter.ATOL], parameters[Parameter.RTOL], s0 * width, s1 * width);
    case Op.PROPAGATE_COLOUR: {
      const colour = control[Control.COLOUR];
      meanFieldRange(f, phiRe, phiIm, psiRe, psiIm, colour, s0, s1);
      propagateColourRange(f, array(Control.Y), psiRe, psiIm, colour, parameters[Parameter.TAU], work as ExponentialWorkspace, s0, s1);
      return 0;
    }
    default:
      throw new Error(`dynamics worker ${index}: unknown operation ${op}`);
  }
}

let seen = Atomics.load(control, Control.GENERATION);
// 'ready' on the parent port (an event for the pool's start-up); the private port carries only
// synchronous traffic, read with receiveMessageOnPort on both sides.
parentPort?.postMessage({ type: 'ready', index });
for (;;) {
  // Passes come back to back inside a step: a short spin catches the next one without a
  // sleep and wake-up; between steps and outputs the worker sleeps in Atomics.wait.
  for (let k = 0; k < 4000 && Atomics.load(control, Control.GENERATION) === seen; k++);
  Atomics.wait(control, Control.GENERATION, seen);
  const generation = Atomics.load(control, Control.GENERATION);
  if (generation === seen) continue;
  seen = generation;
  const op = control[Control.OP];
  if (op === Op.EXIT) break;
  try {
    drainMessages();
    results[index] = runPass(op);
  } catch (err) {
    results[index] = NaN;
    port.postMessage({ type: 'error', index, message: err instanceof Error ? err.message : String(err) });
    Atomics.store(control, Control.FAILED, 1);
  }
  Atomics.add(control, Control.DONE, 1);
  Atomics.notify(control, Control.DONE);
}
port.close();
