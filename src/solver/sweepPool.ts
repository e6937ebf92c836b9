// Persistent sweep worker threads that wait on shared memory: a half-sweep costs one
// Atomics.notify to start the workers and one Atomics.wait per worker for the result (one
// barrier), no message. A pool serves one executor at a time: attaching a new one first
// sends the workers of the previous one back to their message loop.
//
// Work split: every thread (the caller and the workers) claims chunks of rows from one
// shared counter until none are left, so a thread that the operating system delays simply
// takes fewer rows and the other cores stay busy (the result does not depend on the split).
//
// Control block of worker w: 16 Int32 slots (64 bytes, its own cache line) at w * 64 bytes,
// with Float64 slots 4..7 on the same bytes 32..63; the row counter follows the blocks.

import { Worker } from 'node:worker_threads';
import type { KernelName } from './kernel/sweepKernels.js';
import type { SolverLayout } from './solverState.js';

export const CONTROL = {
  /** generation of the last command (written by the executor) */
  generation: 0,
  /** generation of the last command the worker finished */
  done: 1,
  command: 2,
  colour: 3,
  /** rows per claimed chunk */
  chunkRows: 4,
  /** rows of the lattice */
  rowCount: 5,
  /** 0 ok, 1 the kernel threw (the message follows as a 'failed' post) */
  status: 6,
  // Float64 indices
  mu: 4,
  temperature: 5,
  result: 6,
} as const;
export const COMMAND = { sweep: 1, measure: 2, detach: 3 } as const;
const CONTROL_BYTES = 64;

export interface PoolOptions {
  /** worker threads (the calling thread computes too) */
  workers: number;
  /** worker module URL; defaults to the compiled sweepWorker.js next to this file */
  filename?: string;
  execArgv?: string[];
}

/** Messages from a worker. */
export type WorkerReply = { type: 'attached' } | { type: 'failed'; message: string };

interface PoolWorker {
  worker: Worker;
  control: Int32Array;
  values: Float64Array;
  /** serving an executor (blocked on its control block) */
  serving: boolean;
  /** exited or failed to start, with the reason */
  dead: string | null;
  pending: Array<(reply: WorkerReply) => void>;
  lastFailure: string;
}

/** Claim the next chunk of rows: its first row, or >= rowCount when none are left. */
export function claimRows(cursor: Int32Array, chunkRows: number): number {
  return Atomics.add(cursor, 0, chunkRows);
}

export interface SweepPool {
  /** worker threads in the pool */
  readonly workers: number;
  destroy(): Promise<void>;
}

/** The pool's internals, for the executor. */
export interface PoolInternals extends SweepPool {
  readonly members: readonly PoolWorker[];
  /** shared row counter of the current command */
  readonly cursor: Int32Array;
  /** hand `count` workers to a new executor (detaching the previous one) */
  attach(layout: SolverLayout, kernel: KernelName, count: number): Promise<void>;
  /** the executor that currently owns the workers */
  owner: object | null;
}

function failureMessage(err: unknown): string {
  return err instanceof Error ? err.message : String(err);
}

/** A pool of persistent sweep workers; destroy it with `await pool.destroy()`. */
export function createSweepPool(options: PoolOptions): SweepPool {
  if (!Number.isInteger(options.workers) || options.workers < 1) {
    throw new RangeError(`workers: expected an integer >= 1, got ${options.workers}`);
  }
  const url = new URL(options.filename ?? new URL('./sweepWorker.js', import.meta.url).href);
  const shared = new SharedArrayBuffer((options.workers + 1) * CONTROL_BYTES);
  const cursor = new Int32Array(shared, options.workers * CONTROL_BYTES, 1);
  const members: PoolWorker[] = [];
  for (let w = 0; w < options.workers; w++) {
    const control = new Int32Array(shared, w * CONTROL_BYTES, CONTROL_BYTES / 4);
    const values = new Float64Array(shared, w * CONTROL_BYTES, CONTROL_BYTES / 8);
    const worker = new Worker(url, { workerData: { control: shared, index: w, workers: options.workers }, ...(options.execArgv ? { execArgv: options.execArgv } : {}) });
    const member: PoolWorker = { worker, control, values, serving: false, dead: null, pending: [], lastFailure: '' };
    const settle = (reply: WorkerReply): void => {
      const next = member.pending.shift();
      if (next) next(reply);
    };
    worker.on('message', (reply: WorkerReply) => {
      if (reply.type === 'failed') member.lastFailure = reply.message;
      settle(reply);
    });
    worker.on('error', (err) => {
      member.dead = failureMessage(err);
      while (member.pending.length) settle({ type: 'failed', message: member.dead });
    });
    worker.on('exit', (code) => {
      member.dead ??= `exited with code ${code}`;
      while (member.pending.length) settle({ type: 'failed', message: member.dead });
    });
    worker.unref();
    members.push(member);
  }

  const detach = (m: PoolWorker): void => {
    if (!m.serving || m.dead !== null) return;
    m.control[CONTROL.command] = COMMAND.detach;
    const generation = Atomics.add(m.control, CONTROL.generation, 1) + 1;
    Atomics.notify(m.control, CONTROL.generation);
    // The worker answers at once (it is idle between commands of its executor).
    for (let d = Atomics.load(m.control, CONTROL.done); d !== generation; d = Atomics.load(m.control, CONTROL.done)) {
      if (Atomics.wait(m.control, CONTROL.done, d, 5000) === 'timed-out') break;
    }
    m.serving = false;
  };

  const pool: PoolInternals = {
    workers: options.workers,
    members,
    cursor,
    owner: null,
    async attach(layout, kernel, count) {
      const replies: Array<Promise<WorkerReply>> = [];
      for (let w = 0; w < count; w++) {
        const m = members[w];
        if (m.dead !== null) throw new Error(`a solver worker thread failed: ${m.dead}`);
        detach(m);
        m.worker.ref();
        replies.push(new Promise<WorkerReply>((resolve) => m.pending.push(resolve)));
        m.worker.postMessage({ type: 'attach', layout, kernel, slot: w + 1 });
      }
      const answers = await Promise.all(replies);
      for (let w = 0; w < count; w++) members[w].worker.unref();
      answers.forEach((a, w) => {
        if (a.type === 'attached') members[w].serving = true;
      });
      const failed = answers.find((a) => a.type === 'failed');
      if (failed && failed.type === 'failed') throw new Error(`a solver worker thread failed: ${failed.message}`);
    },
    async destroy() {
      for (const m of members) detach(m);
      await Promise.all(members.map((m) => (m.dead === null ? m.worker.terminate() : Promise.resolve(0))));
    },
  };
  return pool;
}
