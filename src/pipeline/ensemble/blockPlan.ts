// Canonical blocks of realisations, and which blocks a shard owns.
//
// Floating-point addition is not associative, so an average over N realisations depends
// on the order and grouping of the additions. To make a sharded run give exactly the
// bits of a single run, the grouping is fixed by the ensemble alone, never by how the
// work is split: realisations 0 .. N-1 are cut into blocks of `blockSize` consecutive
// realisations (the last block may be shorter); every block is accumulated on its own,
// in realisation order, and the block partials are combined in block order. A shard owns
// whole blocks, so merging shards performs exactly the additions a single run performs.
// The block size is part of the ensemble's identity: results with different block sizes
// agree to rounding, not bit for bit.

export interface BlockPlan {
  realisations: number;
  blockSize: number;
  blockCount: number;
}

export interface BlockRange {
  block: number;
  /** first realisation index of the block */
  first: number;
  /** realisations in the block */
  count: number;
}

/** Largest ensemble accepted (realisation indices stay exact small integers in every file). */
export const MAX_REALISATIONS = 10_000_000;

export function planBlocks(realisations: number, blockSize: number): BlockPlan {
  if (!Number.isInteger(realisations) || realisations < 1 || realisations > MAX_REALISATIONS) {
    throw new RangeError(`realisations: expected a whole number from 1 to ${MAX_REALISATIONS}, got ${realisations}`);
  }
  if (!Number.isInteger(blockSize) || blockSize < 1 || blockSize > MAX_REALISATIONS) {
    throw new RangeError(`block size: expected a whole number from 1 to ${MAX_REALISATIONS}, got ${blockSize}`);
  }
  return { realisations, blockSize, blockCount: Math.ceil(realisations / blockSize) };
}

export function blockRange(plan: BlockPlan, block: number): BlockRange {
  if (!Number.isInteger(block) || block < 0 || block >= plan.blockCount) {
    throw new RangeError(`block: expected a whole number from 0 to ${plan.blockCount - 1}, got ${block}`);
  }
  const first = block * plan.blockSize;
  return { block, first, count: Math.min(plan.blockSize, plan.realisations - first) };
}

/**
 * Blocks owned by shard `shardIndex` (counted from 0) of `shardCount`: the contiguous
 * range [floor(k M / K), floor((k + 1) M / K)) of the M blocks. Every block belongs to
 * exactly one shard; when K > M some shards own no block.
 */
export function shardBlocks(plan: BlockPlan, shardIndex: number, shardCount: number): number[] {
  if (!Number.isInteger(shardCount) || shardCount < 1) {
    throw new RangeError(`shard count: expected a whole number >= 1, got ${shardCount}`);
  }
  if (!Number.isInteger(shardIndex) || shardIndex < 0 || shardIndex >= shardCount) {
    throw new RangeError(`shard index: expected a whole number from 0 to ${shardCount - 1}, got ${shardIndex}`);
  }
  const start = Math.floor((shardIndex * plan.blockCount) / shardCount);
  const end = Math.floor(((shardIndex + 1) * plan.blockCount) / shardCount);
  const blocks: number[] = [];
  for (let b = start; b < end; b++) blocks.push(b);
  return blocks;
}

export interface BlockCoverage {
  /** blocks no shard holds */
  missing: number[];
  /** blocks held more than once, with how often */
  duplicated: Array<{ block: number; times: number }>;
  /** block numbers outside 0 .. M-1 */
  outOfRange: number[];
}

/** Checks that the given block lists together hold every block of the plan exactly once. */
export function blockCoverage(plan: BlockPlan, held: readonly number[]): BlockCoverage {
  const times = new Int32Array(plan.blockCount);
  const outOfRange: number[] = [];
  for (const b of held) {
    if (Number.isInteger(b) && b >= 0 && b < plan.blockCount) times[b]++;
    else outOfRange.push(b);
  }
  const missing: number[] = [];
  const duplicated: Array<{ block: number; times: number }> = [];
  for (let b = 0; b < plan.blockCount; b++) {
    if (times[b] === 0) missing.push(b);
    else if (times[b] > 1) duplicated.push({ block: b, times: times[b] });
  }
  return { missing, duplicated, outOfRange };
}

/** "0-3, 7, 9-11": block lists for messages. */
export function formatBlockList(blocks: readonly number[]): string {
  const sorted = [...blocks].sort((a, b) => a - b);
  const parts: string[] = [];
  let k = 0;
  while (k < sorted.length) {
    let j = k;
    while (j + 1 < sorted.length && sorted[j + 1] === sorted[j] + 1) j++;
    parts.push(j > k ? `${sorted[k]}-${sorted[j]}` : `${sorted[k]}`);
    k = j + 1;
  }
  return parts.join(', ');
}
