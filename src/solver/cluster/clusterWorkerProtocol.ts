// Messages between the cluster executor and its worker threads, and the lattice model a
// worker rebuilds from the shared solver state (the same doubles the caller's model holds:
// createSolverState copies eps, U and J into the state).

import { createLatticeGeometry } from '../../lattice/latticeGeometry.js';
import type { LatticeModel } from '../../lattice/latticeModel.js';
import type { SolverLayout, SolverState } from '../solverState.js';

export interface ClusterAttach {
  type: 'attach';
  layout: SolverLayout;
  shape: number[];
  periodic: boolean[];
  cluster: number[];
  warmStartBytes: number;
  /** threads sharing the clusters, the calling thread (share 0) included */
  shares: number;
  bondCorrelation: SharedArrayBuffer[];
  bondExact: SharedArrayBuffer[];
}

export type ClusterCommand =
  | ClusterAttach
  | { type: 'colour'; colour: number; mu: number; temperature: number; looseTolerance: number }
  | { type: 'measure'; mu: number; temperature: number }
  | { type: 'statistics' };

export type ClusterWorkerReply =
  | { type: 'done'; value: number }
  | { type: 'statistics'; matvecs: number; maxTruncationWeight: number; clusterSolvesConverged: boolean }
  | { type: 'failed'; message: string };

/** The model whose arrays are the state's own (physical axes: the last `dims` internal ones). */
export function modelOfState(state: SolverState, shape: readonly number[], periodic: readonly boolean[]): LatticeModel {
  const f = state.fields;
  const pad = 3 - shape.length;
  return {
    geometry: createLatticeGeometry(shape, periodic),
    nmax: f.nmax,
    eps: f.eps,
    interactionU: f.interactionArray ?? f.interactionU,
    hopping: shape.map((_, d) => f.hopArrays[pad + d] ?? f.hopUniform[pad + d]),
  };
}
