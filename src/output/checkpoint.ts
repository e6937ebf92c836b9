// Checkpoints of an interrupted solve: the order parameter field, the chemical potential
// reached, the truncation and a fingerprint of the scenario, written atomically next to
// the output folder (<out>.checkpoint). `solve --resume` starts from it.

import { createHash } from 'node:crypto';
import { existsSync, readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { decodeNpy, encodeNpy } from '../formats/npy.js';
import { OutputFolder } from './outputFolder.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { InputError } from '../scenario/inputError.js';
import { toolVersion } from './toolVersion.js';

export interface Checkpoint {
  scenarioFingerprint: string;
  mu: number;
  temperature: number;
  nmax: number;
  sweepsDone: number;
  phi: Float64Array;
  shape: number[];
}

/** Fingerprint of everything that defines the physics (not solver budgets or names). */
export function scenarioFingerprint(scenario: Scenario): string {
  const { name, description, solver, ...physics } = scenario;
  void name;
  void description;
  void solver;
  return createHash('sha256').update(JSON.stringify(physics)).digest('hex').slice(0, 32);
}

export function checkpointPath(outDir: string): string {
  return `${outDir}.checkpoint`;
}

export function writeCheckpoint(path: string, c: Checkpoint): void {
  const folder = new OutputFolder(path);
  try {
    folder.write('order_parameter.npy', encodeNpy(c.phi, c.shape));
    folder.write(
      'checkpoint.json',
      `${JSON.stringify(
        {
          tool: { name: 'tiercake', version: toolVersion() },
          scenarioFingerprint: c.scenarioFingerprint,
          mu: c.mu,
          temperature: c.temperature,
          nmax: c.nmax,
          sweepsDone: c.sweepsDone,
          shape: c.shape,
          note: 'resume with: tiercake solve SCENARIO --resume (same scenario and overrides)',
        },
        null,
        2,
      )}\n`,
    );
    folder.commit();
  } catch (err) {
    folder.discard();
    throw err;
  }
}

export function readCheckpoint(path: string, scenario: Scenario): Checkpoint {
  const meta = join(path, 'checkpoint.json');
  if (!existsSync(meta)) throw new InputError(`--resume: no checkpoint at ${path} (expected ${meta})`);
  let header: { scenarioFingerprint: string; mu: number; temperature: number; nmax: number; sweepsDone: number; shape: number[] };
  try {
    header = JSON.parse(readFileSync(meta, 'utf8'));
  } catch {
    throw new InputError(`--resume: ${meta} is not a readable checkpoint`);
  }
  if (header.scenarioFingerprint !== scenarioFingerprint(scenario)) {
    throw new InputError(`--resume: the checkpoint at ${path} belongs to a different scenario (or different --set overrides); solve without --resume`);
  }
  const { data, shape } = decodeNpy(readFileSync(join(path, 'order_parameter.npy')));
  if (shape.join('x') !== scenario.lattice.shape.join('x')) throw new InputError(`--resume: checkpoint shape ${shape.join('x')} does not match the lattice`);
  return { ...header, phi: data, shape };
}

export function removeCheckpoint(path: string): void {
  rmSync(path, { recursive: true, force: true });
}
