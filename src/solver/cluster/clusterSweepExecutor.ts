// The cluster method behind the solver's SweepExecutor interface, so that everything the
// single-site solver does on top of its sweeps (extrapolated relaxation, the fixed-N search
// on mu, the fixed-S search on T, the truncation guard, the compressibility solves,
// checkpoints, warm starts of scans and fits) runs unchanged with clusters.
//
// One call of `sweep(0, ...)` is a whole block Gauss-Seidel pass over every colour of the
// cluster tiling (clusterTiling.ts: 2 or 3 colours); `sweep(1, ...)` does nothing and
// reports no change, because the relaxation calls the two colours of the site lattice in
// turn and takes the larger change. `delta` receives the change of each phi_i, which the
// relaxation's extrapolation step uses as for single sites. `measure` writes the measured
// fields into the solver state, plus the bond correlations <b_i^+ b_j> that only clusters
// give (exact inside a cluster, factorised across the decoupled bonds).
//
// Threads (createClusterWorkers): each colour's clusters are split into contiguous shares,
// share 0 on the calling thread and share w + 1 on worker w (clusterSweepWorker.ts), one
// message round trip per colour. Clusters of one colour never touch, every cluster is
// solved from its own inputs and its own warm vector (kept by the thread that owns it), and
// the loose-residual policy is decided here once for all threads: results are bit-identical
// for any thread count.

import { Worker } from 'node:worker_threads';
import type { LatticeModel } from '../../lattice/latticeModel.js';
import type { ClusterCommand, ClusterWorkerReply } from './clusterWorkerProtocol.js';
import type { SolverState } from '../solverState.js';
import type { SweepExecutor } from '../sweepExecutor.js';
import type { ExecutorFactory } from '../runLattice.js';
import { createClusterDriver, type ClusterDriver, type ClusterDriverOptions } from './clusterLattice.js';
import { runLocalShare } from '../localShare.js';

/** Lets signals and timers run between sweeps (a macrotask turn). */
const yieldToEventLoop = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

export interface ClusterSweepExecutor extends SweepExecutor {
  readonly driver: ClusterDriver;
  /** after `measure`: <b_i^+ b_j> per physical axis at the bond's storage site (NaN where there is no bond) */
  readonly bondCorrelation: Float64Array[];
  /** 1 where the bond lies inside a cluster (its correlation is exact) */
  readonly bondExact: Uint8Array[];
  /** eigen-solver statistics of every thread, as of the last `measure` */
  statistics(): { matvecs: number; maxTruncationWeight: number; clusterSolvesConverged: boolean };
}

/** What a run with clusters reports besides the per-site fields. */
export interface ClusterReading {
  shape: number[];
  clusterCount: number;
  colourCount: number;
  /** Lanczos matrix-vector products over the whole run (0 when every cluster is solved densely) */
  matvecs: number;
  /** T > 0: largest Boltzmann weight of the highest kept cluster state (0 at T = 0 or with dense solves) */
  maxTruncationWeight: number;
  clusterSolvesConverged: boolean;
  bondCorrelation: Float64Array[];
  bondExact: Uint8Array[];
  /**
   * per physical axis, over the bonds inside clusters: the mean of <b_i^+ b_j> and of its
   * connected part <b_i^+ b_j> - phi_i phi_j (the coherence single-site mean field omits);
   * null where the cluster has extent 1 along the axis
   */
  insideBonds: Array<{ bonds: number; meanCorrelation: number; meanConnected: number } | null>;
}

/** The reading of a finished run whose executor is a cluster executor (null otherwise). */
export function clusterReadingOf(executor: SweepExecutor, phi: Float64Array): ClusterReading | null {
  if (!('driver' in executor)) return null;
  const e = executor as ClusterSweepExecutor;
  const t = e.driver.tiling;
  const stats = e.statistics();
  const dims = t.latticeShape.length;
  const strides = t.latticeShape.map((_, d) => t.latticeShape.slice(d + 1).reduce((a, b) => a * b, 1));
  const insideBonds = Array.from({ length: dims }, (_, d) => {
    if (t.clusterShape[d] === 1) return null;
    let bonds = 0;
    let sum = 0;
    let connected = 0;
    for (let i = 0; i < phi.length; i++) {
      if (e.bondExact[d][i] !== 1) continue;
      const j = neighbourAlong(i, d, t.latticeShape, strides);
      bonds++;
      sum += e.bondCorrelation[d][i];
      connected += e.bondCorrelation[d][i] - phi[i] * phi[j];
    }
    return bonds === 0 ? null : { bonds, meanCorrelation: sum / bonds, meanConnected: connected / bonds };
  });
  return {
    shape: [...t.clusterShape],
    clusterCount: t.clusterCount,
    colourCount: t.colourCount,
    matvecs: stats.matvecs,
    maxTruncationWeight: stats.maxTruncationWeight,
    clusterSolvesConverged: stats.clusterSolvesConverged,
    bondCorrelation: e.bondCorrelation,
    bondExact: e.bondExact,
    insideBonds,
  };
}

/** The site one step up along axis d (periodic wrap; bonds inside a cluster never wrap). */
function neighbourAlong(i: number, d: number, shape: readonly number[], strides: readonly number[]): number {
  const x = Math.floor(i / strides[d]) % shape[d];
  return x + 1 < shape[d] ? i + strides[d] : i - x * strides[d];
}

/** Worker threads of the cluster method, kept by the caller for a whole run (destroy at the end). */
export interface ClusterWorkers {
  readonly count: number;
  destroy(): Promise<void>;
}

interface WorkerHandle {
  worker: Worker;
  pending: Array<{ resolve: (r: ClusterWorkerReply) => void; reject: (e: Error) => void }>;
  dead: Error | null;
}

interface WorkersInternals extends ClusterWorkers {
  handles: WorkerHandle[];
  call(w: number, message: ClusterCommand): Promise<ClusterWorkerReply>;
}

/** Where the worker module lives (tests pass the TypeScript source and a loader). */
export interface ClusterWorkerModule {
  filename?: string;
  execArgv?: string[];
}

export function createClusterWorkers(count: number, module: ClusterWorkerModule = {}): ClusterWorkers {
  const url = new URL(module.filename ?? new URL('./clusterSweepWorker.js', import.meta.url).href);
  const handles: WorkerHandle[] = [];
  for (let w = 0; w < count; w++) {
    const worker = new Worker(url, { workerData: { index: w }, ...(module.execArgv ? { execArgv: module.execArgv } : {}) });
    const handle: WorkerHandle = { worker, pending: [], dead: null };
    const fail = (err: Error): void => {
      handle.dead = err;
      for (const p of handle.pending.splice(0)) p.reject(err);
    };
    worker.on('message', (reply: ClusterWorkerReply) => {
      handle.pending.shift()?.resolve(reply);
      if (handle.pending.length === 0) worker.unref();
    });
    worker.on('error', (err) => fail(err instanceof Error ? err : new Error(String(err))));
    worker.on('exit', (code) => fail(new Error(`a cluster worker thread exited (code ${code})`)));
    // Referenced only while a reply is awaited: an idle pool never keeps the process alive,
    // and a pending reply always does.
    worker.unref();
    handles.push(handle);
  }
  const internals: WorkersInternals = {
    count,
    handles,
    call(w, message) {
      const h = handles[w];
      if (h.dead !== null) return Promise.reject(new Error(`a cluster worker thread failed: ${h.dead.message}`));
      return new Promise((resolve, reject) => {
        h.pending.push({ resolve, reject });
        h.worker.ref();
        h.worker.postMessage(message);
      });
    },
    async destroy() {
      await Promise.all(handles.map((h) => (h.dead === null ? h.worker.terminate() : 0)));
    },
  };
  return internals;
}

export function createClusterSweepExecutor(
  state: SolverState,
  model: LatticeModel,
  options: ClusterDriverOptions,
  workers: ClusterWorkers | null = null,
): ClusterSweepExecutor {
  if (model.nmax !== state.layout.nmax) throw new Error(`cluster executor: the model has nmax ${model.nmax}, the state ${state.layout.nmax}`);
  const warmStartBytes = options.warmStartBytes ?? 256 * 1024 * 1024;
  const driver = createClusterDriver(model, state.fields.phi, { ...options, warmStartBytes });
  const n = model.geometry.siteCount;
  const dims = model.geometry.dims;
  const delta = state.fields.delta;
  const pool = workers as WorkersInternals | null;
  // More threads than clusters in a colour would only idle.
  let smallestColour = Infinity;
  for (let c = 0; c < driver.tiling.colourCount; c++) smallestColour = Math.min(smallestColour, driver.tiling.colourStart[c + 1] - driver.tiling.colourStart[c]);
  const workerCount = pool === null ? 0 : Math.max(0, Math.min(pool.count, smallestColour - 1));
  const shared = (bytes: number) => (workerCount > 0 ? new SharedArrayBuffer(bytes) : new ArrayBuffer(bytes));
  const correlationBuffers = Array.from({ length: dims }, () => shared(8 * n));
  const exactBuffers = Array.from({ length: dims }, () => shared(n));
  const bondCorrelation = correlationBuffers.map((b) => new Float64Array(b).fill(NaN));
  const bondExact = exactBuffers.map((b) => new Uint8Array(b));
  const targets = { ...state.measure, bondCorrelation, bondExact };

  // Statistics of the last measurement (driver.statistics() only reads counters), and what
  // the single-threaded and the parallel executor report alike.
  let stats = driver.statistics();
  const common = { kernel: 'js' as const, driver, bondCorrelation, bondExact, statistics: () => stats };

  if (workerCount === 0 || pool === null) {
    return {
      threads: 1,
      ...common,
      sweep: async (colour, mu, temperature) => {
        if (colour !== 0) return 0;
        const change = driver.sweep(mu, temperature, delta);
        await yieldToEventLoop();
        return change;
      },
      measure: async (mu, temperature) => {
        driver.measure(mu, temperature, targets);
        stats = driver.statistics();
      },
    };
  }

  // Parallel: share 0 on the calling thread, share w + 1 on worker w, one colour at a time.
  const shares = workerCount + 1;
  const mine = { index: 0, count: shares };
  const attached = Promise.all(
    Array.from({ length: workerCount }, (_, w) =>
      pool.call(w, {
        type: 'attach',
        layout: state.layout,
        shape: [...model.geometry.shape],
        periodic: [...model.geometry.periodic],
        cluster: [...options.cluster],
        warmStartBytes,
        shares,
        bondCorrelation: correlationBuffers as SharedArrayBuffer[],
        bondExact: exactBuffers as SharedArrayBuffer[],
      }),
    ),
  );
  const valueOf = (r: ClusterWorkerReply): number => {
    if (r.type === 'failed') throw new Error(`a cluster worker thread failed: ${r.message}`);
    return r.type === 'done' ? r.value : 0;
  };
  /** Run one command on every worker and `local` on this thread; the largest value (NaN wins). */
  const everywhere = async (message: ClusterCommand, local: () => number): Promise<number> => {
    for (const r of await attached) valueOf(r);
    const replies = Array.from({ length: workerCount }, (_, w) => pool.call(w, message));
    // worker failures (valueOf throws) first, then an error of the local share
    const results = await runLocalShare(local, async () => (await Promise.all(replies)).map(valueOf));
    let value = results.local;
    for (const v of results.workers) value = v !== v || value !== value ? NaN : Math.max(value, v);
    return value;
  };
  // The loose-residual policy of the single-threaded sweep, kept here once for all threads.
  let at: [number, number] = [NaN, NaN];
  let loose = 0;
  return {
    threads: shares,
    ...common,
    sweep: async (colour, mu, temperature) => {
      if (colour !== 0) return 0;
      if (mu !== at[0] || temperature !== at[1]) {
        at = [mu, temperature];
        loose = 0;
      }
      let change = 0;
      for (let c = 0; c < driver.tiling.colourCount; c++) {
        const v = await everywhere({ type: 'colour', colour: c, mu, temperature, looseTolerance: loose }, () =>
          driver.sweepColour(c, mu, temperature, loose, delta, mine),
        );
        change = v !== v || change !== change ? NaN : Math.max(change, v);
      }
      if (change === change) loose = driver.looseToleranceAfter(change);
      return change;
    },
    measure: async (mu, temperature) => {
      if (mu !== at[0] || temperature !== at[1]) at = [mu, temperature];
      for (const b of bondCorrelation) b.fill(NaN);
      for (const b of bondExact) b.fill(0);
      await everywhere({ type: 'measure', mu, temperature }, () => {
        driver.measure(mu, temperature, targets, mine);
        return 0;
      });
      loose = 0;
      const own = driver.statistics();
      const theirs = await Promise.all(Array.from({ length: workerCount }, (_, w) => pool.call(w, { type: 'statistics' })));
      stats = { ...own };
      for (const r of theirs) {
        if (r.type !== 'statistics') continue;
        stats.matvecs += r.matvecs;
        stats.maxTruncationWeight = Math.max(stats.maxTruncationWeight, r.maxTruncationWeight);
        stats.clusterSolvesConverged &&= r.clusterSolvesConverged;
      }
    },
  };
}

/** True when a cluster shape asks for more than single sites. */
export function isClusterShape(cluster: readonly number[] | undefined): cluster is readonly number[] {
  return cluster !== undefined && cluster.some((c) => c > 1);
}

/**
 * The executor factory of the cluster method for a cluster shape, or null when the shape
 * is absent or all 1 (the single-site solver, its own kernels and threads, bit for bit).
 */
export function clusterExecutorFactory(cluster: readonly number[] | undefined, workers: ClusterWorkers | null = null): ExecutorFactory | null {
  if (!isClusterShape(cluster)) return null;
  const shape = [...cluster];
  return (state, model) => createClusterSweepExecutor(state, model, { cluster: shape }, workers);
}
