// Where a command writes when --out is not given: every default folder name in one place,
// so that `merge` finds the names `ensemble` and `scan` use, and a sharded run's folders
// (one per shard, inside the folder that collects them).

import { join } from 'node:path';
import { shardFolderName } from './shardSet.js';

/** What a command writes, by the folder name's suffix. */
export type OutputKind = 'solve' | 'evolve' | 'ensemble' | 'ensemble shards' | 'scan' | 'scan shards' | 'submission';

const SUFFIX: Record<OutputKind, string> = {
  solve: '',
  evolve: '-evolve',
  ensemble: '-ensemble',
  'ensemble shards': '-shards',
  scan: '-scan',
  'scan shards': '-scan-shards',
  submission: '-cluster',
};

/** The default output folder, relative to the working folder: out/<scenario name><suffix>. */
export function defaultOutputFolder(kind: OutputKind, scenarioName: string): string {
  return `out/${scenarioName}${SUFFIX[kind]}`;
}

/**
 * The folder a run of an ensemble or scan writes into: `given` itself for a complete run,
 * the shard's own folder inside `given` (the folder that collects the shards) for a shard.
 */
export function runOutputFolder(given: string, shard: { index: number; count: number } | null): string {
  return shard ? join(given, shardFolderName(shard)) : given;
}
