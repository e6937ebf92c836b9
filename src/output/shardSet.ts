// Which shards `tiercake merge` may combine: the same tool version, scenario (hash),
// realisation count, block size and histogram bins, and together every block of the
// ensemble exactly once, each block holding its realisations in order. Every refusal is an
// InputError naming the shards (and the missing or duplicated blocks) and what to do.

import { resolve } from 'node:path';
import { blockCoverage, formatBlockList, planBlocks, shardBlocks } from '../pipeline/ensemble/blockPlan.js';
import { InputError } from '../scenario/inputError.js';
import type { LoadedShard } from './ensembleShard.js';

/** Folder name of shard k of K inside the collecting folder: shard-03-of-16. */
export function shardFolderName(shard: { index: number; count: number }): string {
  const width = String(shard.count - 1).length;
  return `shard-${String(shard.index).padStart(width, '0')}-of-${shard.count}`;
}

/** The fields that must agree between shards, with how to describe them. */
const identityChecks: Array<{ what: string; of: (s: LoadedShard) => unknown; fix: string }> = [
  { what: 'tiercake version', of: (s) => s.header.tool.version, fix: 'run every shard with the same tiercake version' },
  { what: 'scenario (SHA-256 of the scenario as run)', of: (s) => s.header.scenarioHash, fix: 'merge only shards of the same scenario file with the same --set overrides' },
  { what: 'realisation count', of: (s) => s.header.realisations, fix: 'give every shard the same --realisations' },
  { what: 'block size', of: (s) => s.header.blockSize, fix: 'give every shard the same --block-size' },
  { what: 'histogram bins', of: (s) => JSON.stringify(s.header.bins), fix: 'give every shard the same --bins-per-atom' },
];

function describe(s: LoadedShard): string {
  return `${JSON.stringify(s.path)} (shard ${s.header.shard.index} of ${s.header.shard.count})`;
}

/** Which shard of which K-shard split would hold `block` (for the message about missing blocks). */
function ownerHint(block: number, shards: readonly LoadedShard[], plan: ReturnType<typeof planBlocks>): string {
  const counts = [...new Set(shards.map((s) => s.header.shard.count))];
  const hints = counts.map((k) => {
    for (let i = 0; i < k; i++) if (shardBlocks(plan, i, k).includes(block)) return `shard ${i} of ${k} (folder ${shardFolderName({ index: i, count: k })})`;
    return '';
  });
  return hints.filter((h) => h.length > 0).join(' or ');
}

/** "block 3 is" or "blocks 3-5, 8 are". */
function blocksAre(blocks: readonly number[]): string {
  return blocks.length === 1 ? `block ${blocks[0]} is` : `blocks ${formatBlockList(blocks)} are`;
}

export function checkShardSet(shards: readonly LoadedShard[]): ReturnType<typeof planBlocks> {
  const first = shards[0];
  for (const check of identityChecks) {
    const expected = check.of(first);
    const other = shards.find((s) => check.of(s) !== expected);
    if (other) {
      throw new InputError(
        `merge: the shards belong to different ensembles: ${check.what} is ${JSON.stringify(check.of(first))} in ${describe(first)} ` +
          `but ${JSON.stringify(check.of(other))} in ${describe(other)}; ${check.fix}`,
      );
    }
  }
  const plan = planBlocks(first.header.realisations, first.header.blockSize);
  if (plan.blockCount !== first.header.blockCount) {
    throw new InputError(`merge ${describe(first)}: header says ${first.header.blockCount} blocks, but ${plan.realisations} realisations in blocks of ${plan.blockSize} make ${plan.blockCount}`);
  }
  const seenFolders = new Map<string, string>();
  for (const s of shards) {
    const key = resolve(s.path);
    if (seenFolders.has(key)) throw new InputError(`merge: the shard folder ${JSON.stringify(s.path)} is given twice; give each shard once`);
    seenFolders.set(key, s.path);
  }
  const held = shards.flatMap((s) => s.header.blocks.map((b) => b.block));
  const coverage = blockCoverage(plan, held);
  const problems: string[] = [];
  if (coverage.outOfRange.length > 0) problems.push(`${blocksAre(coverage.outOfRange)} outside the ensemble (blocks are 0 to ${plan.blockCount - 1})`);
  if (coverage.duplicated.length > 0) {
    const lines = coverage.duplicated.slice(0, 8).map(({ block }) => {
      const holders = shards.filter((s) => s.header.blocks.some((b) => b.block === block)).map(describe);
      return `block ${block} is in ${holders.join(' and ')}`;
    });
    problems.push(
      `${blocksAre(coverage.duplicated.map((d) => d.block))} held by more than one shard (${lines.join('; ')}` +
        `${coverage.duplicated.length > 8 ? '; ...' : ''}); leave out the extra shards`,
    );
  }
  if (coverage.missing.length > 0) {
    // Name the missing shards first (what a user resubmits), then the blocks.
    const owners = [...new Set(coverage.missing.map((b) => ownerHint(b, shards, plan)).filter((h) => h.length > 0))];
    const hints = coverage.missing.slice(0, 4).map((b) => `block ${b}: ${ownerHint(b, shards, plan) || 'no shard given'}`);
    problems.push(
      `${owners.length > 0 ? `${owners.slice(0, 6).join(', ')}${owners.length > 6 ? ', ...' : ''} ${owners.length === 1 ? 'is' : 'are'} missing (scenario ${first.header.scenarioHash.slice(0, 12)}): ` : ''}` +
        `${blocksAre(coverage.missing)} missing from blocks 0-${plan.blockCount - 1} (${hints.join('; ')}${coverage.missing.length > 4 ? '; ...' : ''}); ` +
        'run the missing shards (or wait for them to finish) and merge again',
    );
  }
  if (problems.length > 0) throw new InputError(`merge: the shards do not cover the ensemble exactly once: ${problems.join('; ')}`);
  for (const s of shards) {
    for (const b of s.header.blocks) {
      const ok =
        b.first === b.block * plan.blockSize &&
        b.count === Math.min(plan.blockSize, plan.realisations - b.first) &&
        b.records.length === b.count &&
        b.records.every((r, k) => r.index === b.first + k);
      if (!ok) throw new InputError(`merge ${describe(s)}: block ${b.block} does not hold realisations ${b.first} to ${b.first + b.count - 1} in order; the shard is damaged, run it again`);
    }
  }
  return plan;
}
