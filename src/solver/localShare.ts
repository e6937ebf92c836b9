// The calling thread's share of a parallel pass. Both worker pools that split a pass between
// the calling thread and worker threads (the cluster sweep, solver/cluster/
// clusterSweepExecutor.ts, and the time evolution, dynamics/parallelRunner.ts) run their own
// share while the workers run theirs, and need the same care with errors:
// - an error of the local share is held until the workers are done: they write the same
//   shared buffers, which must not be reused or torn down under them;
// - a worker failure found while waiting is reported first: it usually explains the rest.

/**
 * Run `local` (this thread's share), then `awaitWorkers` (waits for the others and throws
 * on their failure), then rethrow the local error if there was one.
 */
export async function runLocalShare<T>(local: () => number, awaitWorkers: () => Promise<T>): Promise<{ local: number; workers: T }> {
  let value = 0;
  let failed = false;
  let localError: unknown = null;
  try {
    value = local();
  } catch (err) {
    failed = true;
    localError = err;
  }
  const workers = await awaitWorkers();
  if (failed) throw localError;
  return { local: value, workers };
}
