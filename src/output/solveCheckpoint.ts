// The checkpoint of an interrupted `solve` (checkpoint.ts holds the format): what the stopped
// run reached, with the sweeps of every earlier resumed part counted in.

import type { SolveArtifacts } from '../pipeline/solveScenario.js';
import { landscapeFileHashes } from '../scenario/scenarioHash.js';
import { checkpointHash, writeCheckpoint, type Checkpoint } from './checkpoint.js';

/** The checkpoint of a stopped solve; `sweepsBefore` are the sweeps of the checkpoint it resumed from (0 for a fresh run). */
export function checkpointOfSolve(artifacts: Pick<SolveArtifacts, 'outcome' | 'scenario' | 'resolved'>, sweepsBefore: number): Checkpoint {
  const outcome = artifacts.outcome;
  return {
    scenarioHash: checkpointHash(artifacts.scenario, landscapeFileHashes(artifacts.resolved)),
    mu: outcome.solve.mu,
    temperature: outcome.temperature,
    nmax: outcome.model.nmax,
    sweepsDone: outcome.totalSweeps + sweepsBefore,
    phi: Float64Array.from(outcome.state.fields.phi),
    shape: [...artifacts.resolved.geometry.shape],
  };
}

/** Write the checkpoint of a stopped solve to `path` (refused inside an input of the run). */
export function writeSolveCheckpoint(path: string, artifacts: Pick<SolveArtifacts, 'outcome' | 'scenario' | 'resolved'>, sweepsBefore: number, inputs: readonly string[]): Promise<void> {
  return writeCheckpoint(path, checkpointOfSolve(artifacts, sweepsBefore), inputs);
}
