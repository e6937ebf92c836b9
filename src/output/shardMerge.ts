// The work of `tiercake merge`: find the shard folders among the paths given, tell scan
// shards from ensemble shards, check that they are one run's complete set (shardSet.ts,
// scanShard.ts: refused with an input error naming what differs or what is missing), and
// write the result a single run writes (batchResults.ts) into the folder `target` chooses
// from the default name of that result (defaultOutputFolders.ts).

import { writeEnsembleResult, writeScanResult } from './batchResults.js';
import { defaultOutputFolder } from './defaultOutputFolders.js';
import { mergedEnsembleOutcome } from './ensembleMerge.js';
import type { EnsembleOutcome } from './ensembleOutputs.js';
import { findShardFolders, readShardHeader } from './ensembleShard.js';
import type { CommitReport, OutputFolder } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { copyShardKeptPoints, mergedScanOutcome, readScanShards } from './scanShard.js';
import type { ScanOutcome } from './scanOutputs.js';
import { checkShardSet } from './shardSet.js';
import type { BlockPlan } from '../pipeline/ensemble/blockPlan.js';
import { mergeProvenanceLine } from '../report/mergeSummaryLine.js';

export type MergedShards =
  | { kind: 'ensemble'; commit: CommitReport | null; target: OutputTarget; shardCount: number; outcome: EnsembleOutcome; plan: BlockPlan; scenarioName: string }
  | { kind: 'scan'; commit: CommitReport | null; target: OutputTarget; shardCount: number; outcome: ScanOutcome };

/**
 * Merge the shards under `paths` (shard folders, or folders that collect them). `target`
 * gets the default output folder of the merged result (relative, e.g. out/<name>-scan)
 * and returns the checked output folder; it is asked once the shards have been read.
 */
export async function mergeShards(paths: readonly string[], target: (defaultFolder: string) => OutputTarget): Promise<MergedShards> {
  const folders = findShardFolders(paths);
  const scanShards = readScanShards(folders);
  if (scanShards !== null) {
    const outcome = mergedScanOutcome(scanShards);
    const chosen = target(defaultOutputFolder('scan', scanShards[0].header.scenarioName));
    const line = mergeProvenanceLine('scan ', scanShards.map((s) => ({ units: s.header.chains.length, seconds: s.header.run.seconds })));
    const points = outcome.keepPoints ? (folder: OutputFolder): void => copyShardKeptPoints(folder, scanShards, outcome.plan) : null;
    const commit = await writeScanResult(chosen, 'merge', outcome, line, points);
    return { kind: 'scan', commit, target: chosen, shardCount: scanShards.length, outcome };
  }
  const shards = folders.map(readShardHeader);
  const plan = checkShardSet(shards);
  const scenarioName = shards[0].header.scenarioName;
  const chosen = target(defaultOutputFolder('ensemble', scenarioName));
  const outcome = mergedEnsembleOutcome(shards, plan);
  const line = mergeProvenanceLine('', shards.map((s) => ({ units: s.header.blocks.length, seconds: s.header.run.seconds })));
  const commit = await writeEnsembleResult(chosen, 'merge', outcome, line);
  return { kind: 'ensemble', commit, target: chosen, shardCount: shards.length, outcome, plan, scenarioName };
}
