// Amplitude modulation of the lattice depth, the probe of Stoferle et al., PRL 92, 130403
// (2004): depth(t) = V0 (1 + A sin(2 pi f (t - t_on))) while the modulation is on
// (t_on <= t <= t_off) and V0 otherwise. f is in cycles per time unit of the evolution: in
// laboratory mode (times in ms) give f in kHz, i.e. f_Hz / 1000.

import { ParameterError } from '../physics/parameterError.js';
import type { TimeFunction } from './timeFunction.js';

export interface ModulationInput {
  /** V0, the unmodulated value (e.g. lattice depth in E_r) */
  baseValue: number;
  /** relative amplitude A (0 <= A < 1) */
  relativeAmplitude: number;
  /** cycles per time unit of the evolution */
  frequency: number;
  /** modulation switched on at this time (default 0) */
  startTime?: number;
  /** and off at this time (default: never) */
  endTime?: number;
}

export function latticeModulation(input: ModulationInput): TimeFunction {
  const { baseValue, relativeAmplitude, frequency } = input;
  const start = input.startTime ?? 0;
  const end = input.endTime ?? Infinity;
  if (!Number.isFinite(baseValue)) throw new ParameterError('modulation.baseValue', `expected a finite number, got ${baseValue}`);
  if (!(relativeAmplitude >= 0 && relativeAmplitude < 1)) {
    throw new ParameterError('modulation.relativeAmplitude', `expected 0 <= A < 1 (depth stays positive), got ${relativeAmplitude}`);
  }
  if (!(frequency > 0 && Number.isFinite(frequency))) {
    throw new ParameterError('modulation.frequency', `expected a positive frequency in cycles per time unit, got ${frequency}`);
  }
  if (!(end > start)) throw new ParameterError('modulation.endTime', `expected endTime > startTime (${start}), got ${end}`);
  const omega = 2 * Math.PI * frequency;
  const breakpoints = Number.isFinite(end) ? [start, end] : [start];
  return {
    breakpoints,
    valueAt(time: number, leftLimit = false): number {
      // continuous: the sine vanishes at t_on; at t_off it may not, hence the left limit
      if (time < start || time > end || (time === end && !leftLimit)) return baseValue;
      return baseValue * (1 + relativeAmplitude * Math.sin(omega * (time - start)));
    },
  };
}
