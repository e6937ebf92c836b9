// Runs half-sweeps and measuring passes over the whole lattice, on the calling thread or
// split into contiguous row ranges shared between the calling thread and the persistent
// workers of a sweep pool (sweepPool.ts: one Atomics barrier per half-sweep, no messages).
// Because a half-sweep updates one colour from the other, the result is bit-identical for
// any split, i.e. for any thread count; and both kernels (JavaScript reference and
// WebAssembly, kernel/sweepKernels.ts) give the same doubles.

import { createSweepKernel, defaultKernelChoice, resolveKernel, type KernelChoice, type KernelName } from './kernel/sweepKernels.js';
import type { SolverState } from './solverState.js';
import { claimRows, COMMAND, CONTROL, type PoolInternals, type SweepPool } from './sweepPool.js';

export { createSweepPool, type PoolOptions, type SweepPool } from './sweepPool.js';

export interface SweepExecutor {
  /** compute threads in use, the calling thread included */
  readonly threads: number;
  /** the kernel every thread runs */
  readonly kernel: KernelName;
  /** update one colour; returns max |delta phi| */
  sweep(colour: number, mu: number, temperature: number): Promise<number>;
  /** fill the measured per-site fields */
  measure(mu: number, temperature: number): Promise<void>;
}

export interface ExecutorOptions {
  /** 'auto': WebAssembly where it can run, else the JavaScript reference; default: defaultKernelChoice() */
  kernel?: KernelChoice;
}

/** Contiguous, nearly equal row ranges. */
export function rowRanges(rowCount: number, parts: number): Array<[number, number]> {
  const ranges: Array<[number, number]> = [];
  const p = Math.max(1, Math.min(parts, rowCount));
  for (let k = 0; k < p; k++) ranges.push([Math.floor((k * rowCount) / p), Math.floor(((k + 1) * rowCount) / p)]);
  return ranges;
}

/** Lets signals, timers and worker events run between half-sweeps (a macrotask turn). */
const yieldToEventLoop = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

/**
 * Executor over `state`. With `pool` = null (or a lattice too small to gain), everything
 * runs on the calling thread.
 */
export function createSweepExecutor(state: SolverState, pool: SweepPool | null, threads: number, options: ExecutorOptions = {}): SweepExecutor {
  const kernelName = resolveKernel(options.kernel ?? defaultKernelChoice(), state.layout);
  const local = createSweepKernel(state, kernelName, 0);
  const rowCount = state.layout.inner[0] * state.layout.inner[1];
  const internals = pool as PoolInternals | null;
  const workerCount = internals === null ? 0 : Math.max(0, Math.min(threads - 1, internals.workers, rowCount - 1));

  if (workerCount === 0 || internals === null) {
    return {
      threads: 1,
      kernel: kernelName,
      sweep: async (colour, mu, temperature) => {
        const change = local.sweep(colour, 0, rowCount, mu, temperature);
        await yieldToEventLoop();
        return change;
      },
      measure: async (mu, temperature) => {
        local.measure(0, rowCount, mu, temperature);
      },
    };
  }

  // About 16 chunks per thread: small enough to even out a delayed thread, large enough that
  // claiming costs nothing.
  const chunkRows = Math.max(1, Math.floor(rowCount / (16 * (workerCount + 1))));
  const cursor = internals.cursor;
  const members = internals.members.slice(0, workerCount);
  const owner = {};
  let ready: Promise<void> | null = null;
  const attach = (): Promise<void> => {
    if (internals.owner !== owner) {
      internals.owner = owner;
      ready = internals.attach(state.layout, kernelName, workerCount);
    }
    return ready as Promise<void>;
  };

  /** Wait until worker m has finished `generation` (or died). */
  const waitFor = async (m: PoolInternals['members'][number], generation: number): Promise<void> => {
    for (let d = Atomics.load(m.control, CONTROL.done); d !== generation; d = Atomics.load(m.control, CONTROL.done)) {
      if (Atomics.wait(m.control, CONTROL.done, d, 200) === 'timed-out') {
        await yieldToEventLoop(); // lets the pool see a worker that died
        if (m.dead !== null) throw new Error(`a solver worker thread failed: ${m.dead}`);
      }
    }
  };

  const run = async (command: number, colour: number, mu: number, temperature: number): Promise<number> => {
    await attach();
    const generations: number[] = [];
    Atomics.store(cursor, 0, 0);
    for (let w = 0; w < workerCount; w++) {
      const m = members[w];
      m.control[CONTROL.command] = command;
      m.control[CONTROL.colour] = colour;
      m.control[CONTROL.chunkRows] = chunkRows;
      m.control[CONTROL.rowCount] = rowCount;
      m.values[CONTROL.mu] = mu;
      m.values[CONTROL.temperature] = temperature;
      generations.push(Atomics.add(m.control, CONTROL.generation, 1) + 1);
      Atomics.notify(m.control, CONTROL.generation);
    }
    // The calling thread claims chunks too.
    let change = 0;
    let localError: unknown = null;
    try {
      for (let start = claimRows(cursor, chunkRows); start < rowCount; start = claimRows(cursor, chunkRows)) {
        const end = Math.min(rowCount, start + chunkRows);
        if (command === COMMAND.sweep) {
          const c = local.sweep(colour, start, end, mu, temperature);
          if (c > change) change = c;
        } else local.measure(start, end, mu, temperature);
      }
    } catch (err) {
      localError = err;
      Atomics.store(cursor, 0, rowCount); // the workers stop claiming
    }
    let failure = '';
    for (let w = 0; w < workerCount; w++) {
      const m = members[w];
      await waitFor(m, generations[w]);
      if (m.control[CONTROL.status] !== 0) failure ||= 'failed';
      else if (command === COMMAND.sweep && m.values[CONTROL.result] > change) change = m.values[CONTROL.result];
    }
    await yieldToEventLoop();
    if (localError) throw localError;
    if (failure) {
      const reason = members.map((m) => m.lastFailure).find((r) => r !== '') ?? 'unknown error';
      throw new Error(`a solver worker thread failed: ${reason}`);
    }
    return change;
  };
  return {
    threads: workerCount + 1,
    kernel: kernelName,
    sweep: (colour, mu, temperature) => run(COMMAND.sweep, colour, mu, temperature),
    measure: async (mu, temperature) => {
      await run(COMMAND.measure, 0, mu, temperature);
    },
  };
}
