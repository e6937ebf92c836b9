// What the command line asks of the machine it runs on: the default thread count and the
// memory a run may use (the pipeline takes both as plain numbers).

import { availableParallelism, totalmem } from 'node:os';

/** All cores (at most 64) unless --threads says otherwise. */
export function defaultThreads(): number {
  return Math.max(1, Math.min(availableParallelism(), 64));
}

/** A run may use 60 % of the machine's memory. */
export function memoryLimitBytes(): number {
  return 0.6 * totalmem();
}
