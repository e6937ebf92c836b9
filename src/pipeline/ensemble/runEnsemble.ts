// Runs the realisations of the blocks a process owns and accumulates them block by
// block (blockPartial.ts). No files and no terminal: progress goes to a callback, and
// the caller decides when to stop.
//
// Two ways to use several threads, chosen by the caller:
// - 'realisations': each realisation is solved serially in a piscina worker thread, as
//   many at once as there are threads (the main thread only schedules and accumulates,
//   so it stays responsive to signals). Right for small lattices, where a single solve
//   cannot keep two threads busy (solveRun.ts: below PARALLEL_MIN_SITES sites the
//   solver itself stays on one thread). With one thread the main thread solves.
// - 'lattice': realisations one after another, each solved by the solver's own
//   red-black sweeps split over the threads (sweepExecutor.ts). Right for large lattices.
// Both give the same bits for any thread count: every realisation is a deterministic
// solve (the red-black sweep is thread-count independent, DESIGN.md section 1), and the
// main thread adds the results to their block strictly in realisation order, holding
// results that arrive early until their turn. At most 2 x threads realisations are in
// flight, which bounds the results held.

import { Piscina } from 'piscina';
import { createSweepExecutor, createSweepPool, type SweepPool } from '../../solver/sweepExecutor.js';
import type { ExecutorFactory } from '../../solver/runLattice.js';
import { blockRange, type BlockPlan } from './blockPlan.js';
import { addRealisation, blockComplete, createBlockPartial, type BlockPartial } from './blockPartial.js';
import type { HistogramBins } from './histogramBins.js';
import type { RealisationTask } from './realisationWorker.js';
import { serialExecutor, solveRealisation, type RealisationRecord, type RealisationResult } from './solveRealisation.js';

export type ParallelMode = 'realisations' | 'lattice';

/** Where a worker module lives (tests pass the TypeScript source and a loader). */
export interface WorkerModule {
  filename: string;
  execArgv?: string[];
}

export interface EnsembleRunOptions {
  /** scenario JSON, overrides applied */
  raw: Record<string, unknown>;
  /** the scenario's disorder seed (realisation r uses `${baseSeed}/${r}`) */
  baseSeed: string;
  plan: BlockPlan;
  /** blocks to run, strictly increasing */
  blocks: readonly number[];
  bins: HistogramBins;
  siteCount: number;
  /** compute threads, the main thread included */
  threads: number;
  parallelOver: ParallelMode;
  realisationWorker?: WorkerModule;
  sweepWorker?: WorkerModule;
  /**
   * Receives each block as soon as its last realisation is in, in block order; the run
   * keeps no reference to it afterwards (fold it into a total, or write it out).
   */
  onBlock: (partial: BlockPartial) => void;
  /** after each realisation has been added to its block */
  onRealisation?: (progress: { done: number; total: number; record: RealisationRecord }) => void;
  /**
   * During a realisation solved on this thread ('lattice', or one thread): after each sweep,
   * with the realisation being solved and how many are done (worker threads report only
   * finished realisations).
   */
  onSweep?: (progress: { index: number; done: number; total: number; sweep: number; residual: number; stage: string }) => void;
  /** folder of the scenario file: landscape files are read relative to it */
  scenarioDirectory?: string;
  /** polled between realisations and during sweeps; true stops the run */
  shouldStop?: () => boolean;
}

export interface EnsembleRunResult {
  /** blocks handed to onBlock, in order (all requested blocks unless stopped) */
  blocksDone: number[];
  stopped: boolean;
  threadsUsed: number;
  parallelOver: ParallelMode;
}

const yieldToEventLoop = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

export async function runEnsembleBlocks(options: EnsembleRunOptions): Promise<EnsembleRunResult> {
  const { plan, bins, siteCount } = options;
  const threads = Math.max(1, Math.floor(options.threads));
  for (let k = 1; k < options.blocks.length; k++) {
    if (!(options.blocks[k] > options.blocks[k - 1])) throw new RangeError('runEnsembleBlocks blocks: expected strictly increasing block numbers');
  }
  const order: number[] = [];
  for (const b of options.blocks) {
    const range = blockRange(plan, b);
    for (let r = range.first; r < range.first + range.count; r++) order.push(r);
  }
  const stop = (): boolean => options.shouldStop?.() === true;
  let done = 0;
  // Results arrive in realisation order, so blocks fill one after another: only the block
  // being filled is held.
  let current: BlockPartial | null = null;
  const blocksDone: number[] = [];
  const accept = (result: RealisationResult): void => {
    const block = Math.floor(result.record.index / plan.blockSize);
    if (current === null) current = createBlockPartial(blockRange(plan, block), siteCount, bins);
    addRealisation(current, result, bins);
    done++;
    options.onRealisation?.({ done, total: order.length, record: result.record });
    if (blockComplete(current)) {
      const finished: BlockPartial = current;
      current = null;
      options.onBlock(finished);
      blocksDone.push(finished.range.block);
    }
  };

  let stopped = false;
  // No more worker threads than realisations to run.
  const realisationThreads = Math.min(threads, order.length);
  if (options.parallelOver === 'realisations' && realisationThreads > 1) {
    stopped = await runInWorkers(options, order, realisationThreads, accept, stop);
  } else {
    let pool: SweepPool | null = null;
    let makeExecutor: ExecutorFactory = serialExecutor;
    if (options.parallelOver === 'lattice' && threads > 1) {
      pool = createSweepPool({ workers: threads - 1, ...(options.sweepWorker ? { filename: options.sweepWorker.filename, execArgv: options.sweepWorker.execArgv ?? [] } : {}) });
      const sweepPool = pool;
      makeExecutor = (state) => createSweepExecutor(state, sweepPool, threads);
    }
    try {
      for (const index of order) {
        await yieldToEventLoop(); // lets signal handlers run between realisations
        if (stop()) {
          stopped = true;
          break;
        }
        const result = await solveRealisation(
          options.raw,
          options.baseSeed,
          index,
          makeExecutor,
          (p) => {
            options.onSweep?.({ index, done, total: order.length, sweep: p.totalSweeps, residual: p.change, stage: p.stage });
            return stop() ? 'stop' : undefined;
          },
          options.scenarioDirectory,
        );
        if (stop()) {
          stopped = true;
          break;
        }
        accept(result);
      }
    } finally {
      if (pool) await pool.destroy();
    }
  }
  return {
    blocksDone,
    stopped,
    threadsUsed: options.parallelOver === 'realisations' ? Math.max(1, realisationThreads) : threads,
    parallelOver: options.parallelOver,
  };
}

/** Realisations in worker threads, accepted in realisation order. Returns true if stopped. */
async function runInWorkers(
  options: EnsembleRunOptions,
  order: readonly number[],
  threads: number,
  accept: (result: RealisationResult) => void,
  stop: () => boolean,
): Promise<boolean> {
  const pool = new Piscina<RealisationTask, RealisationResult>({
    filename: options.realisationWorker?.filename ?? new URL('./realisationWorker.js', import.meta.url).href,
    minThreads: threads,
    maxThreads: threads,
    idleTimeout: 60_000,
    ...(options.realisationWorker?.execArgv ? { execArgv: options.realisationWorker.execArgv } : {}),
  });
  pool.on('error', () => {
    // A worker that fails to start also rejects its task, which is what gets reported.
  });
  const windowSize = 2 * threads;
  const pending = new Map<number, Promise<RealisationResult>>();
  let launched = 0;
  let next = 0;
  let stopped = false;
  try {
    while (next < order.length) {
      while (!stop() && launched < order.length && launched - next < windowSize) {
        const index = order[launched++];
        const task = pool.run({
          scenario: options.raw,
          baseSeed: options.baseSeed,
          index,
          ...(options.scenarioDirectory !== undefined ? { scenarioDirectory: options.scenarioDirectory } : {}),
        });
        task.catch(() => {}); // awaited below in order; this only silences early rejections
        pending.set(index, task);
      }
      const head = pending.get(order[next]);
      if (head === undefined || stop()) {
        stopped = true;
        break;
      }
      let result: RealisationResult;
      try {
        result = await head;
      } catch (err) {
        const reason = err instanceof Error ? err.message : String(err);
        throw new Error(`realisation ${order[next]} failed in a worker thread: ${reason}`);
      }
      pending.delete(order[next]);
      next++;
      if (stop()) {
        stopped = true;
        break;
      }
      accept(result);
    }
  } finally {
    await pool.destroy();
  }
  return stopped;
}
