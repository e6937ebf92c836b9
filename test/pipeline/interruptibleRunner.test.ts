// The interrupt wrapper of a dynamics runner (src/pipeline/interruptibleRunner.ts): it must
// pass every call through unchanged (same arguments, same results, same shared arrays), count
// only the passes that do lattice-wide work (derivative, meanFields, propagateColour), check
// once every `every` of those, await the caller's pause before asking shouldStop, and throw
// EvolutionInterrupted before the inner pass runs when asked to stop.
import { describe, expect, it } from 'vitest';
import type { DynamicsFrame } from '../../src/dynamics/dynamicsFrame.js';
import type { DynamicsRunner } from '../../src/dynamics/dynamicsRunner.js';
import { EvolutionInterrupted, interruptibleRunner } from '../../src/pipeline/interruptibleRunner.js';

interface Recorded {
  log: string[];
  runner: DynamicsRunner;
}

/** An inner runner that records each call and its arguments and returns fixed numbers. */
function recordingRunner(): Recorded {
  const log: string[] = [];
  const frame = { siteCount: 3 } as unknown as DynamicsFrame;
  const runner: DynamicsRunner = {
    threads: 3,
    frame,
    phiRe: new Float64Array(3),
    phiIm: new Float64Array(3),
    psiRe: new Float64Array(3),
    psiIm: new Float64Array(3),
    async derivative(y, out) {
      log.push('derivative');
      for (let i = 0; i < y.length; i++) out[i] = 2 * y[i];
    },
    async meanFields() {
      log.push('meanFields');
    },
    async combine(out, y, h, coefficients, stages, count) {
      log.push(`combine h=${h} count=${count}`);
      for (let i = 0; i < y.length; i++) {
        let s = 0;
        for (let j = 0; j < count; j++) s += coefficients[j] * stages[j][i];
        out[i] = y[i] + h * s;
      }
    },
    async errorNorm(_y0, _y1, h, _w, _s, count, atol, rtol) {
      log.push(`errorNorm ${h} ${count} ${atol} ${rtol}`);
      return 0.125;
    },
    async scaledMax(_v, _y, atol, rtol) {
      log.push(`scaledMax ${atol} ${rtol}`);
      return 7.5;
    },
    async propagateColour(_y, colour, tau) {
      log.push(`propagateColour ${colour} ${tau}`);
    },
  };
  return { log, runner };
}

describe('interruptibleRunner', () => {
  it('passes the shared arrays, frame, thread count, arguments and results through unchanged', async () => {
    const { log, runner: inner } = recordingRunner();
    const r = interruptibleRunner(inner, { shouldStop: () => false, every: 1 });
    expect(r.threads).toBe(3);
    expect(r.frame).toBe(inner.frame);
    expect(r.phiRe).toBe(inner.phiRe);
    expect(r.phiIm).toBe(inner.phiIm);
    expect(r.psiRe).toBe(inner.psiRe);
    expect(r.psiIm).toBe(inner.psiIm);

    const y = Float64Array.from([1, -2, 3]);
    const out = new Float64Array(3);
    await r.derivative(y, out);
    expect(Array.from(out)).toEqual([2, -4, 6]);

    const combined = new Float64Array(3);
    await r.combine(combined, y, 0.5, Float64Array.from([1, 2]), [Float64Array.from([1, 1, 1]), Float64Array.from([0, 1, 2])], 2);
    // y + 0.5 (1*[1,1,1] + 2*[0,1,2]) = y + [0.5, 1.5, 2.5]
    expect(Array.from(combined)).toEqual([1.5, -0.5, 5.5]);

    expect(await r.errorNorm(y, y, 0.25, new Float64Array(1), [], 0, 1e-8, 1e-6)).toBe(0.125);
    expect(await r.scaledMax(y, y, 1e-9, 1e-7)).toBe(7.5);
    await r.meanFields(y);
    await r.propagateColour(y, 1, 0.01);
    expect(log).toEqual(['derivative', 'combine h=0.5 count=2', 'errorNorm 0.25 0 1e-8 0.000001', 'scaledMax 1e-9 1e-7', 'meanFields', 'propagateColour 1 0.01']);
  });

  it('checks once every `every` counted passes; combine, errorNorm and scaledMax are not counted', async () => {
    const { runner: inner } = recordingRunner();
    let ticks = 0;
    let asked = 0;
    const r = interruptibleRunner(inner, {
      shouldStop: () => {
        asked++;
        return false;
      },
      every: 3,
      onTick: () => ticks++,
    });
    const y = new Float64Array(3);
    const out = new Float64Array(3);
    // uncounted calls, many of them: no check
    for (let k = 0; k < 10; k++) {
      await r.combine(out, y, 1, new Float64Array(0), [], 0);
      await r.errorNorm(y, y, 1, new Float64Array(0), [], 0, 1, 1);
      await r.scaledMax(y, y, 1, 1);
    }
    expect(ticks).toBe(0);
    expect(asked).toBe(0);
    // counted calls of the three kinds, mixed: a check after every third
    await r.derivative(y, out);
    await r.meanFields(y);
    expect(ticks).toBe(0);
    await r.propagateColour(y, 0, 0.1);
    expect(ticks).toBe(1);
    expect(asked).toBe(1);
    for (let k = 0; k < 6; k++) await r.derivative(y, out);
    expect(ticks).toBe(3);
    expect(asked).toBe(3);
    await r.meanFields(y);
    await r.meanFields(y);
    expect(ticks).toBe(3);
  });

  it('defaults to a check every 32 counted passes', async () => {
    const { runner: inner } = recordingRunner();
    let ticks = 0;
    const r = interruptibleRunner(inner, { shouldStop: () => false, onTick: () => ticks++ });
    const y = new Float64Array(3);
    for (let k = 0; k < 31; k++) await r.meanFields(y);
    expect(ticks).toBe(0);
    await r.meanFields(y);
    expect(ticks).toBe(1);
    for (let k = 0; k < 32; k++) await r.meanFields(y);
    expect(ticks).toBe(2);
  });

  it('awaits the pause before asking shouldStop, and the tick comes first', async () => {
    const { runner: inner } = recordingRunner();
    const order: string[] = [];
    let stopRequested = false;
    const r = interruptibleRunner(inner, {
      every: 1,
      onTick: () => order.push('tick'),
      // the stop arrives during the pause (as a signal handler would run in the event-loop turn)
      pause: async () => {
        order.push('pause start');
        await new Promise<void>((resolve) => setImmediate(resolve));
        stopRequested = true;
        order.push('pause end');
      },
      shouldStop: () => {
        order.push('shouldStop');
        return stopRequested;
      },
    });
    await expect(r.meanFields(new Float64Array(3))).rejects.toBeInstanceOf(EvolutionInterrupted);
    expect(order).toEqual(['tick', 'pause start', 'pause end', 'shouldStop']);
  });

  it('throws EvolutionInterrupted before the inner pass runs, and does not write the output', async () => {
    const { log, runner: inner } = recordingRunner();
    let stop = false;
    const r = interruptibleRunner(inner, { shouldStop: () => stop, every: 2 });
    const y = Float64Array.from([1, 2, 3]);
    const out = Float64Array.from([9, 9, 9]);
    await r.derivative(y, out);
    expect(log).toEqual(['derivative']);
    stop = true;
    out.fill(9);
    const err = await r.derivative(y, out).then(
      () => null,
      (e: unknown) => e,
    );
    expect(err).toBeInstanceOf(EvolutionInterrupted);
    expect((err as Error).name).toBe('EvolutionInterrupted');
    expect((err as Error).message).toMatch(/interrupted/);
    expect(log).toEqual(['derivative']);
    expect(Array.from(out)).toEqual([9, 9, 9]);
    // propagateColour is refused in the same way at its check
    const { log: log2, runner: inner2 } = recordingRunner();
    const r2 = interruptibleRunner(inner2, { shouldStop: () => true, every: 1 });
    await expect(r2.propagateColour(y, 0, 0.1)).rejects.toBeInstanceOf(EvolutionInterrupted);
    expect(log2).toEqual([]);
  });

  it('never interrupts between checks, even when shouldStop is already true', async () => {
    const { log, runner: inner } = recordingRunner();
    let asked = 0;
    const r = interruptibleRunner(inner, {
      shouldStop: () => {
        asked++;
        return true;
      },
      every: 4,
    });
    const y = new Float64Array(3);
    for (let k = 0; k < 3; k++) await r.meanFields(y);
    expect(asked).toBe(0);
    expect(log).toEqual(['meanFields', 'meanFields', 'meanFields']);
    await expect(r.meanFields(y)).rejects.toBeInstanceOf(EvolutionInterrupted);
    expect(asked).toBe(1);
  });
});
