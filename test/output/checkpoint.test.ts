// Checkpoints of an interrupted solve (src/output/checkpoint.ts): a bit-exact round trip of
// the order parameter, the zod schema refusing damaged, foreign and older files with a
// message that says what to do, the physics hash (solver budgets may change between the
// interruption and the resume, the physics may not), and removal only of a folder of ours.

import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { CHECKPOINT_FIELD_FILE, CHECKPOINT_FILE, checkpointHash, checkpointPath, readCheckpoint, removeCheckpoint, writeCheckpoint } from '../../src/output/checkpoint.js';
import { OUTPUT_MARKER } from '../../src/output/outputMarker.js';
import { validateScenario } from '../../src/scenario/loadScenario.js';
import { InputError } from '../../src/scenario/inputError.js';

const root = mkdtempSync(join(tmpdir(), 'tiercake-checkpoint-'));
afterAll(() => rmSync(root, { recursive: true, force: true }));

const raw = { name: 'ckpt', energyUnit: 'U', lattice: { shape: [4, 3] }, hubbard: { hopping: 0.02 }, particles: { atoms: 10 } };
const scenario = validateScenario(raw, 'test');
const phi = Float64Array.from({ length: 12 }, (_, i) => Math.sqrt(i + 0.5) / 3);

async function written(name: string): Promise<string> {
  const path = join(root, name);
  await writeCheckpoint(path, { scenarioHash: checkpointHash(scenario), mu: 0.731, temperature: 0, nmax: 5, sweepsDone: 42, phi, shape: [4, 3] });
  return path;
}

describe('checkpoint round trip', () => {
  it('gives back the field bit for bit and the numbers it was written with', async () => {
    const path = await written('a.checkpoint');
    expect(checkpointPath(join(root, 'a'))).toBe(path);
    expect(existsSync(join(path, OUTPUT_MARKER))).toBe(true);
    const back = readCheckpoint(path, scenario);
    expect(Buffer.from(back.phi.buffer).equals(Buffer.from(phi.buffer))).toBe(true);
    expect(back).toMatchObject({ mu: 0.731, temperature: 0, nmax: 5, sweepsDone: 42, shape: [4, 3] });
  });

  it('a change of solver budget keeps the checkpoint valid, a change of physics does not', async () => {
    const path = await written('b.checkpoint');
    const moreSweeps = validateScenario({ ...raw, name: 'renamed', solver: { maxSweeps: 999999 } }, 'test');
    expect(() => readCheckpoint(path, moreSweeps)).not.toThrow();
    const otherPhysics = validateScenario({ ...raw, particles: { atoms: 11 } }, 'test');
    expect(() => readCheckpoint(path, otherPhysics)).toThrow(/belongs to a different scenario/);
  });
});

describe('damaged checkpoints are input errors that say what to do', () => {
  it('missing, not JSON, wrong schema, damaged field, wrong shape', async () => {
    const cases: Array<[string, (path: string) => void, RegExp]> = [
      ['missing', (p) => rmSync(join(p, CHECKPOINT_FILE)), /no checkpoint at .* solve without --resume/],
      ['not JSON', (p) => writeFileSync(join(p, CHECKPOINT_FILE), '{"mu": '), /is not valid JSON; the checkpoint is damaged/],
      [
        'older format',
        (p) => {
          const h = JSON.parse(readFileSync(join(p, CHECKPOINT_FILE), 'utf8'));
          delete h.scenarioHash;
          h.scenarioFingerprint = 'abc';
          writeFileSync(join(p, CHECKPOINT_FILE), JSON.stringify(h));
        },
        /is not a checkpoint this tiercake can read/,
      ],
      [
        'negative nmax',
        (p) => {
          const h = JSON.parse(readFileSync(join(p, CHECKPOINT_FILE), 'utf8'));
          h.nmax = -1;
          writeFileSync(join(p, CHECKPOINT_FILE), JSON.stringify(h));
        },
        /nmax: .*solve without --resume/,
      ],
      ['truncated field', (p) => writeFileSync(join(p, CHECKPOINT_FIELD_FILE), readFileSync(join(p, CHECKPOINT_FIELD_FILE)).subarray(0, 100)), /order_parameter\.npy: .*truncated.*damaged/],
      ['no field', (p) => rmSync(join(p, CHECKPOINT_FIELD_FILE)), /order_parameter\.npy cannot be read/],
    ];
    for (const [name, damage, why] of cases) {
      const path = await written(`damaged-${name.replace(/ /g, '-')}.checkpoint`);
      damage(path);
      expect(() => readCheckpoint(path, scenario), name).toThrow(InputError);
      expect(() => readCheckpoint(path, scenario), name).toThrow(why);
    }
  });
});

describe('removing a checkpoint after the resume', () => {
  it('removes a checkpoint of ours, keeps a folder with anything else in it', async () => {
    const path = await written('c.checkpoint');
    expect(removeCheckpoint(path)).toBe(true);
    expect(existsSync(path)).toBe(false);
    const other = await written('d.checkpoint');
    writeFileSync(join(other, 'my-notes.txt'), 'keep');
    expect(removeCheckpoint(other)).toBe(false);
    expect(readFileSync(join(other, 'my-notes.txt'), 'utf8')).toBe('keep');
    mkdirSync(join(root, 'plain'));
    writeFileSync(join(root, 'plain', CHECKPOINT_FILE), '{}');
    expect(removeCheckpoint(join(root, 'plain'))).toBe(false);
  });
});
