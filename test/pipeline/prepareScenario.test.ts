// Stage 1 of every run (src/pipeline/prepareScenario.ts): what cannot run is refused as an
// input error naming the field before anything big is allocated or solved (a lattice over
// the memory given, atoms above the capacity of the truncation, a chemical potential nmax
// cannot hold, camera settings that do not fit the lattice), and a valid scenario comes back
// resolved into model arrays.

import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { asInputError, DEFAULT_MEMORY_LIMIT_BYTES, prepareScenario, scenarioOptics } from '../../src/pipeline/prepareScenario.js';
import { ParameterError } from '../../src/physics/parameterError.js';
import { InputError } from '../../src/scenario/inputError.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-prepare-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const base = { name: 'prep', energyUnit: 'U', lattice: { shape: [10, 10] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, particles: { chemicalPotential: 0.5 } };
function file(name: string, body: Record<string, unknown> = base): string {
  const path = join(dir, `${name}.json`);
  writeFileSync(path, JSON.stringify(body));
  return path;
}

describe('prepareScenario', () => {
  it('resolves a valid scenario into model arrays, overrides applied', () => {
    const { scenario, raw, resolved } = prepareScenario(file('valid'), ['particles.chemicalPotential=0.7']);
    expect(scenario.particles.chemicalPotential).toBe(0.7);
    expect((raw.particles as { chemicalPotential: number }).chemicalPotential).toBe(0.7);
    expect(resolved.chemical).toEqual({ kind: 'mu', mu: 0.7 });
    // eps_i = k |r_i - r_c|^2 with the centre at 4.5: the corner site holds k (4.5^2 + 4.5^2).
    expect(resolved.model.eps[0]).toBeCloseTo(0.01 * 40.5, 14);
    expect(DEFAULT_MEMORY_LIMIT_BYTES).toBe(8 * 2 ** 30);
  });

  it('refuses, naming the field, what cannot run', () => {
    const cases: Array<[string, () => unknown, RegExp]> = [
      ['memory', () => prepareScenario(file('mem'), [], { memoryLimitBytes: 1000 }), /^lattice\.shape: 10 x 10 = 100 sites needs about .* GiB, more than the .* GiB/],
      ['capacity', () => prepareScenario(file('cap', { ...base, particles: { atoms: 700 }, truncation: { nmax: 6 } })), /^particles\.atoms: 700 atoms cannot fit on 100 sites with at most nmax = 6/],
      ['nmax', () => prepareScenario(file('nmax', { ...base, particles: { chemicalPotential: 4.5 }, truncation: { nmax: 3, automatic: false } })), /^truncation\.nmax: .*about 5 atoms per site .* but nmax = 3/],
      ['imaging axis', () => prepareScenario(file('axis', { ...base, lattice: { shape: [10] }, trap: { coefficient: 0.01 }, camera: { imagingAxis: 'y' } })), /^camera\.imagingAxis: a 1D lattice has no 'y' axis/],
      ['PSF from optics without a spacing', () => prepareScenario(file('psf', { ...base, camera: { psf: { wavelengthNm: 780, numericalAperture: 0.5 } } })), /^camera\.psf: wavelengthNm and numericalAperture need the lattice spacing/],
    ];
    for (const [name, run, why] of cases) {
      expect(run, name).toThrow(InputError);
      expect(run, name).toThrow(why);
    }
  });

  it('scenario optics: the default camera, and only ParameterErrors become input errors', () => {
    const { resolved } = prepareScenario(file('optics'));
    const optics = scenarioOptics(resolved);
    // Defaults (src/imaging/cameraOptics.ts): half-site pixels, PSF sigma half a site, face on.
    expect(optics).toMatchObject({ axis: 2, keptAxes: [0, 1], pixelUm: 0.5, psfSigmaUm: 0.5, cellUm: 1 });
    expect(asInputError(new ParameterError('camera.psf', 'bad'))).toBeInstanceOf(InputError);
    const bug = new TypeError('a bug');
    expect(asInputError(bug)).toBe(bug);
  });
});
