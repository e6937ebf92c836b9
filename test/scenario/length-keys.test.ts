// Lengths that cannot be read two ways (issue 22, "units that cannot be misread"): a key
// ending in Um holds micrometres. In dimensionless mode (no lattice spacing known) the
// scenario's ...Um camera keys are refused with the ...Sites key to use instead; the
// ...Sites keys give the same pictures the old reading gave; written metadata uses neutral
// keys with `lengthUnit` and keeps ...Um keys only where they are micrometres; compare's
// sidecar reader reads both the new keys and those of earlier files.

import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { encodeNpy } from '../../src/formats/npy.js';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { validateScenario } from '../../src/scenario/loadScenario.js';
import { prepareScenario } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { solvePictures } from '../../src/pipeline/solvePictures.js';
import { readSidecar } from '../../src/imaging/camera/pictureSidecar.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-length-keys-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const base = { name: 'keys', energyUnit: 'U', lattice: { shape: [10, 10] }, hubbard: { hopping: 0.05 }, trap: { coefficient: 0.05 }, particles: { chemicalPotential: 0.5 } };

function refusal(body: Record<string, unknown>): string {
  try {
    validateScenario({ ...base, ...body }, 'scenario keys.json');
  } catch (e) {
    return (e as Error).message;
  }
  return '';
}

describe('scenario keys ending in Um are micrometres only', () => {
  it('dimensionless mode refuses camera.cameraPixelUm, camera.psf.sigmaUm and timeOfFlight.cameraPixelUm, naming the key to use', () => {
    expect(refusal({ camera: { cameraPixelUm: 1 } })).toMatch(/camera\.cameraPixelUm.*give camera\.cameraPixelSites/);
    expect(refusal({ camera: { psf: { sigmaUm: 0.5 } } })).toMatch(/camera\.psf\.sigmaUm.*give camera\.psf\.sigmaSites/);
    expect(refusal({ timeOfFlight: { cameraPixelUm: 13 } })).toMatch(/timeOfFlight\.cameraPixelUm.*no time-of-flight picture in dimensionless mode/);
    expect(refusal({ camera: { cameraPixelSites: 1, psf: { sigmaSites: 0.5 } } })).toBe('');
    expect(refusal({ camera: { cameraPixelSites: 1, cameraPixelUm: 1 } })).toMatch(/give one of cameraPixelUm and cameraPixelSites/);
  });

  it('cameraPixelSites: object pixel = cameraPixelSites / magnification sites; the summary writes neutral keys only', async () => {
    const path = join(dir, 'keys.json');
    writeFileSync(path, JSON.stringify({ ...base, camera: { cameraPixelSites: 1.5, magnification: 3, psf: { sigmaSites: 0.4 } } }));
    const a = await solveScenario(prepareScenario(path), { threads: 1 });
    const set = solvePictures(a);
    expect(set.pictures[0].picture.pixelUm).toBeCloseTo(0.5, 14);
    const camera = set.summary.camera as Record<string, unknown>;
    expect(camera).toMatchObject({ cameraPixelSize: 1.5, psfSigma: 0.4 });
    expect(camera.objectPlanePixelSize as number).toBeCloseTo(0.5, 14);
    expect(set.summary.lengthUnit).toBe('sites');
    expect(Object.keys(camera).filter((k) => k.endsWith('Um'))).toEqual([]);
  });

  it('laboratory mode keeps the Um keys, which are micrometres there, beside the neutral ones', async () => {
    const path = join(dir, 'lab.json');
    writeFileSync(
      path,
      JSON.stringify({
        name: 'lab-keys',
        lattice: { shape: [10, 10] },
        laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 10, transverse: { trapFrequencyHz: 8000 } },
        trap: { frequencyHz: 80 },
        particles: { atoms: 40 },
        camera: { cameraPixelUm: 13, magnification: 40 },
        solver: { compressibility: false },
      }),
    );
    const set = solvePictures(await solveScenario(prepareScenario(path), { threads: 1 }));
    const camera = set.summary.camera as Record<string, number>;
    expect(camera.cameraPixelUm).toBe(13);
    expect(camera.cameraPixelSize).toBe(13);
    expect(camera.objectPlanePixelUm).toBeCloseTo(13 / 40, 14);
    expect(set.summary.lengthUnit).toBe('um');
  });
});

describe("compare's sidecar reader", () => {
  it('reads pixelSize with lengthUnit (this version) and pixelUm (earlier files)', () => {
    const write = (name: string, body: Record<string, unknown>): string => {
      writeFileSync(join(dir, `${name}.json`), JSON.stringify(body));
      writeFileSync(join(dir, `${name}.npy`), '');
      return join(dir, `${name}.npy`);
    };
    expect(readSidecar(write('new-sites', { pixelSize: 0.5, lengthUnit: 'sites', atomsPerGreyLevel: 0.01 }))).toMatchObject({ pixelSize: 0.5, lengthUnit: 'sites' });
    expect(readSidecar(write('new-um', { pixelSize: 0.25, pixelUm: 0.25, lengthUnit: 'um' }))).toMatchObject({ pixelSize: 0.25, lengthUnit: 'um' });
    const old = readSidecar(write('old', { pixelUm: 0.75, lengthUnit: 'micrometres' }));
    expect(old).toMatchObject({ pixelSize: 0.75 });
    expect(old).not.toHaveProperty('lengthUnit');
  });
});

describe('compare reads a sidecar only in the unit of its scenario', () => {
  it('a sidecar in µm beside a frame compared with a dimensionless scenario is refused, naming --pixel-sites', async () => {
    const { runCompareCommand } = await import('../../src/cli/commands/compare.js');
    const dir = mkdtempSync(join(tmpdir(), 'tiercake-sidecar-unit-'));
    const scenario = join(dir, 'scenario.json');
    writeFileSync(scenario, JSON.stringify({ name: 'unit-check', energyUnit: 'U', lattice: { shape: [8, 8], boundary: 'open' }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.01 }, particles: { chemicalPotential: 0.5 } }));
    const frame = join(dir, 'picture.npy');
    writeFileSync(frame, encodeNpy(new Float64Array(64), [8, 8]));
    writeFileSync(join(dir, 'picture.json'), JSON.stringify({ pixelSize: 0.532, pixelUm: 0.532, lengthUnit: 'um', quantity: 'atoms per pixel' }));
    await expect(runCompareCommand(scenario, { image: frame, set: [], out: join(dir, 'never'), threads: '1', quiet: true })).rejects.toThrow(
      /^--pixel-sites: .*picture\.json gives the pixel size in µm, but the scenario is dimensionless/,
    );
    expect(existsSync(join(dir, 'never'))).toBe(false);
  });
});
