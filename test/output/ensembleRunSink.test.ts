// The sink of an ensemble run (src/output/ensembleRunSink.ts) and the merge of its shards
// (src/output/shardMerge.ts), on the made-up ensemble of test/helpers/madeUpEnsemble.ts
// (7 realisations in 4 blocks of 2, realisation 5 not converged). A complete run's result
// is the statistics of combineBlocks over every block (what a single run computes, taken
// here without the sink); two shard sinks, merged, give the same statistics value for value,
// the merged folder gets the ensemble's default name out/<name>-ensemble; the records are
// in block order; a discarded sink leaves nothing behind; provenance says how it ran.
// Mutation tried: absorbing each block twice in the complete sink: the statistics fail.
import { existsSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { ensembleRunSink } from '../../src/output/ensembleRunSink.js';
import { mergeShards } from '../../src/output/shardMerge.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { runOutputFolder } from '../../src/output/defaultOutputFolders.js';
import { shardBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import { combineBlocks } from '../../src/pipeline/ensemble/blockPartial.js';
import { ensembleStatistics } from '../../src/pipeline/ensemble/ensembleStatistics.js';
import { madeUpEnsemble } from '../helpers/madeUpEnsemble.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-ensemblesink-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const { identity, partial } = madeUpEnsemble();
const { plan, bins } = identity;
const siteCount = 6;
const target = (path: string) => checkOutputTarget(path, { option: '--out' });
const run = { threads: 2, parallelOver: 'realisations' as const, seconds: 1.25 };

describe('ensemble run sink', () => {
  it('a complete run: the statistics of every block combined, in the result folder', async () => {
    const sink = ensembleRunSink(target(join(dir, 'complete')), identity, siteCount, null);
    for (let b = 0; b < plan.blockCount; b++) sink.add(partial(b));
    expect(sink.records().map((r) => r.index)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    const committed = await sink.commit(run, 'one run, by hand');
    if (committed.kind !== 'complete') throw new Error('expected a complete result');
    const expected = ensembleStatistics(combineBlocks(Array.from({ length: plan.blockCount }, (_, b) => partial(b)), bins));
    expect(committed.outcome.stats).toEqual(expected);
    expect(committed.outcome.stats.realisations).toBe(7);
    expect(committed.outcome.provenance).toEqual({ kind: 'single run', threads: 2, parallelOver: 'realisations', seconds: 1.25 });
    const summary = JSON.parse(readFileSync(join(dir, 'complete', 'summary.json'), 'utf8'));
    expect(summary.provenance).toEqual(committed.outcome.provenance);
    expect(readFileSync(join(dir, 'complete', 'report.html'), 'utf8')).toContain('one run, by hand');
  });

  it('two shards merge into the same statistics, under the default name', async () => {
    const collect = join(dir, 'shards');
    for (const index of [1, 0]) {
      const shard = { index, count: 2, source: 'test' };
      const sink = ensembleRunSink(target(runOutputFolder(collect, shard)), identity, siteCount, shard);
      for (const b of shardBlocks(plan, index, 2)) sink.add(partial(b));
      const committed = await sink.commit({ ...run, seconds: 1 + index }, 'not used by a shard');
      if (committed.kind !== 'shard') throw new Error('expected a shard result');
      expect(committed.shard).toBe(shard);
      expect(committed.folder).toBe(join(collect, `shard-${index}-of-2`));
      expect(sink.records().map((r) => r.index)).toEqual(shardBlocks(plan, index, 2).flatMap((b) => [2 * b, 2 * b + 1].filter((r) => r < 7)));
    }
    const asked: string[] = [];
    const merged = await mergeShards([collect], (name) => {
      asked.push(name);
      return target(join(dir, 'merged'));
    });
    expect(asked).toEqual(['out/merge-layer-ensemble']);
    if (merged.kind !== 'ensemble') throw new Error('expected an ensemble merge');
    expect(merged.shardCount).toBe(2);
    expect(merged.scenarioName).toBe('merge-layer');
    const single = ensembleStatistics(combineBlocks(Array.from({ length: plan.blockCount }, (_, b) => partial(b)), bins));
    expect(merged.outcome.stats).toEqual(single);
    expect(existsSync(join(dir, 'merged', 'summary.json'))).toBe(true);
  });

  it('a discarded shard sink leaves nothing behind', () => {
    const path = join(dir, 'discarded', 'shard-0-of-2');
    const sink = ensembleRunSink(target(path), identity, siteCount, { index: 0, count: 2 });
    sink.add(partial(0));
    sink.discard();
    expect(existsSync(path)).toBe(false);
  });
});
