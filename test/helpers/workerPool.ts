// Worker pool for tests: the workers load the TypeScript sources through test/ts-hooks.mjs.
import { createSweepPool, type SweepPool } from '../../src/solver/sweepExecutor.js';

export function testSweepPool(workers: number): SweepPool {
  return createSweepPool({
    workers,
    filename: new URL('../../src/solver/sweepWorker.ts', import.meta.url).href,
    execArgv: ['--import', new URL('../register-ts.mjs', import.meta.url).href],
  });
}
