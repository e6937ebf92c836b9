// Adaptive embedded Runge-Kutta integration of the time-dependent Gutzwiller equations with
// the Dormand-Prince 5(4) pair (Dormand & Prince, J. Comput. Appl. Math. 6, 19 (1980);
// tableau and step-size control as in Hairer, Norsett & Wanner, Solving Ordinary
// Differential Equations I, 2nd ed. (1993), section II.4 and their code DOPRI5: PI control
// with beta = 0.04, safety 0.9, step ratio in [0.2, 10], first step by their heuristic).
// The local error is the maximum over all components (atol + rtol |y| scaled), so the
// accepted steps, and hence the results, are the same for any split of the sites among
// threads. The fifth-order solution is propagated (local extrapolation) and the last stage
// is reused as the first of the next step (FSAL).
//
// Outputs land exactly on the requested times by shortening the step that would pass one
// (no interpolation error); after such a shortened step the previous step size is
// restored. A step never crosses a breakpoint of the drive; the stages of a step that ends
// on a jump use the left limit, and the first stage after it the right limit.

import type { Drive } from './drive.js';
import type { DynamicsRunner } from './dynamicsRunner.js';
import { sharedFloat64, type GutzwillerState } from './gutzwillerState.js';
import { emptyStatistics, recordStep, type AdvanceStatus, type Stepper } from './stepper.js';

export interface AdaptiveRungeKuttaOptions {
  kind: 'dormand-prince';
  /** default 1e-10 (amplitudes are <= 1) */
  absoluteTolerance?: number;
  /** default 1e-10 */
  relativeTolerance?: number;
  /** first step; default from the Hairer-Norsett-Wanner heuristic */
  initialStep?: number;
  maxStep?: number;
  /** accepted + rejected steps allowed over the stepper's life; default 1e8 */
  maxSteps?: number;
}

const C = [0, 1 / 5, 3 / 10, 4 / 5, 8 / 9, 1, 1];
const A: Float64Array[] = [
  Float64Array.of(),
  Float64Array.of(1 / 5),
  Float64Array.of(3 / 40, 9 / 40),
  Float64Array.of(44 / 45, -56 / 15, 32 / 9),
  Float64Array.of(19372 / 6561, -25360 / 2187, 64448 / 6561, -212 / 729),
  Float64Array.of(9017 / 3168, -355 / 33, 46732 / 5247, 49 / 176, -5103 / 18656),
  // fifth-order weights b (the input of the FSAL stage)
  Float64Array.of(35 / 384, 0, 500 / 1113, 125 / 192, -2187 / 6784, 11 / 84),
];
/** b - b^* (fifth minus fourth order weights) */
const E = Float64Array.of(71 / 57600, 0, -71 / 16695, 71 / 1920, -17253 / 339200, 22 / 525, -1 / 40);
const MINUS_ONE = Float64Array.of(-1);

const BETA = 0.04;
const EXPONENT = 0.2 - 0.75 * BETA;
const SAFETY = 0.9;
const FAC_MIN = 0.2;
const FAC_MAX = 10;

export function createDormandPrince(state: GutzwillerState, runner: DynamicsRunner, drive: Drive | null, options: AdaptiveRungeKuttaOptions): Stepper {
  const atol = options.absoluteTolerance ?? 1e-10;
  const rtol = options.relativeTolerance ?? 1e-10;
  if (!(atol > 0) || !(rtol >= 0)) throw new RangeError(`tolerances: expected absoluteTolerance > 0 and relativeTolerance >= 0, got ${atol}, ${rtol}`);
  const maxStep = options.maxStep ?? Infinity;
  const maxSteps = options.maxSteps ?? 1e8;
  const y = state.amplitudes;
  const len = y.length;
  const k: Float64Array[] = Array.from({ length: 7 }, () => sharedFloat64(len));
  const ytmp = sharedFloat64(len);
  const ynew = sharedFloat64(len);
  const frame = runner.frame;
  const statistics = emptyStatistics();
  let fsal = false;
  let h = options.initialStep ?? NaN;
  let facOld = 1e-4;
  let lastRejected = false;

  const setFrame = (time: number, left: boolean): void => {
    if (drive) drive.apply(time, frame, left);
  };
  const evaluate = async (time: number, left: boolean, input: Float64Array, out: Float64Array): Promise<void> => {
    setFrame(time, left);
    await runner.derivative(input, out);
    statistics.evaluations++;
  };

  /** Hairer, Norsett & Wanner (1993), section II.4, "starting step size". */
  const startingStep = async (t: number, span: number): Promise<number> => {
    const d0 = await runner.scaledMax(y, y, atol, rtol);
    const d1 = await runner.scaledMax(k[0], y, atol, rtol);
    let h0 = d0 < 1e-5 || d1 < 1e-5 ? 1e-6 * span : (0.01 * d0) / d1;
    h0 = Math.min(h0, maxStep, span);
    await runner.combine(ytmp, y, h0, Float64Array.of(1), [k[0]], 1);
    await evaluate(t + h0, false, ytmp, k[1]);
    await runner.combine(ynew, k[1], 1, MINUS_ONE, [k[0]], 1);
    const d2 = (await runner.scaledMax(ynew, y, atol, rtol)) / h0;
    const dm = Math.max(d1, d2);
    const h1 = dm <= 1e-15 ? Math.max(1e-6 * span, h0 * 1e-3) : Math.pow(0.01 / dm, 0.2);
    return Math.min(100 * h0, h1, maxStep);
  };

  return {
    statistics,
    invalidate() {
      fsal = false;
    },
    async advance(t0, t1, endIsBreakpoint): Promise<AdvanceStatus> {
      let t = t0;
      while (t < t1) {
        if (!fsal) {
          await evaluate(t, false, y, k[0]);
          fsal = true;
        }
        if (!(h > 0)) h = await startingStep(t, t1 - t);
        let step = Math.min(h, maxStep);
        let clipped = false;
        if (t + 1.05 * step >= t1) {
          step = t1 - t;
          clipped = true;
        }
        if (statistics.steps + statistics.rejectedSteps >= maxSteps) {
          return { ok: false, reason: 'step-limit', message: `more than ${maxSteps} steps; raise maxSteps or loosen the tolerances` };
        }
        if (!(step > 1e-14 * Math.max(1, Math.abs(t)))) {
          return { ok: false, reason: 'step-underflow', message: `step size ${step} underflows at t = ${t}; the equations are too stiff for the tolerances` };
        }
        const leftAtEnd = clipped && endIsBreakpoint;
        for (let s = 1; s < 7; s++) {
          const target = s === 6 ? ynew : ytmp;
          await runner.combine(target, y, step, A[s], k, s);
          const time = C[s] === 1 ? (clipped ? t1 : t + step) : t + C[s] * step;
          await evaluate(time, C[s] === 1 && leftAtEnd, target, k[s]);
        }
        const err = await runner.errorNorm(y, ynew, step, E, k, 7, atol, rtol);
        if (!(err === err)) {
          return { ok: false, reason: 'not-finite', message: `the state became non-finite at t = ${t} (step ${step})` };
        }
        const fac11 = Math.pow(err, EXPONENT);
        if (err <= 1) {
          let fac = fac11 / Math.pow(facOld, BETA);
          fac = Math.max(1 / FAC_MAX, Math.min(1 / FAC_MIN, fac / SAFETY));
          let hNew = step / fac;
          if (lastRejected) hNew = Math.min(hNew, step);
          facOld = Math.max(err, 1e-4);
          lastRejected = false;
          y.set(ynew);
          const first = k[0];
          k[0] = k[6];
          k[6] = first;
          recordStep(statistics, step);
          if (clipped) {
            t = t1;
            // a shortened last step says little about the natural step size
            h = Math.max(hNew, h);
            // the FSAL stage used the left limit at a jump: recompute after it
            if (endIsBreakpoint) fsal = false;
          } else {
            t += step;
            h = hNew;
          }
        } else {
          h = step / Math.min(1 / FAC_MIN, fac11 / SAFETY);
          lastRejected = true;
          statistics.rejectedSteps++;
        }
      }
      return { ok: true };
    },
  };
}
