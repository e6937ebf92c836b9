// Persistent sweep worker threads that wait on shared memory: a half-sweep costs one
// Atomics.notify to wake the workers and one wait of the calling thread for the last
// chunk (one barrier), no message. A pool serves one executor at a time: attaching a new one
// first sends the workers of the previous one back to their message loop.
//
// Work split: the rows are cut into chunks, and every thread (the caller and the workers)
// claims chunks from one shared counter until none are left, so a thread that the operating
// system delays simply takes fewer chunks and the others stay busy; the caller waits only
// for chunks that were claimed, never for a worker that has not woken up. The counter
// carries the command's generation, so a worker that wakes late cannot claim chunks of a
// later command. Each chunk's max |delta phi| goes to its own slot; the maximum over the
// slots does not depend on who computed what.

import { Worker } from 'node:worker_threads';
import type { KernelName } from './kernel/sweepKernels.js';
import type { SolverLayout } from './solverState.js';

/**
 * Indices into the shared control block. Bytes: 0..27 the command (Int32), 64 the claim
 * word, 128 the finished count (each on its own cache line), 192 mu and T (Float64),
 * 256.. one acknowledgement word per worker (64 bytes apart), 4352.. the chunk results.
 */
export const CONTROL = {
  generation: 0,
  command: 1,
  colour: 2,
  chunkRows: 3,
  rowCount: 4,
  chunkCount: 5,
  /** 1 when a worker's kernel threw during the command */
  failed: 6,
  /** (generation & 0x7ff) << 20 | next chunk */
  claim: 16,
  /** chunks finished */
  finished: 32,
  /** Int32 index of worker w's acknowledged generation: workerDone + 16 w */
  workerDone: 64,
  // Float64 indices
  mu: 24,
  temperature: 25,
  /** Float64 index of chunk 0's result */
  results: 544,
} as const;
export const COMMAND = { sweep: 1, measure: 2, detach: 3 } as const;
/** Chunks a command may have (16 per thread for up to 64 threads). */
export const MAX_CHUNKS = 1024;
const CONTROL_BYTES = 4352;
const GENERATION_MASK = 0x7ff;
const CHUNK_MASK = 0xfffff;

export interface PoolOptions {
  /** worker threads (the calling thread computes too) */
  workers: number;
  /** worker module URL; defaults to the compiled sweepWorker.js next to this file */
  filename?: string;
  execArgv?: string[];
}

/** Messages from a worker. */
export type WorkerReply = { type: 'attached' } | { type: 'failed'; message: string };

/** Views on a pool's shared control block. */
export interface ControlBlock {
  ints: Int32Array;
  values: Float64Array;
}

export function controlViews(buffer: SharedArrayBuffer): ControlBlock {
  return { ints: new Int32Array(buffer, 0, CONTROL_BYTES / 4), values: new Float64Array(buffer, 0, CONTROL_BYTES / 8 + MAX_CHUNKS) };
}

/** Start command `generation` with `chunkCount` chunks (called before waking the workers). */
export function openClaims(c: ControlBlock, generation: number): void {
  Atomics.store(c.ints, CONTROL.finished, 0);
  Atomics.store(c.ints, CONTROL.claim, (generation & GENERATION_MASK) << 20);
}

/** The next chunk of command `generation`, or -1 when none are left (or the command is over). */
export function claimChunk(c: ControlBlock, generation: number): number {
  const tag = generation & GENERATION_MASK;
  const count = c.ints[CONTROL.chunkCount];
  for (;;) {
    const v = Atomics.load(c.ints, CONTROL.claim);
    if (v >>> 20 !== tag) return -1;
    const chunk = v & CHUNK_MASK;
    if (chunk >= count) return -1;
    if (Atomics.compareExchange(c.ints, CONTROL.claim, v, v + 1) === v) return chunk;
  }
}

/** Run a claimed chunk and record it; the last one wakes the waiting caller. */
export function finishChunk(c: ControlBlock, chunk: number, change: number): void {
  c.values[CONTROL.results + chunk] = change;
  if (Atomics.add(c.ints, CONTROL.finished, 1) + 1 === c.ints[CONTROL.chunkCount]) Atomics.notify(c.ints, CONTROL.finished);
}

/** Claim and run chunks of the current command until none are left. */
export function runChunks(
  c: ControlBlock,
  generation: number,
  command: number,
  kernel: { sweep(colour: number, rowStart: number, rowEnd: number, mu: number, temperature: number): number; measure(rowStart: number, rowEnd: number, mu: number, temperature: number): void },
): void {
  const chunkRows = c.ints[CONTROL.chunkRows];
  const rowCount = c.ints[CONTROL.rowCount];
  const colour = c.ints[CONTROL.colour];
  const mu = c.values[CONTROL.mu];
  const temperature = c.values[CONTROL.temperature];
  for (let chunk = claimChunk(c, generation); chunk >= 0; chunk = claimChunk(c, generation)) {
    const start = chunk * chunkRows;
    const end = Math.min(rowCount, start + chunkRows);
    let change = 0;
    try {
      if (command === COMMAND.sweep) change = kernel.sweep(colour, start, end, mu, temperature);
      else kernel.measure(start, end, mu, temperature);
    } finally {
      finishChunk(c, chunk, change);
    }
  }
}

interface PoolWorker {
  worker: Worker;
  /** serving an executor (blocked on the control block) */
  serving: boolean;
  /** exited or failed to start, with the reason */
  dead: string | null;
  pending: Array<(reply: WorkerReply) => void>;
  lastFailure: string;
}

export interface SweepPool {
  /** worker threads in the pool */
  readonly workers: number;
  destroy(): Promise<void>;
}

/** The pool's internals, for the executor. */
export interface PoolInternals extends SweepPool {
  readonly members: readonly PoolWorker[];
  readonly control: ControlBlock;
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
  if (!Number.isInteger(options.workers) || options.workers < 1 || options.workers > 63) {
    throw new RangeError(`workers: expected an integer in [1, 63], got ${options.workers}`);
  }
  const url = new URL(options.filename ?? new URL('./sweepWorker.js', import.meta.url).href);
  const shared = new SharedArrayBuffer(CONTROL_BYTES + MAX_CHUNKS * 8);
  const control = controlViews(shared);
  const members: PoolWorker[] = [];
  for (let w = 0; w < options.workers; w++) {
    const worker = new Worker(url, { workerData: { control: shared, index: w }, ...(options.execArgv ? { execArgv: options.execArgv } : {}) });
    const member: PoolWorker = { worker, serving: false, dead: null, pending: [], lastFailure: '' };
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

  /** Send the serving workers back to their message loops. */
  const detachAll = (): void => {
    const serving = members.map((m, w) => [m, w] as const).filter(([m]) => m.serving && m.dead === null);
    if (serving.length === 0) return;
    control.ints[CONTROL.command] = COMMAND.detach;
    const generation = Atomics.add(control.ints, CONTROL.generation, 1) + 1;
    Atomics.notify(control.ints, CONTROL.generation);
    for (const [m, w] of serving) {
      const at = CONTROL.workerDone + 16 * w;
      // An idle worker answers at once.
      for (let d = Atomics.load(control.ints, at); d !== generation; d = Atomics.load(control.ints, at)) {
        if (Atomics.wait(control.ints, at, d, 5000) === 'timed-out') break;
      }
      m.serving = false;
    }
  };

  const pool: PoolInternals = {
    workers: options.workers,
    members,
    control,
    owner: null,
    async attach(layout, kernel, count) {
      detachAll();
      const replies: Array<Promise<WorkerReply>> = [];
      for (let w = 0; w < count; w++) {
        const m = members[w];
        if (m.dead !== null) throw new Error(`a solver worker thread failed: ${m.dead}`);
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
      detachAll();
      await Promise.all(members.map((m) => (m.dead === null ? m.worker.terminate() : Promise.resolve(0))));
    },
  };
  return pool;
}
