// Runs half-sweeps and measuring passes over the whole lattice, either on the calling
// thread or split into contiguous row ranges shared between the calling thread and
// piscina worker threads. Because a half-sweep updates one colour from the other, the
// result is bit-identical for any split, i.e. for any thread count.

import { Piscina } from 'piscina';
import { createSiteWorkspace } from './site/siteWorkspace.js';
import type { SolverState } from './solverState.js';
import { measureRows, sweepColour } from './sweepKernel.js';
import type { SweepTask } from './sweepWorker.js';

export interface SweepExecutor {
  /** compute threads in use, the calling thread included */
  readonly threads: number;
  /** update one colour; returns max |delta phi| */
  sweep(colour: number, mu: number, temperature: number): Promise<number>;
  /** fill the measured per-site fields */
  measure(mu: number, temperature: number): Promise<void>;
}

export type SweepPool = Piscina<SweepTask, number>;

export interface PoolOptions {
  /** worker threads (the calling thread computes too) */
  workers: number;
  /** worker module URL; defaults to the compiled sweepWorker.js next to this file */
  filename?: string;
  execArgv?: string[];
}

/** A pool of sweep workers; destroy it with `await pool.destroy()`. */
export function createSweepPool(options: PoolOptions): SweepPool {
  const defaultUrl = new URL('./sweepWorker.js', import.meta.url).href;
  const pool = new Piscina<SweepTask, number>({
    filename: options.filename ?? defaultUrl,
    minThreads: options.workers,
    maxThreads: options.workers,
    idleTimeout: 60_000,
    ...(options.execArgv ? { execArgv: options.execArgv } : {}),
  });
  pool.on('error', () => {
    // Start-up errors also reject the pending task, which is what the caller reports.
  });
  return pool;
}

let layoutCounter = 0;

/** Contiguous, nearly equal row ranges. */
export function rowRanges(rowCount: number, parts: number): Array<[number, number]> {
  const ranges: Array<[number, number]> = [];
  const p = Math.max(1, Math.min(parts, rowCount));
  for (let k = 0; k < p; k++) ranges.push([Math.floor((k * rowCount) / p), Math.floor(((k + 1) * rowCount) / p)]);
  return ranges;
}

/**
 * Executor over `state`. With `pool` = null (or a lattice too small to gain), everything
 * runs on the calling thread.
 */
export function createSweepExecutor(state: SolverState, pool: SweepPool | null, threads: number): SweepExecutor {
  const ws = createSiteWorkspace(state.layout.nmax);
  const rowCount = state.layout.inner[0] * state.layout.inner[1];
  const useThreads = pool === null ? 1 : Math.max(1, Math.min(threads, rowCount));
  const ranges = rowRanges(rowCount, useThreads);
  // Workers cache array views per layout; a per-module counter names the layout (no process state).
  const layoutId = ++layoutCounter;

  if (useThreads === 1 || pool === null) {
    return {
      threads: 1,
      sweep: async (colour, mu, temperature) => sweepColour(state.fields, ws, colour, 0, rowCount, mu, temperature),
      measure: async (mu, temperature) => measureRows(state.fields, state.measure, ws, 0, rowCount, mu, temperature),
    };
  }

  const run = async (kind: 'sweep' | 'measure', colour: number, mu: number, temperature: number): Promise<number> => {
    const pending: Array<Promise<number>> = [];
    for (let k = 1; k < ranges.length; k++) {
      pending.push(
        pool.run({ layout: state.layout, layoutId, kind, colour, rowStart: ranges[k][0], rowEnd: ranges[k][1], mu, temperature }),
      );
    }
    // The calling thread takes the first range while the workers run the others.
    let change = 0;
    let localError: unknown = null;
    try {
      if (kind === 'sweep') change = sweepColour(state.fields, ws, colour, ranges[0][0], ranges[0][1], mu, temperature);
      else measureRows(state.fields, state.measure, ws, ranges[0][0], ranges[0][1], mu, temperature);
    } catch (err) {
      localError = err;
    }
    const results = await Promise.allSettled(pending);
    if (localError) throw localError;
    for (const r of results) {
      if (r.status === 'rejected') {
        const reason = r.reason instanceof Error ? r.reason.message : String(r.reason);
        throw new Error(`a solver worker thread failed: ${reason}`);
      }
      if (r.value > change) change = r.value;
    }
    return change;
  };
  return {
    threads: ranges.length,
    sweep: (colour, mu, temperature) => run('sweep', colour, mu, temperature),
    measure: async (mu, temperature) => {
      await run('measure', 0, mu, temperature);
    },
  };
}
