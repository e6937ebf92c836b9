// --set switches between alternative keys (src/scenario/loadScenario.ts ALTERNATIVE_KEYS):
// the schema allows one of particles.atoms / particles.chemicalPotential and one of
// temperature.kT / nanokelvin / entropyPerAtom, so setting one on the command line drops
// the other from the file, says so, and the resolved run uses the new mode. Two
// alternatives given on the same command line are refused, naming both.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { applyOverridesWithNotes, loadScenario } from '../../src/scenario/loadScenario.js';
import { resolveScenario } from '../../src/scenario/resolveScenario.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-override-modes-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const fixedMu = {
  name: 'fixed-mu',
  energyUnit: 'U',
  lattice: { shape: [8, 8] },
  hubbard: { hopping: 0.02 },
  trap: { coefficient: 0.02 },
  particles: { chemicalPotential: 0.6 },
  temperature: { kT: 0.05 },
};
const path = join(dir, 'fixed-mu.json');
writeFileSync(path, JSON.stringify(fixedMu));

const lab = {
  name: 'lab-layer',
  lattice: { shape: [8, 8] },
  laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 12, transverse: { trapFrequencyHz: 8000 } },
  trap: { frequencyHz: 40 },
  particles: { atoms: 30 },
  temperature: { kT: 5 },
};
const labPath = join(dir, 'lab.json');
writeFileSync(labPath, JSON.stringify(lab));

describe('--set switches the mode', () => {
  it('particles.atoms=N on a fixed-mu scenario solves at fixed N (and mu back again)', () => {
    const { scenario, notes } = loadScenario(path, ['particles.atoms=40']);
    expect(scenario.particles).toEqual({ atoms: 40 });
    expect(notes).toEqual(['--set particles.atoms replaces particles.chemicalPotential of the scenario file (the two are alternatives)']);
    expect(resolveScenario(scenario).chemical).toMatchObject({ kind: 'atoms', atoms: 40 });
    const back = loadScenario(path, ['particles.atoms=40', 'particles.atoms=41']);
    expect(back.scenario.particles).toEqual({ atoms: 41 });
  });

  it('temperature.entropyPerAtom with particles.atoms: both switches at once; kT again on a fixed-N file', () => {
    const { scenario, notes } = loadScenario(path, ['particles.atoms=40', 'temperature.entropyPerAtom=0.3']);
    expect(scenario.temperature).toEqual({ entropyPerAtom: 0.3 });
    expect(notes).toHaveLength(2);
    expect(resolveScenario(scenario).thermal).toMatchObject({ kind: 'entropy', entropyPerAtom: 0.3 });
    // Entropy alone on a fixed-mu file: the schema's own rule (entropy needs a fixed N) says what to add.
    expect(() => loadScenario(path, ['temperature.entropyPerAtom=0.3'])).toThrow(/give particles\.atoms/);
  });

  it('laboratory mode: temperature.nanokelvin replaces kT, and the resolved kT is that temperature', () => {
    const { scenario, notes } = loadScenario(labPath, ['temperature.nanokelvin=2']);
    expect(scenario.temperature).toEqual({ nanokelvin: 2 });
    expect(notes[0]).toMatch(/temperature\.nanokelvin replaces temperature\.kT/);
    const resolved = resolveScenario(scenario);
    // k_B x 2 nK in Hz (internal unit): 2 x k_B / h x 1e-9, k_B / h = 2.083661912e10 Hz/K (CODATA 2018, exact).
    expect(resolved.thermal).toMatchObject({ kind: 'temperature' });
    if (resolved.thermal.kind === 'temperature') expect(resolved.thermal.kT).toBeCloseTo(2 * 20.83661912, 6);
    const mu = loadScenario(labPath, ['particles.chemicalPotential=300']);
    expect(mu.scenario.particles).toEqual({ chemicalPotential: 300 });
  });

  it('two alternatives on one command line are refused, naming both', () => {
    let error: unknown;
    try {
      applyOverridesWithNotes(fixedMu, ['particles.atoms=40', 'particles.chemicalPotential=0.5']);
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(InputError);
    expect(String((error as Error).message)).toMatch(/particles\.chemicalPotential and particles\.atoms .*are alternatives; give only one/);
  });

  it('keys without alternatives change nothing else, and the file is not modified', () => {
    const { raw, notes } = applyOverridesWithNotes(fixedMu, ['trap.coefficient=0.01']);
    expect(notes).toEqual([]);
    expect(raw.particles).toEqual({ chemicalPotential: 0.6 });
    expect(fixedMu.particles).toEqual({ chemicalPotential: 0.6 });
  });
});
