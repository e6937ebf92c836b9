// The merge of ensemble shards (`tiercake merge`): a set of shards checked by
// checkShardSet (shardSet.ts), read back block by block and absorbed in block order, the same additions
// a single run makes, so the outcome is the single run's bit for bit; only `provenance`
// (the shards, their threads and times) differs.

import { formatBlockList, type BlockPlan } from '../pipeline/ensemble/blockPlan.js';
import { absorbBlock, createEnsembleTotal } from '../pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../pipeline/ensemble/ensembleStatistics.js';
import type { EnsembleContext } from '../pipeline/ensemble/solveRealisation.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { readShardBlock, type LoadedShard } from './ensembleShard.js';
import type { EnsembleOutcome } from './ensembleOutputs.js';

/** `plan`: what checkShardSet (shardSet.ts) returned for these shards. */
export function mergedEnsembleOutcome(shards: readonly LoadedShard[], plan: BlockPlan): EnsembleOutcome {
  const header = shards[0].header;
  const bins = header.bins;
  const entries = shards.flatMap((shard) => shard.header.blocks.map((entry) => ({ shard, entry }))).sort((a, b) => a.entry.block - b.entry.block);
  const total = createEnsembleTotal(header.context.shape.reduce((a, b) => a * b, 1), bins);
  for (const { shard, entry } of entries) absorbBlock(total, readShardBlock(shard, entry));
  return {
    scenario: header.scenario as unknown as Scenario,
    scenarioHash: header.scenarioHash,
    baseSeed: header.baseSeed,
    plan,
    bins,
    context: header.context as EnsembleContext,
    total,
    stats: ensembleStatistics(total),
    provenance: {
      kind: 'merged shards',
      shards: shards.map((s) => ({
        folder: s.path,
        shard: `${s.header.shard.index}/${s.header.shard.count}`,
        blocks: formatBlockList(s.header.blocks.map((b) => b.block)),
        threads: s.header.run.threads,
        parallelOver: s.header.run.parallelOver,
        seconds: s.header.run.seconds,
      })),
    },
  };
}
