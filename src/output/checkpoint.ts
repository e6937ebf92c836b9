// Checkpoints of an interrupted solve: the order-parameter field, the chemical potential
// reached, the truncation and the physics hash of the scenario (scenarioHash.ts, 'physics':
// a resume may change solver budgets, not the physics), written through the output-folder
// writer next to the output folder (<out>.checkpoint). `solve --resume` reads it back with
// a zod schema, so a damaged, foreign or older checkpoint is refused with a message
// instead of feeding wrong numbers to the solver.

import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as z from 'zod';
import { decodeNpy, encodeNpy, NpyFormatError } from '../formats/npy.js';
import { writeOutputFolder, removeOwnedFolder } from './outputFolder.js';
import { checkOutputTarget } from './outputTarget.js';
import type { Scenario } from '../scenario/scenarioSchema.js';
import { scenarioHash } from '../scenario/scenarioHash.js';
import { InputError } from '../scenario/inputError.js';
import { Sha256HexSchema, ToolStampSchema, toolStamp } from './recordFields.js';

export const CHECKPOINT_FILE = 'checkpoint.json';
export const CHECKPOINT_FIELD_FILE = 'order_parameter.npy';

export const CheckpointHeaderSchema = z.strictObject({
  tool: ToolStampSchema,
  scenarioHash: Sha256HexSchema,
  mu: z.number(),
  temperature: z.number().min(0),
  nmax: z.int().min(1).max(1000),
  sweepsDone: z.int().min(0),
  shape: z.array(z.int().min(1)).min(1).max(3),
  note: z.string(),
});

export interface Checkpoint {
  /** scenarioHash(scenario, 'physics') of the scenario that was interrupted */
  scenarioHash: string;
  mu: number;
  temperature: number;
  nmax: number;
  sweepsDone: number;
  phi: Float64Array;
  shape: number[];
}

export function checkpointPath(outDir: string): string {
  return `${outDir}.checkpoint`;
}

/** The physics hash a checkpoint of `scenario` carries. */
export function checkpointHash(scenario: Scenario, inputFileHashes: readonly string[] = []): string {
  return scenarioHash(scenario, 'physics', inputFileHashes);
}

/** Write (or replace, when it is ours) the checkpoint folder at `path`. */
export async function writeCheckpoint(path: string, c: Checkpoint, inputs: readonly string[] = []): Promise<void> {
  const target = checkOutputTarget(path, { option: '--resume checkpoint', inputs });
  await writeOutputFolder(target, { command: 'solve checkpoint', scenarioHash: null }, (folder) => {
    folder.write(CHECKPOINT_FIELD_FILE, encodeNpy(c.phi, c.shape));
    const header: z.infer<typeof CheckpointHeaderSchema> = {
      tool: toolStamp(),
      scenarioHash: c.scenarioHash,
      mu: c.mu,
      temperature: c.temperature,
      nmax: c.nmax,
      sweepsDone: c.sweepsDone,
      shape: c.shape,
      note: 'resume with the solve command and --resume (same scenario and overrides)',
    };
    folder.write(CHECKPOINT_FILE, `${JSON.stringify(header, null, 2)}\n`);
  });
}

/**
 * Read a checkpoint for `scenario` (whose input files have the SHA-256s `inputFileHashes`,
 * landscapeFileHashes); every problem is an InputError naming the file and what to do.
 */
export function readCheckpoint(path: string, scenario: Scenario, inputFileHashes: readonly string[] = []): Checkpoint {
  const meta = join(path, CHECKPOINT_FILE);
  let text: string;
  try {
    text = readFileSync(meta, 'utf8');
  } catch {
    throw new InputError(`--resume: no checkpoint at ${path} (expected ${meta}); solve without --resume`);
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch {
    throw new InputError(`--resume: ${meta} is not valid JSON; the checkpoint is damaged, solve without --resume`);
  }
  const header = CheckpointHeaderSchema.safeParse(parsed);
  if (!header.success) {
    const first = header.error.issues[0];
    throw new InputError(
      `--resume: ${meta} is not a checkpoint this tiercake can read (${first.path.join('.') || 'top level'}: ${first.message}); solve without --resume`,
    );
  }
  const h = header.data;
  if (h.scenarioHash !== checkpointHash(scenario, inputFileHashes)) {
    throw new InputError(`--resume: the checkpoint at ${path} belongs to a different scenario (or different --set overrides); solve without --resume`);
  }
  const field = join(path, CHECKPOINT_FIELD_FILE);
  let decoded;
  try {
    decoded = decodeNpy(readFileSync(field), field);
  } catch (err) {
    if (err instanceof NpyFormatError) throw new InputError(`--resume: ${err.message}; the checkpoint is damaged, solve without --resume`);
    throw new InputError(`--resume: ${field} cannot be read; the checkpoint is incomplete, solve without --resume`);
  }
  const { data, shape } = decoded;
  if (shape.join('x') !== scenario.lattice.shape.join('x') || h.shape.join('x') !== shape.join('x')) {
    throw new InputError(`--resume: checkpoint shape ${shape.join('x')} does not match the lattice ${scenario.lattice.shape.join('x')}; solve without --resume`);
  }
  return { scenarioHash: h.scenarioHash, mu: h.mu, temperature: h.temperature, nmax: h.nmax, sweepsDone: h.sweepsDone, phi: data, shape };
}

/** Remove a checkpoint after a successful resume (only when it is ours and holds only its own files). */
export function removeCheckpoint(path: string): boolean {
  return removeOwnedFolder(path);
}
