// Piecewise ramps of one scenario parameter: a list of [time, value] points joined by
// linear, exponential (geometric) or s-shaped segments. Before the first point the value
// is that of the first point and after the last that of the last, so a schedule whose first
// point sits at t = 0 with a value other than the static one is a sudden quench at t = 0
// (the evolution starts from the ground state of the static value). Two points at the
// same time make a jump; the value at that time is the later one (right-continuous).
//
// Segment shapes between (t_k, v_k) and (t_{k+1}, v_{k+1}), x = (t - t_k)/(t_{k+1} - t_k):
//   linear       v_k + (v_{k+1} - v_k) x
//   exponential  v_k (v_{k+1}/v_k)^x (geometric: constant relative rate; J follows this
//                shape closely when the lattice depth is ramped linearly, since
//                ln J is close to linear in depth; needs both values of one sign, non-zero)
//   s-curve      v_k + (v_{k+1} - v_k) x^2 (3 - 2x) (cubic Hermite smoothstep: zero slope at
//                both ends, so the ramp starts and stops without a kink)

import { ParameterError } from '../physics/parameterError.js';
import type { TimeFunction } from './timeFunction.js';

export type RampShape = 'linear' | 'exponential' | 's-curve';

export interface RampInput {
  /** scenario path of the parameter this ramp drives (kept for messages and outputs) */
  path: string;
  /** [time, value] pairs, times non-decreasing */
  points: ReadonlyArray<readonly [number, number]>;
  shape?: RampShape;
}

export interface RampSchedule extends TimeFunction {
  readonly path: string;
  readonly shape: RampShape;
  readonly times: Float64Array;
  readonly values: Float64Array;
}

export function rampSchedule(input: RampInput): RampSchedule {
  const field = `ramp ${input.path}`;
  const shape = input.shape ?? 'linear';
  if (shape !== 'linear' && shape !== 'exponential' && shape !== 's-curve') {
    throw new ParameterError(`${field}.shape`, `expected 'linear', 'exponential' or 's-curve', got '${String(shape)}'`);
  }
  const count = input.points.length;
  if (count < 1) throw new ParameterError(`${field}.points`, 'give at least one [time, value] point');
  const times = new Float64Array(count);
  const values = new Float64Array(count);
  for (let k = 0; k < count; k++) {
    const p = input.points[k];
    if (!Array.isArray(p) || p.length !== 2 || !Number.isFinite(p[0]) || !Number.isFinite(p[1])) {
      throw new ParameterError(`${field}.points[${k}]`, `expected [time, value] with two finite numbers, got ${JSON.stringify(p)}`);
    }
    if (k > 0 && p[0] < times[k - 1]) {
      throw new ParameterError(`${field}.points[${k}]`, `times must not decrease: ${p[0]} comes after ${times[k - 1]}`);
    }
    times[k] = p[0];
    values[k] = p[1];
  }
  if (count >= 3) {
    for (let k = 2; k < count; k++) {
      if (times[k] === times[k - 2]) {
        throw new ParameterError(`${field}.points[${k}]`, `at most two points may share the time ${times[k]} (one jump)`);
      }
    }
  }
  if (shape === 'exponential') {
    for (let k = 0; k + 1 < count; k++) {
      if (times[k + 1] > times[k] && !(values[k] * values[k + 1] > 0)) {
        throw new ParameterError(
          `${field}.points[${k}]`,
          `an exponential segment needs two non-zero values of one sign, got ${values[k]} and ${values[k + 1]}; use 'linear' or 's-curve'`,
        );
      }
    }
  }
  const breakpoints: number[] = [];
  for (let k = 0; k < count; k++) if (k === 0 || times[k] !== times[k - 1]) breakpoints.push(times[k]);

  const valueAt = (time: number, leftLimit = false): number => {
    if (leftLimit ? time <= times[0] : time < times[0]) return values[0];
    if (leftLimit ? time > times[count - 1] : time >= times[count - 1]) return values[count - 1];
    // Segment k with t_k <= time < t_{k+1} (right limit) or t_k < time <= t_{k+1} (left).
    let lo = 0;
    let hi = count - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (leftLimit ? times[mid] < time : times[mid] <= time) lo = mid;
      else hi = mid;
    }
    const t0 = times[lo];
    const t1 = times[hi];
    const v0 = values[lo];
    const v1 = values[hi];
    if (t1 === t0) return leftLimit ? v0 : v1;
    const x = (time - t0) / (t1 - t0);
    if (shape === 'linear') return v0 + (v1 - v0) * x;
    if (shape === 'exponential') return v0 * Math.exp(x * Math.log(v1 / v0));
    return v0 + (v1 - v0) * x * x * (3 - 2 * x);
  };
  return { path: input.path, shape, times, values, breakpoints, valueAt };
}

/**
 * True when the schedule changes the parameter suddenly at `startTime`: its value there
 * differs from the static value the initial ground state was computed with (relative
 * tolerance 1e-12).
 */
export function isQuenchAtStart(schedule: TimeFunction, staticValue: number, startTime = 0): boolean {
  const v = schedule.valueAt(startTime);
  return Math.abs(v - staticValue) > 1e-12 * Math.max(Math.abs(v), Math.abs(staticValue));
}
