// A DynamicsRunner that splits the lattice into contiguous site ranges shared between the
// calling thread (range 0) and persistent worker threads (dynamicsWorker.ts), synchronised
// by an Atomics barrier over SharedArrayBuffers (protocol: dynamicsPoolProtocol.ts).
//
// Why not a task queue: one Dormand-Prince step is ~20 passes (two per right-hand side:
// phi everywhere, then Psi and H c), each only ~0.1 ms on a 64 x 64 cloud, so the ~50 us
// round trip of a queued task would eat most of the gain. Here a pass costs one futex wake
// and one done count. Every pass runs the same range kernels as the serial runner and the
// reductions are maxima, so the results are bit-identical for any thread count
// (test/dynamics/parallel-runner.test.ts).
//
// The frame must live on shared memory (shareFrame): the drives write the hopping scales and
// the site potential on the calling thread between passes, and the workers read them; the
// frame's scalars (U, its scale, mu, rate) are copied into the parameter block at every pass.

import { MessageChannel, receiveMessageOnPort, Worker, type MessagePort } from 'node:worker_threads';
import type { DynamicsFrame } from './dynamicsFrame.js';
import { createMeanFieldArrays, type DynamicsRunner } from './dynamicsRunner.js';
import { hamiltonianActionRange, meanFieldRange, orderParameterRange } from './equationsOfMotion.js';
import { sharedFloat64 } from './gutzwillerState.js';
import { runLocalShare } from '../solver/localShare.js';
import { combineRange, errorNormRange, scaledMaxRange } from './rungeKuttaKernels.js';
import { createExponentialWorkspace, propagateColourRange } from './siteExponential.js';
import { ArrayId, Control, Op, Parameter, type FrameLayoutMessage } from './dynamicsPoolProtocol.js';

export interface DynamicsPoolOptions {
  /** worker threads (the calling thread computes too) */
  workers: number;
  /** worker module URL; default: the compiled dynamicsWorker.js next to this file */
  filename?: string;
  execArgv?: string[];
}

export interface DynamicsPool {
  readonly workers: number;
  /** stop the workers; the pool cannot be used afterwards */
  destroy(): Promise<void>;
}

const isShared = (a: Float64Array | null): boolean => a === null || a.buffer instanceof SharedArrayBuffer;

function sharedCopy(a: Float64Array): Float64Array {
  const s = sharedFloat64(a.length);
  s.set(a);
  return s;
}

/** The same frame with every array on shared memory (copies; the base arrays stay read-only). */
export function shareFrame(frame: DynamicsFrame): DynamicsFrame {
  return {
    ...frame,
    hopArrays: frame.hopArrays.map((h) => (h === null ? null : sharedCopy(h))) as [Float64Array | null, Float64Array | null, Float64Array | null],
    hopUniform: sharedCopy(frame.hopUniform),
    hopScale: sharedCopy(frame.hopScale),
    interactionArray: frame.interactionArray === null ? null : sharedCopy(frame.interactionArray),
    eps: sharedCopy(frame.eps),
    sqrtN: sharedCopy(frame.sqrtN),
  };
}

class WorkerPool implements DynamicsPool {
  readonly workers: number;
  readonly control = new Int32Array(new SharedArrayBuffer(Control.SIZE * 4));
  readonly parameters = new Float64Array(new SharedArrayBuffer(Parameter.SIZE * 8));
  readonly results: Float64Array;
  readonly threads: Worker[] = [];
  readonly ports: MessagePort[] = [];
  /** a worker that died or threw outside a pass */
  failure: string | null = null;
  destroyed = false;
  boundRunner = 0;
  runnerCount = 0;
  readonly ids = new WeakMap<Float64Array, number>();
  nextId: number = ArrayId.FIRST_FREE;

  constructor(workers: number) {
    this.workers = workers;
    this.results = new Float64Array(new SharedArrayBuffer(Math.max(1, workers) * 8));
  }

  /** The id of a shared array, sending it to every worker the first time. */
  idOf(a: Float64Array, what: string): number {
    const known = this.ids.get(a);
    if (known !== undefined) return known;
    if (!(a.buffer instanceof SharedArrayBuffer)) {
      throw new RangeError(`parallel dynamics runner: ${what} must live on a SharedArrayBuffer (sharedFloat64) so that the worker threads can map it`);
    }
    const id = this.nextId++;
    for (const port of this.ports) port.postMessage({ type: 'array', id, array: a });
    this.ids.set(a, id);
    return id;
  }

  private async waitDone(): Promise<void> {
    const n = this.workers;
    const c = this.control;
    // Workers are usually done by the time the calling thread finishes its own range: a short
    // spin avoids a sleep and wake-up; then sleep, and every 20 ms give the event loop a turn
    // so that a worker that died can be reported instead of waited for.
    for (let k = 0; k < 2000; k++) if (Atomics.load(c, Control.DONE) >= n) return;
    for (;;) {
      const done = Atomics.load(c, Control.DONE);
      if (done >= n) return;
      if (Atomics.wait(c, Control.DONE, done, 20) === 'timed-out') {
        await new Promise<void>((resolve) => setImmediate(resolve));
        if (this.failure !== null) throw new Error(`a dynamics worker thread failed: ${this.failure}`);
      }
    }
  }

  /** Start pass `op` on the workers, run `local` on range 0, wait; the maximum of all results. */
  async pass(op: number, local: () => number): Promise<number> {
    if (this.destroyed) throw new Error('parallel dynamics runner: the pool was destroyed');
    if (this.failure !== null) throw new Error(`a dynamics worker thread failed: ${this.failure}`);
    const c = this.control;
    Atomics.store(c, Control.DONE, 0);
    c[Control.OP] = op;
    Atomics.add(c, Control.GENERATION, 1);
    Atomics.notify(c, Control.GENERATION);
    // worker failures first, then an error of the local share (runLocalShare)
    let { local: value } = await runLocalShare(local, async () => {
      await this.waitDone();
      if (Atomics.load(c, Control.FAILED) !== 0) {
        Atomics.store(c, Control.FAILED, 0);
        const messages: string[] = [];
        for (const port of this.ports) {
          for (let m = receiveMessageOnPort(port); m !== undefined; m = receiveMessageOnPort(port)) {
            const body = m.message as { type?: string; message?: string; index?: number };
            if (body.type === 'error') messages.push(`worker ${body.index}: ${body.message}`);
          }
        }
        throw new Error(`a dynamics worker thread failed: ${messages.join('; ') || 'no message'}`);
      }
    });
    // the same rule as inside a range (r > max), so NaN is treated alike for any split
    for (let w = 0; w < this.workers; w++) if (this.results[w] > value) value = this.results[w];
    return value;
  }

  async destroy(): Promise<void> {
    if (this.destroyed) return;
    this.destroyed = true;
    const c = this.control;
    c[Control.OP] = Op.EXIT;
    Atomics.add(c, Control.GENERATION, 1);
    Atomics.notify(c, Control.GENERATION);
    await Promise.all(
      this.threads.map(
        (w) =>
          new Promise<void>((resolve) => {
            const timer = setTimeout(() => {
              void w.terminate().then(() => resolve());
            }, 2000);
            w.once('exit', () => {
              clearTimeout(timer);
              resolve();
            });
          }),
      ),
    );
    for (const port of this.ports) port.close();
  }
}

/** Start `workers` persistent worker threads (resolved once every one is ready). */
export async function createDynamicsPool(options: DynamicsPoolOptions): Promise<DynamicsPool> {
  if (!Number.isInteger(options.workers) || options.workers < 1) throw new RangeError(`workers: expected an integer >= 1, got ${options.workers}`);
  const pool = new WorkerPool(options.workers);
  const url = options.filename ?? new URL('./dynamicsWorker.js', import.meta.url).href;
  const ready: Array<Promise<void>> = [];
  for (let index = 0; index < options.workers; index++) {
    const channel = new MessageChannel();
    const worker = new Worker(new URL(url), {
      workerData: { control: pool.control, parameters: pool.parameters, results: pool.results, index, port: channel.port2 },
      transferList: [channel.port2],
      ...(options.execArgv ? { execArgv: options.execArgv } : {}),
    });
    pool.threads.push(worker);
    pool.ports.push(channel.port1);
    ready.push(
      new Promise<void>((resolve, reject) => {
        worker.once('message', () => resolve());
        worker.once('error', (err) => reject(err));
      }),
    );
    worker.on('error', (err) => {
      pool.failure ??= err instanceof Error ? err.message : String(err);
    });
    worker.on('exit', (code) => {
      if (!pool.destroyed) pool.failure ??= `worker ${index} stopped (exit code ${code})`;
    });
  }
  try {
    await Promise.all(ready);
    // A pool that is never destroyed must not keep the process alive.
    for (const worker of pool.threads) worker.unref();
  } catch (err) {
    await pool.destroy();
    throw new Error(`the dynamics worker threads did not start: ${err instanceof Error ? err.message : String(err)}`);
  }
  return pool;
}

/** Contiguous, nearly equal site ranges. */
function siteRanges(siteCount: number, parts: number): Array<[number, number]> {
  const ranges: Array<[number, number]> = [];
  for (let k = 0; k < parts; k++) ranges.push([Math.floor((k * siteCount) / parts), Math.floor(((k + 1) * siteCount) / parts)]);
  return ranges;
}

/** A runner on `frame` (from shareFrame) using the calling thread and every worker of `pool`. */
export function createParallelRunner(frame: DynamicsFrame, pool: DynamicsPool): DynamicsRunner {
  if (!(pool instanceof WorkerPool)) throw new RangeError('pool: expected a pool from createDynamicsPool');
  const p = pool;
  const frameArrays = [frame.eps, frame.hopScale, frame.hopUniform, frame.sqrtN, frame.interactionArray, ...frame.hopArrays];
  if (!frameArrays.every(isShared)) throw new RangeError('frame: its arrays must live on shared memory; pass shareFrame(frame)');
  const n = frame.siteCount;
  const width = 2 * frame.states;
  const parts = Math.min(p.workers + 1, n);
  const ranges = siteRanges(n, p.workers + 1);
  const [s0, s1] = ranges[0];
  const fields = createMeanFieldArrays(n);
  const { phiRe, phiIm, psiRe, psiIm } = fields;
  const work = createExponentialWorkspace(frame.nmax);
  const runnerId = ++p.runnerCount;
  const c = p.control;
  const prm = p.parameters;

  const bind = (): void => {
    if (p.boundRunner === runnerId) return;
    p.ports.forEach((port, w) => {
      const [start, end] = ranges[w + 1];
      const message: FrameLayoutMessage = {
        type: 'bind',
        runnerId,
        dims: frame.dims,
        inner: [...frame.inner] as [number, number, number],
        innerPeriodic: [...frame.innerPeriodic] as [boolean, boolean, boolean],
        nmax: frame.nmax,
        siteCount: n,
        hopArrays: frame.hopArrays as [Float64Array | null, Float64Array | null, Float64Array | null],
        hopUniform: frame.hopUniform,
        hopScale: frame.hopScale,
        interactionArray: frame.interactionArray,
        eps: frame.eps,
        sqrtN: frame.sqrtN,
        phiRe,
        phiIm,
        psiRe,
        psiIm,
        siteStart: start,
        siteEnd: end,
      };
      port.postMessage(message);
    });
    p.boundRunner = runnerId;
  };
  /** Frame scalars and array ids for the next pass. */
  const prepare = (ids: { out?: Float64Array; y?: Float64Array; y1?: Float64Array }, stages?: readonly Float64Array[], count = 0): void => {
    bind();
    prm[Parameter.INTERACTION_U] = frame.interactionU;
    prm[Parameter.INTERACTION_SCALE] = frame.interactionScale;
    prm[Parameter.MU] = frame.mu;
    prm[Parameter.RATE] = frame.rate;
    if (ids.out) c[Control.OUT] = p.idOf(ids.out, 'out');
    if (ids.y) c[Control.Y] = p.idOf(ids.y, 'y');
    if (ids.y1) c[Control.Y1] = p.idOf(ids.y1, 'y1');
    c[Control.COUNT] = count;
    for (let j = 0; j < count; j++) c[Control.STAGES + j] = p.idOf((stages as readonly Float64Array[])[j], `stages[${j}]`);
  };
  const setCoefficients = (coefficients: Float64Array, count: number): void => {
    for (let j = 0; j < 7; j++) prm[Parameter.COEFFICIENTS + j] = j < count ? coefficients[j] : 0;
  };
  const orderParameter = async (y: Float64Array): Promise<void> => {
    prepare({ y });
    await p.pass(Op.ORDER_PARAMETER, () => {
      orderParameterRange(y, frame.states, frame.sqrtN, phiRe, phiIm, s0, s1);
      return 0;
    });
  };

  return {
    threads: parts,
    frame,
    ...fields,
    async derivative(y, out) {
      await orderParameter(y);
      prepare({ y, out });
      await p.pass(Op.HAMILTONIAN_ACTION, () => {
        meanFieldRange(frame, phiRe, phiIm, psiRe, psiIm, -1, s0, s1);
        hamiltonianActionRange(frame, y, psiRe, psiIm, out, s0, s1);
        return 0;
      });
    },
    async meanFields(y) {
      await orderParameter(y);
      prepare({});
      await p.pass(Op.MEAN_FIELD, () => {
        meanFieldRange(frame, phiRe, phiIm, psiRe, psiIm, -1, s0, s1);
        return 0;
      });
    },
    async combine(out, y, h, coefficients, stages, count) {
      prepare({ out, y }, stages, count);
      prm[Parameter.H] = h;
      setCoefficients(coefficients, count);
      await p.pass(Op.COMBINE, () => {
        combineRange(out, y, h, coefficients, stages, count, s0 * width, s1 * width);
        return 0;
      });
    },
    async errorNorm(y0, y1, h, errorWeights, stages, count, atol, rtol) {
      prepare({ y: y0, y1 }, stages, count);
      prm[Parameter.H] = h;
      prm[Parameter.ATOL] = atol;
      prm[Parameter.RTOL] = rtol;
      setCoefficients(errorWeights, count);
      return p.pass(Op.ERROR_NORM, () => errorNormRange(y0, y1, h, errorWeights, stages, count, atol, rtol, s0 * width, s1 * width));
    },
    async scaledMax(v, y, atol, rtol) {
      prepare({ out: v, y });
      prm[Parameter.ATOL] = atol;
      prm[Parameter.RTOL] = rtol;
      return p.pass(Op.SCALED_MAX, () => scaledMaxRange(v, y, atol, rtol, s0 * width, s1 * width));
    },
    async propagateColour(y, colour, tau) {
      await orderParameter(y);
      prepare({ y });
      c[Control.COLOUR] = colour;
      prm[Parameter.TAU] = tau;
      await p.pass(Op.PROPAGATE_COLOUR, () => {
        meanFieldRange(frame, phiRe, phiIm, psiRe, psiIm, colour, s0, s1);
        propagateColourRange(frame, y, psiRe, psiIm, colour, tau, work, s0, s1);
        return 0;
      });
    },
  };
}
