// Where the finished blocks of an `ensemble` run go, and what the run commits at the end.
// A complete run adds each block to the running total and, when done, writes the final
// result (batchResults.ts); a shard writes each block straight into its staging folder
// (ensembleShard.ts) and commits its partial result for `tiercake merge`. Either way only
// one block is held in memory.

import { writeEnsembleResult } from './batchResults.js';
import { EnsembleShardWriter, type EnsembleIdentity } from './ensembleShard.js';
import type { EnsembleOutcome } from './ensembleOutputs.js';
import type { CommitReport } from './outputFolder.js';
import type { OutputTarget } from './outputTarget.js';
import { absorbBlock, createEnsembleTotal, type BlockPartial } from '../pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../pipeline/ensemble/ensembleStatistics.js';
import type { ParallelMode } from '../pipeline/ensemble/runEnsemble.js';
import type { RealisationRecord } from '../pipeline/ensemble/solveRealisation.js';

/** How the run went, as the shard header and summary.json record it. */
export interface EnsembleRunInfo {
  threads: number;
  parallelOver: ParallelMode;
  seconds: number;
}

/** What was committed: a shard's partial result (`shard` as given to the sink), or a complete run's result. */
export type EnsembleCommitted<S> =
  | { kind: 'shard'; commit: CommitReport; folder: string; shard: S }
  | { kind: 'complete'; commit: CommitReport | null; outcome: EnsembleOutcome };

export interface EnsembleRunSink<S> {
  /** take one finished block */
  add(partial: BlockPartial): void;
  /** the records of the realisations taken so far, in block order */
  records(): RealisationRecord[];
  /** drop what was staged (an error or an interruption); nothing is written */
  discard(): void;
  /**
   * Commit the result. `provenanceLine` is the report's line on how a complete run's result
   * was produced (a shard has no report).
   */
  commit(run: EnsembleRunInfo, provenanceLine: string): Promise<EnsembleCommitted<S>>;
}

/** The sink of a run at `target`: a shard's staging folder when `shard` is given, else the running total. */
export function ensembleRunSink<S extends { index: number; count: number }>(target: OutputTarget, identity: EnsembleIdentity, siteCount: number, shard: S | null): EnsembleRunSink<S> {
  if (shard) {
    const writer = new EnsembleShardWriter(target, identity);
    return {
      add: (partial) => writer.add(partial),
      records: () => writer.records(),
      discard: () => writer.discard(),
      commit: async (run) => {
        const commit = writer.commit({ index: shard.index, count: shard.count }, { threads: run.threads, parallelOver: run.parallelOver, seconds: run.seconds });
        return { kind: 'shard', commit, folder: writer.finalPath, shard };
      },
    };
  }
  const total = createEnsembleTotal(siteCount, identity.bins);
  return {
    add: (partial) => absorbBlock(total, partial),
    records: () => total.records,
    discard: () => {},
    commit: async (run, provenanceLine) => {
      const stats = ensembleStatistics(total);
      const provenance = { kind: 'single run', threads: run.threads, parallelOver: run.parallelOver, seconds: run.seconds };
      const outcome: EnsembleOutcome = { ...identity, total, stats, provenance };
      return { kind: 'complete', commit: await writeEnsembleResult(target, 'ensemble', outcome, provenanceLine), outcome };
    },
  };
}
