// The worker-thread runner gives bit-identical results for any thread count: every pass is a
// per-site or per-component kernel and the reductions are maxima (parallelRunner.ts). Checked
// against the serial runner (the reference: one thread does everything in index order) for
// both integrators, a drive that rewrites the site potential (moving trap: shared eps) and a
// hopping ramp (shared scales), with 2 and 3 threads. Exact equality, no tolerance.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { trappedModel } from './fixtures.js';
import { staticGroundState } from '../../src/dynamics/staticGround.js';
import { frameFromModel } from '../../src/dynamics/dynamicsFrame.js';
import { createDrive, harmonicTrapDrive } from '../../src/dynamics/drive.js';
import { rampSchedule } from '../../src/dynamics/rampSchedule.js';
import { constantFunction } from '../../src/dynamics/timeFunction.js';
import { evolve, type IntegratorOptions } from '../../src/dynamics/evolve.js';
import { copyState } from '../../src/dynamics/gutzwillerState.js';
import { createSerialRunner } from '../../src/dynamics/dynamicsRunner.js';
import { createDynamicsPool, createParallelRunner, shareFrame, type DynamicsPool } from '../../src/dynamics/parallelRunner.js';
import { latticeCentre } from '../../src/lattice/harmonicTrap.js';
import { testDynamicsPool } from '../helpers/dynamicsPool.js';

describe('parallel dynamics runner', async () => {
  const model = trappedModel([10, 12], 0.05, 0.03, 6);
  const ground = await staticGroundState({ model, chemical: { kind: 'mu', mu: 1.3 } });
  const background = new Float64Array(model.eps.length); // the trap is rebuilt by the drive
  const centre = latticeCentre(model.geometry);
  let pools: DynamicsPool[] = [];
  beforeAll(async () => {
    pools = [await testDynamicsPool(1), await testDynamicsPool(2)];
  });
  afterAll(async () => {
    await Promise.all(pools.map((p) => p.destroy()));
  });

  const run = async (integrator: IntegratorOptions, pool: DynamicsPool | null): Promise<Float64Array> => {
    const frame = shareFrame(frameFromModel(model, { mu: ground.mu }));
    const drive = createDrive(frame, {
      hoppingFactor: rampSchedule({ path: 'hubbard.hopping', points: [[0, 1], [1.5, 0.4]], shape: 's-curve' }),
      potential: harmonicTrapDrive(model.geometry, background, {
        coefficient: [constantFunction(0.03), constantFunction(0.03)],
        centre: [rampSchedule({ path: 'trap.centreSites.0', points: [[0, centre[0]], [0.5, centre[0] + 1]] }), constantFunction(centre[1])],
      }),
    });
    const state = copyState(ground.state);
    const runner = pool === null ? createSerialRunner(frame) : createParallelRunner(frame, pool);
    const result = await evolve({ state, frame, drive, runner, outputTimes: [0.7, 2], integrator });
    expect(result.status).toBe('done');
    return state.amplitudes;
  };

  for (const integrator of [
    { kind: 'dormand-prince', absoluteTolerance: 1e-9, relativeTolerance: 1e-9 },
    { kind: 'splitting', step: 0.05, order: 4 },
  ] as IntegratorOptions[]) {
    it(`${integrator.kind}: 1, 2 and 3 threads give the same amplitudes bit for bit`, async () => {
      const serial = await run(integrator, null);
      for (const pool of pools) {
        const parallel = await run(integrator, pool);
        let differing = 0;
        for (let k = 0; k < serial.length; k++) if (!Object.is(serial[k], parallel[k])) differing++;
        expect(differing).toBe(0);
      }
    });
  }

  it('refuses a frame that is not on shared memory, naming shareFrame', async () => {
    const frame = frameFromModel(model, { mu: ground.mu });
    expect(() => createParallelRunner(frame, pools[0])).toThrow(/shareFrame/);
  });

  it('reports a worker that cannot start', async () => {
    await expect(createDynamicsPool({ workers: 1, filename: new URL('./no-such-worker.js', import.meta.url).href })).rejects.toThrow(/did not start/);
  });
});
