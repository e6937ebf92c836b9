// What `tiercake progress DIR` reads, from the folder alone (no scheduler accounting): for
// a `tiercake submit` folder its record (submission.ts), the sbatch submissions, the state
// of every shard (shardProgress.ts) and whether the merged result is there; for a folder
// that collects shards (the --out of `ensemble --shard` / `scan --shard`, or its shards/
// subfolder), the state of the shards of every shard count K its names show, compared
// with the first complete shard's scenario.

import { existsSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { InputError } from '../scenario/inputError.js';
import { readMarker } from './outputMarker.js';
import { firstShardExpectation, shardCountsIn, shardStates, type ShardState } from './shardProgress.js';
import { readJobRecords, readSubmission, type JobRecord, type Submission } from './submission.js';

export type BatchProgress =
  | {
      kind: 'submission';
      /** the folder, absolute */
      dir: string;
      submission: Submission;
      /** where the shards are (the recorded folder, or shards/ when the folder was moved) */
      shardDir: string;
      jobs: JobRecord[];
      states: ShardState[];
      /** the merged result's marker time, or null when it is not there (or of other work) */
      mergedIso: string | null;
    }
  | { kind: 'shards'; shardDir: string; sets: Array<{ count: number; states: ShardState[] }> };

export function readBatchProgress(dirGiven: string): BatchProgress {
  const dir = resolve(dirGiven);
  if (!existsSync(dir)) throw new InputError(`progress ${dirGiven}: no such folder; give the --out folder of \`tiercake submit\` (or the folder that collects shards)`);
  const sub = readSubmission(dir, 'progress');
  if (sub !== null) {
    const shardDir = existsSync(sub.shardDir) ? sub.shardDir : join(dir, 'shards');
    const states = shardStates(shardDir, sub.shards, { scenarioHash: sub.scenarioHash, scanHash: sub.scanHash, ensemble: sub.ensemble });
    const jobs = readJobRecords(dir);
    const marker = existsSync(sub.resultDir) ? readMarker(sub.resultDir) : null;
    const merged = marker !== null && !('error' in marker) && marker.command === 'merge' && marker.scenarioHash === sub.scenarioHash;
    return { kind: 'submission', dir, submission: sub, shardDir, jobs, states, mergedIso: merged ? marker.createdIso : null };
  }
  const shardDir = shardCountsIn(dir).length > 0 ? dir : join(dir, 'shards');
  const counts = shardCountsIn(shardDir);
  if (counts.length === 0) throw new InputError(`progress ${dirGiven}: holds no submission (submit.json) and no shard folders (shard-k-of-K); is this the right folder?`);
  return { kind: 'shards', shardDir, sets: counts.map((count) => ({ count, states: shardStates(shardDir, count, firstShardExpectation(shardDir, count)) })) };
}
