// The merge of ensemble shards (src/output/ensembleMerge.ts), shards written by the
// running shard's writer (EnsembleShardWriter, src/output/ensembleShard.ts): the merged
// total is, bit for bit, the in-memory total of the same block partials absorbed in block
// order (combineBlocks: what a single run computes), whatever order the shards are given
// in; provenance lists the shards (the ensemble: test/helpers/madeUpEnsemble.ts). A discarded writer leaves nothing behind.
import { existsSync, mkdtempSync, readdirSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { mergedEnsembleOutcome } from '../../src/output/ensembleMerge.js';
import { EnsembleShardWriter, readShardHeader } from '../../src/output/ensembleShard.js';
import { shardBlocks } from '../../src/pipeline/ensemble/blockPlan.js';
import { combineBlocks } from '../../src/pipeline/ensemble/blockPartial.js';
import { madeUpEnsemble } from '../helpers/madeUpEnsemble.js';
import { checkShardSet, shardFolderName } from '../../src/output/shardSet.js';
import { checkOutputTarget } from '../../src/output/outputTarget.js';
import { ensembleStatistics } from '../../src/pipeline/ensemble/ensembleStatistics.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-ensemblemerge-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const { identity, partial } = madeUpEnsemble();
const { plan, bins } = identity;
function writeShard(index: number, count: number): string {
  const writer = new EnsembleShardWriter(checkOutputTarget(join(dir, 'shards', shardFolderName({ index, count })), { option: '--out' }), identity);
  for (const b of shardBlocks(plan, index, count)) writer.add(partial(b));
  expect(writer.records().map((r) => r.index)).toEqual(shardBlocks(plan, index, count).flatMap((b) => [2 * b, 2 * b + 1].filter((r) => r < 7)));
  return writer.commit({ index, count }, { threads: 1, parallelOver: 'realisations', seconds: 1 + index }).path;
}
const bytes = (a: Float64Array): Buffer => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

describe('mergedEnsembleOutcome', () => {
  it('gives the single run\'s total bit for bit, the shards given in any order', () => {
    const paths = [writeShard(2, 3), writeShard(0, 3), writeShard(1, 3)];
    const shards = paths.map(readShardHeader);
    const merged = mergedEnsembleOutcome(shards, checkShardSet(shards));
    const single = combineBlocks([0, 1, 2, 3].map(partial), bins);
    expect(bytes(merged.total.density.mean).equals(bytes(single.density.mean))).toBe(true);
    expect(bytes(merged.total.density.m2).equals(bytes(single.density.m2))).toBe(true);
    expect(bytes(merged.total.condensate.m2).equals(bytes(single.condensate.m2))).toBe(true);
    expect(bytes(merged.total.phaseCounts).equals(bytes(single.phaseCounts))).toBe(true);
    expect(merged.total.records).toEqual(single.records);
    expect(merged.stats).toEqual(ensembleStatistics(single));
    expect(merged.stats.notConverged).toEqual([5]);
    expect(merged.plan).toEqual(plan);
    expect(merged.provenance).toMatchObject({ kind: 'merged shards', shards: [{ shard: '2/3', seconds: 3 }, { shard: '0/3', seconds: 1 }, { shard: '1/3', seconds: 2 }] });
  });

  it('a discarded shard writer leaves no folder', () => {
    const collect = join(dir, 'discarded');
    const writer = new EnsembleShardWriter(checkOutputTarget(join(collect, 'shard-0-of-1'), { option: '--out' }), identity);
    writer.add(partial(0));
    writer.discard();
    expect(existsSync(join(collect, 'shard-0-of-1'))).toBe(false);
    expect(readdirSync(collect)).toEqual([]);
  });
});
