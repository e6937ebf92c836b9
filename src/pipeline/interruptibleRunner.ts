// A DynamicsRunner wrapper that lets a long evolution be interrupted. The passes of the
// runners resolve without an event-loop turn, so a signal handler would never run during an
// evolve; every `every` calls this wrapper awaits `pause` (an event-loop turn supplied by
// the caller) and, when `shouldStop()` is true, throws EvolutionInterrupted, which the
// pipeline turns into a stopped run (nothing written). The passes themselves are unchanged.

import type { DynamicsRunner } from '../dynamics/dynamicsRunner.js';

export class EvolutionInterrupted extends Error {
  constructor() {
    super('the evolution was interrupted');
    this.name = 'EvolutionInterrupted';
  }
}

export interface InterruptOptions {
  shouldStop: () => boolean;
  pause?: () => Promise<void>;
  /** calls between checks (default 32) */
  every?: number;
  /** called at every check (progress between output times) */
  onTick?: () => void;
}

export function interruptibleRunner(inner: DynamicsRunner, options: InterruptOptions): DynamicsRunner {
  const every = options.every ?? 32;
  let calls = 0;
  const check = async (): Promise<void> => {
    if (++calls < every) return;
    calls = 0;
    options.onTick?.();
    if (options.pause) await options.pause();
    if (options.shouldStop()) throw new EvolutionInterrupted();
  };
  return {
    threads: inner.threads,
    frame: inner.frame,
    phiRe: inner.phiRe,
    phiIm: inner.phiIm,
    psiRe: inner.psiRe,
    psiIm: inner.psiIm,
    async derivative(y, out) {
      await check();
      return inner.derivative(y, out);
    },
    async meanFields(y) {
      await check();
      return inner.meanFields(y);
    },
    async combine(out, y, h, coefficients, stages, count) {
      return inner.combine(out, y, h, coefficients, stages, count);
    },
    async errorNorm(y0, y1, h, weights, stages, count, atol, rtol) {
      return inner.errorNorm(y0, y1, h, weights, stages, count, atol, rtol);
    },
    async scaledMax(v, y, atol, rtol) {
      return inner.scaledMax(v, y, atol, rtol);
    },
    async propagateColour(y, colour, tau) {
      await check();
      return inner.propagateColour(y, colour, tau);
    },
  };
}
