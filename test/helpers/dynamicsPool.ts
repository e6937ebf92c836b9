// Dynamics worker pool for tests: the workers load the TypeScript sources through test/ts-hooks.mjs.
import { createDynamicsPool, type DynamicsPool } from '../../src/dynamics/parallelRunner.js';

export const dynamicsWorkerModule = {
  filename: new URL('../../src/dynamics/dynamicsWorker.ts', import.meta.url).href,
  execArgv: ['--import', new URL('../register-ts.mjs', import.meta.url).href],
};

export function testDynamicsPool(workers: number): Promise<DynamicsPool> {
  return createDynamicsPool({ workers, ...dynamicsWorkerModule });
}
