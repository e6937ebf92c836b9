// The checkpoint of an interrupted solve (src/output/solveCheckpoint.ts): what it records is
// what the run reached (phi, mu, T, nmax, sweeps counted over every resumed part), and a
// round trip through the checkpoint folder (readCheckpoint, checkpoint.ts) gives it back bit
// for bit; a different scenario is refused on reading.
import { rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { checkpointOfSolve, writeSolveCheckpoint } from '../../src/output/solveCheckpoint.js';
import { checkpointHash, readCheckpoint } from '../../src/output/checkpoint.js';
import { landscapeFileHashes } from '../../src/scenario/scenarioHash.js';
import { tinyFolder, tinySolve } from '../helpers/tinyRuns.js';

const dir = tinyFolder('solve-checkpoint');
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('solve checkpoint', () => {
  it('records the state reached and reads back bit for bit', async () => {
    const a = await tinySolve(dir);
    const c = checkpointOfSolve(a, 17);
    expect(c.sweepsDone).toBe(a.outcome.totalSweeps + 17);
    expect(c.mu).toBe(a.outcome.solve.mu);
    expect(c.nmax).toBe(a.outcome.model.nmax);
    expect(c.shape).toEqual([6, 6]);
    expect(c.scenarioHash).toBe(checkpointHash(a.scenario, landscapeFileHashes(a.resolved)));
    // a copy: the solver's field may be reused
    expect(c.phi).not.toBe(a.outcome.state.fields.phi);
    const path = join(dir, 'run.checkpoint');
    await writeSolveCheckpoint(path, a, 17, []);
    const back = readCheckpoint(path, a.scenario, landscapeFileHashes(a.resolved));
    expect(back.sweepsDone).toBe(c.sweepsDone);
    expect(back.mu).toBe(c.mu);
    expect(back.temperature).toBe(c.temperature);
    expect(Array.from(back.phi)).toEqual(Array.from(a.outcome.state.fields.phi));
    expect(() => readCheckpoint(path, { ...a.scenario, name: 'other', hubbard: { ...a.scenario.hubbard!, hopping: 0.03 } }, [])).toThrow(/different scenario/);
  });
});
