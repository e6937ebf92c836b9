// The ensemble a command describes, checked before any work: the scenario must have a
// disorder block, the longest realisation seed must still be a valid scenario, and the
// blocks (all, or one shard's), the histogram bins and how the threads are used follow
// from the option values. Also what the progress lines count (realisations to run, blocks
// complete after the first `done` of them).

import type { PreparedScenario } from '../prepareScenario.js';
import { PARALLEL_MIN_SITES } from '../solveScenario.js';
import { landscapeFileHashes, scenarioHash } from '../../scenario/scenarioHash.js';
import { InputError } from '../../scenario/inputError.js';
import type { Scenario } from '../../scenario/scenarioSchema.js';
import { blockRange, planBlocks, shardBlocks, type BlockPlan } from './blockPlan.js';
import { histogramBins, type HistogramBins } from './histogramBins.js';
import type { ParallelMode } from './runEnsemble.js';
import { ensembleContextOf, realisationScenario, type EnsembleContext } from './solveRealisation.js';

/** Realisations per block unless --block-size says otherwise. */
export const DEFAULT_BLOCK_SIZE = 4;

export interface EnsembleSetup {
  /** what fixes the bits of the result (src/output/ensembleShard.ts's EnsembleIdentity) */
  identity: { scenario: Scenario; scenarioHash: string; baseSeed: string; plan: BlockPlan; bins: HistogramBins; context: EnsembleContext };
  /** blocks this process runs, in order */
  blocks: number[];
  parallelOver: ParallelMode;
  siteCount: number;
  /** realisations in those blocks */
  toRun: number;
}

export interface EnsembleChoices {
  realisations: number;
  blockSize: number;
  binsPerAtom: number;
  /** this process's shard, or null for a complete run */
  shard: { index: number; count: number } | null;
  /** --parallel-over: 'auto' chooses by the lattice's size */
  parallelOver: 'auto' | ParallelMode;
}

export function ensembleSetup(prepared: PreparedScenario, o: EnsembleChoices): EnsembleSetup {
  const { scenario, raw, resolved } = prepared;
  if (!scenario.disorder) {
    throw new InputError(
      'disorder: the scenario has no disorder block, so every realisation would be the same; add one, ' +
        'e.g. "disorder": {"kind": "box", "width": 0.5, "seed": "run1"} (configs/speckle-layer-ensemble.json has a speckle example)',
    );
  }
  const baseSeed = scenario.disorder.seed;
  // The longest seed is the last one; the schema bounds its length.
  realisationScenario(raw, baseSeed, o.realisations - 1);
  const plan = planBlocks(o.realisations, o.blockSize);
  const bins = histogramBins(scenario.truncation.nmax, o.binsPerAtom);
  const blocks = o.shard ? shardBlocks(plan, o.shard.index, o.shard.count) : Array.from({ length: plan.blockCount }, (_, b) => b);
  const siteCount = resolved.geometry.siteCount;
  return {
    identity: { scenario, scenarioHash: scenarioHash(scenario, 'whole', landscapeFileHashes(resolved)), baseSeed, plan, bins, context: ensembleContextOf(resolved) },
    blocks,
    parallelOver: o.parallelOver === 'auto' ? (siteCount < PARALLEL_MIN_SITES ? 'realisations' : 'lattice') : o.parallelOver,
    siteCount,
    toRun: blocks.reduce((n, b) => n + blockRange(plan, b).count, 0),
  };
}

/** How many of `blocks` are complete once the first `done` of their realisations are (they run in block order). */
export function blocksCompleted(plan: BlockPlan, blocks: readonly number[], done: number): number {
  let complete = 0;
  let seen = 0;
  for (const b of blocks) {
    seen += blockRange(plan, b).count;
    if (seen <= done) complete++;
  }
  return complete;
}
