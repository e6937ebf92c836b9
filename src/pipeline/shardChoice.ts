// Which shard of a sharded `ensemble` or `scan` this process is, from the option values
// and the environment. Pure (the environment is passed in), so it is tested on plain
// strings; errors name the options.
//
// Shards count from 0. `--shard k/K` names the shard directly. `--shard-from-env [VAR]`
// takes k from the environment variable VAR (default SLURM_ARRAY_TASK_ID, which a SLURM
// job array started with `#SBATCH --array=0-(K-1)` sets in each task) and K from
// `--shards K`, which is required with it.

import { InputError } from '../scenario/inputError.js';

export const DEFAULT_SHARD_VARIABLE = 'SLURM_ARRAY_TASK_ID';

export interface ShardChoice {
  index: number;
  count: number;
  /** where the index came from, for messages */
  source: string;
}

export function parseShardOption(text: string): ShardChoice {
  const m = /^(\d+)\/(\d+)$/.exec(text);
  if (!m) throw new InputError(`--shard: expected k/K (shard k of K, k counted from 0), e.g. --shard 0/4; got ${JSON.stringify(text)}`);
  const index = Number(m[1]);
  const count = Number(m[2]);
  if (count < 1 || !Number.isSafeInteger(count)) throw new InputError(`--shard: the shard count K must be at least 1, got ${m[2]}`);
  if (index >= count) {
    throw new InputError(`--shard ${text.trim()}: shards count from 0, so with K = ${count} give k from 0 to ${count - 1}`);
  }
  return { index, count, source: '--shard' };
}

/**
 * The shard of this process, or null for a complete run.
 * @param shard value of --shard
 * @param fromEnv value of --shard-from-env: true when given without a name
 * @param shards value of --shards (a whole number of at least 1, as the option table reads it)
 */
export function resolveShard(
  shard: string | undefined,
  fromEnv: string | boolean | undefined,
  shards: number | undefined,
  env: Readonly<Record<string, string | undefined>>,
): ShardChoice | null {
  if (shard !== undefined && fromEnv !== undefined && fromEnv !== false) {
    throw new InputError('--shard and --shard-from-env: give one of them (the shard index either on the command line or from the environment)');
  }
  if (shard !== undefined) {
    if (shards !== undefined) throw new InputError('--shards: goes with --shard-from-env; with --shard write the count after the slash, e.g. --shard 2/8');
    return parseShardOption(shard);
  }
  if (fromEnv === undefined || fromEnv === false) {
    if (shards !== undefined) throw new InputError('--shards: goes with --shard-from-env; add --shard-from-env (or use --shard k/K)');
    return null;
  }
  const variable = fromEnv === true ? DEFAULT_SHARD_VARIABLE : fromEnv;
  if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(variable)) {
    throw new InputError(
      `--shard-from-env: ${JSON.stringify(variable)} is not an environment variable name; ` +
        'put --shard-from-env after the scenario file, or give the name explicitly, e.g. --shard-from-env SLURM_ARRAY_TASK_ID',
    );
  }
  if (shards === undefined) throw new InputError(`--shards: required with --shard-from-env; give the number of shards K (the array size, 0..K-1)`);
  const count = shards;
  const value = env[variable];
  if (value === undefined || value.trim() === '') {
    throw new InputError(
      `--shard-from-env: the environment variable ${variable} is not set; run inside a job array ` +
        `(e.g. #SBATCH --array=0-${count - 1}) or use --shard k/${count}`,
    );
  }
  const trimmed = value.trim();
  const index = /^\d+$/.test(trimmed) ? Number(trimmed) : NaN;
  if (!Number.isSafeInteger(index)) throw new InputError(`--shard-from-env: ${variable} = ${JSON.stringify(value)} is not a whole number`);
  if (index >= count) {
    throw new InputError(
      `--shard-from-env: ${variable} = ${index}, but shards count from 0 to ${count - 1} with --shards ${count}; ` +
        `number the array from 0 (#SBATCH --array=0-${count - 1})`,
    );
  }
  return { index, count, source: variable };
}
