// Which shard this process is (src/pipeline/shardChoice.ts), from --shard k/K, or from an
// environment variable with --shard-from-env and --shards K: shards count from 0, a SLURM
// array numbered from 1 or an unset variable is refused with the #SBATCH line to use, and
// the options that do not go together are named.
import { describe, expect, it } from 'vitest';
import { DEFAULT_SHARD_VARIABLE, parseShardOption, resolveShard } from '../../src/pipeline/shardChoice.js';

describe('shard choice', () => {
  it('reads k/K and the index from the environment', () => {
    expect(parseShardOption('0/1')).toEqual({ index: 0, count: 1, source: '--shard' });
    expect(resolveShard('3/4', undefined, undefined, {})).toEqual({ index: 3, count: 4, source: '--shard' });
    expect(resolveShard(undefined, true, 16, { [DEFAULT_SHARD_VARIABLE]: ' 15 ' })).toEqual({ index: 15, count: 16, source: 'SLURM_ARRAY_TASK_ID' });
    expect(resolveShard(undefined, false, undefined, { SLURM_ARRAY_TASK_ID: '2' })).toBeNull();
  });

  it('refuses what does not go together, an unset variable and an index out of range', () => {
    expect(() => resolveShard('1/2', true, undefined, {})).toThrow(/^--shard and --shard-from-env: give one of them/);
    expect(() => resolveShard('1/2', undefined, 2, {})).toThrow(/^--shards: goes with --shard-from-env; with --shard write the count after the slash/);
    expect(() => resolveShard(undefined, undefined, 2, {})).toThrow(/^--shards: goes with --shard-from-env; add --shard-from-env/);
    expect(() => resolveShard(undefined, 'TASK', 8, {})).toThrow('--shard-from-env: the environment variable TASK is not set; run inside a job array (e.g. #SBATCH --array=0-7) or use --shard k/8');
    expect(() => resolveShard(undefined, 'TASK', 8, { TASK: 'x1' })).toThrow('--shard-from-env: TASK = "x1" is not a whole number');
    expect(() => resolveShard(undefined, 'TASK', 8, { TASK: '8' })).toThrow(/number the array from 0 \(#SBATCH --array=0-7\)/);
    expect(() => parseShardOption('1/0')).toThrow('--shard: the shard count K must be at least 1, got 0');
  });
});
