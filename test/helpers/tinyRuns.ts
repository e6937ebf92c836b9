// Tiny scenarios run through the pipeline, shared by the direct tests of the writers and
// summary lines of `solve` and `evolve` (each a fraction of a second).
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario, type SolveArtifacts } from '../../src/pipeline/solveScenario.js';
import { evolveScenario, type EvolveArtifacts } from '../../src/pipeline/evolveScenario.js';

/** A fresh temporary folder (the caller removes it). */
export function tinyFolder(tag: string): string {
  return mkdtempSync(join(tmpdir(), `tiercake-${tag}-`));
}

export function tinyScenarioFile(dir: string, name: string, body: Record<string, unknown>): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify({ name, energyUnit: 'U', truncation: { nmax: 6 }, ...body }));
  return path;
}

/** A trapped 6x6 layer at fixed atom number, with the superfluid fraction asked for when `stiffness`. */
export async function tinySolve(dir: string, extra: Record<string, unknown> = {}): Promise<SolveArtifacts> {
  const file = tinyScenarioFile(dir, 'tiny-solve', {
    lattice: { shape: [6, 6] },
    hubbard: { hopping: 0.04 },
    trap: { coefficient: 0.08 },
    particles: { atoms: 20 },
    solver: { compressibility: false },
    ...extra,
  });
  return solveScenario(prepareScenario(file), { threads: 1 });
}

/** A 3x3 trapped layer ramped from J = 0.05 to 0.03 over 2 hbar/U, two snapshots, a two-point spectrum. */
export async function tinyEvolve(dir: string): Promise<EvolveArtifacts> {
  const file = tinyScenarioFile(dir, 'tiny-evolve', {
    lattice: { shape: [3, 3] },
    hubbard: { hopping: 0.05 },
    trap: { coefficient: 0.05 },
    particles: { chemicalPotential: 0.6 },
    evolution: {
      duration: 2,
      outputEvery: 0.5,
      ramps: [{ path: 'hubbard.hopping', points: [[0, 0.05], [2, 0.03]] }],
      snapshots: { count: 2 },
      animationFrames: 2,
      spectrum: { frequencies: [0.5, 1], duration: 2 },
    },
  });
  return evolveScenario(prepareScenario(file), { threads: 1 });
}
