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
// Every cluster is solved from its own inputs and its own warm vector in a fixed order, so
// results depend on nothing but the model and the start.

import type { LatticeModel } from '../../lattice/latticeModel.js';
import type { SolverState } from '../solverState.js';
import type { SweepExecutor } from '../sweepExecutor.js';
import type { ExecutorFactory } from '../runLattice.js';
import { createClusterDriver, type ClusterDriver, type ClusterDriverOptions } from './clusterLattice.js';

/** Lets signals and timers run between sweeps (a macrotask turn). */
const yieldToEventLoop = (): Promise<void> => new Promise((resolve) => setImmediate(resolve));

export interface ClusterSweepExecutor extends SweepExecutor {
  readonly driver: ClusterDriver;
  /** after `measure`: <b_i^+ b_j> per physical axis at the bond's storage site (NaN where there is no bond) */
  readonly bondCorrelation: Float64Array[];
  /** 1 where the bond lies inside a cluster (its correlation is exact) */
  readonly bondExact: Uint8Array[];
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
  const stats = e.driver.statistics();
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

export function createClusterSweepExecutor(state: SolverState, model: LatticeModel, options: ClusterDriverOptions): ClusterSweepExecutor {
  if (model.nmax !== state.layout.nmax) throw new Error(`cluster executor: the model has nmax ${model.nmax}, the state ${state.layout.nmax}`);
  const driver = createClusterDriver(model, state.fields.phi, options);
  const n = model.geometry.siteCount;
  const dims = model.geometry.dims;
  const bondCorrelation = Array.from({ length: dims }, () => new Float64Array(n).fill(NaN));
  const bondExact = Array.from({ length: dims }, () => new Uint8Array(n));
  const delta = state.fields.delta;
  return {
    threads: 1,
    kernel: 'js',
    driver,
    bondCorrelation,
    bondExact,
    sweep: async (colour, mu, temperature) => {
      if (colour !== 0) return 0;
      const change = driver.sweep(mu, temperature, delta);
      await yieldToEventLoop();
      return change;
    },
    measure: async (mu, temperature) => {
      const m = state.measure;
      driver.measure(mu, temperature, { ...m, bondCorrelation, bondExact });
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
export function clusterExecutorFactory(cluster: readonly number[] | undefined): ExecutorFactory | null {
  if (!isClusterShape(cluster)) return null;
  const shape = [...cluster];
  return (state, model) => createClusterSweepExecutor(state, model, { cluster: shape });
}
