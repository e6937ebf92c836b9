// Runs half-sweeps and measuring passes over the whole lattice, on the calling thread or
// shared between the calling thread and the persistent workers of a sweep pool
// (sweepPool.ts: one Atomics barrier per half-sweep, no messages, rows claimed in chunks so
// that a delayed thread does not hold the others up).
// Because a half-sweep updates one colour from the other, the result is bit-identical for
// any split, i.e. for any thread count; and both kernels (JavaScript reference and
// WebAssembly, kernel/sweepKernels.ts) give the same doubles.

import { createSweepKernel, defaultKernelChoice, resolveKernel, type KernelChoice, type KernelName } from './kernel/sweepKernels.js';
import type { SolverState } from './solverState.js';
import { COMMAND, CONTROL, MAX_CHUNKS, openClaims, runChunks, type PoolInternals, type SweepPool } from './sweepPool.js';

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
  const chunkRows = Math.max(1, Math.ceil(rowCount / Math.min(MAX_CHUNKS, 16 * (workerCount + 1))));
  const chunkCount = Math.ceil(rowCount / chunkRows);
  const control = internals.control;
  const owner = {};
  let ready: Promise<void> | null = null;
  const attach = (): Promise<void> => {
    if (internals.owner !== owner) {
      internals.owner = owner;
      ready = internals.attach(state.layout, kernelName, workerCount);
    }
    return ready as Promise<void>;
  };

  /** Wait until every chunk is finished (a dead worker is reported, not waited for). */
  const waitForChunks = async (): Promise<void> => {
    const ints = control.ints;
    for (let f = Atomics.load(ints, CONTROL.finished); f < chunkCount; f = Atomics.load(ints, CONTROL.finished)) {
      if (Atomics.wait(ints, CONTROL.finished, f, 200) === 'timed-out') {
        await yieldToEventLoop(); // lets the pool see a worker that died
        const dead = internals.members.find((m) => m.dead !== null);
        if (dead) throw new Error(`a solver worker thread failed: ${dead.dead}`);
      }
    }
  };

  const run = async (command: number, colour: number, mu: number, temperature: number): Promise<number> => {
    await attach();
    const ints = control.ints;
    ints[CONTROL.command] = command;
    ints[CONTROL.colour] = colour;
    ints[CONTROL.chunkRows] = chunkRows;
    ints[CONTROL.rowCount] = rowCount;
    ints[CONTROL.chunkCount] = chunkCount;
    ints[CONTROL.failed] = 0;
    control.values[CONTROL.mu] = mu;
    control.values[CONTROL.temperature] = temperature;
    const generation = (ints[CONTROL.generation] + 1) | 0;
    openClaims(control, generation);
    Atomics.store(ints, CONTROL.generation, generation);
    Atomics.notify(ints, CONTROL.generation);
    // The calling thread claims chunks too, then waits for the ones the workers took.
    let localError: unknown = null;
    try {
      runChunks(control, generation, command, local);
    } catch (err) {
      localError = err;
    }
    await waitForChunks();
    await yieldToEventLoop();
    if (localError) throw localError;
    if (ints[CONTROL.failed] !== 0) {
      const reason = internals.members.map((m) => m.lastFailure).find((r) => r !== '') ?? 'unknown error';
      throw new Error(`a solver worker thread failed: ${reason}`);
    }
    let change = 0;
    for (let k = 0; k < chunkCount; k++) {
      const c = control.values[CONTROL.results + k];
      if (c > change) change = c;
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
