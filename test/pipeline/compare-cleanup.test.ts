// `tiercake compare` on fluorescence-style counts with the clean-up a lab needs, end to end:
// four shots in one multi-page TIFF (a stack), a background frame subtracted before dividing
// by the counts per atom, stray light that rises across the frame (removed by the background
// plane fitted on the border of the region, backgroundPlane.ts), a hot pixel in one shot
// (replaced by the median of its neighbours, hotPixels.ts), a region rectangle that crops
// the frames and a mask picture that leaves out a dead column. The truth is the model's own
// picture (atoms known) with Poisson counts; the atom number must come back within 2 % and
// 4 of its uncertainties, and the trap centre in pixels of the frame as given (the crop is
// undone) within 0.1 pixel, and the plane must find the stray light's slopes.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { prepareScenario, scenarioOptics } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { createPictureRenderer } from '../../src/pipeline/compareFitPicture.js';
import { planarToCamera } from '../../src/imaging/cameraConvention.js';
import { encodeNpy } from '../../src/formats/npy.js';
import { runCompareCommand } from '../../src/cli/commands/compare.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { samplePoisson } from '../../src/imaging/shotNoise.js';
import { buildTiff } from '../imaging/camera/tiffBytes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-compare-cleanup-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const scenarioPath = join(dir, 'layer.json');
writeFileSync(
  scenarioPath,
  JSON.stringify({
    name: 'cleanup-layer',
    energyUnit: 'U',
    lattice: { shape: [20, 20] },
    hubbard: { hopping: 0.02 },
    trap: { coefficient: 0.012 },
    particles: { atoms: 250 },
    temperature: { kT: 0.1 },
    truncation: { nmax: 5 },
    camera: { cameraPixelSites: 1, psf: { sigmaSites: 0.6 } },
  }),
);
const width = 40;
const height = 36;
const c = 500;
const offsetCounts = 1000;
const centreGiven = { x: 18.5, y: height - 1 - 16.25 };
let trueAtoms = 0;

beforeAll(async () => {
  const prepared = prepareScenario(scenarioPath);
  const truth = await solveScenario(prepared, { threads: 1 });
  trueAtoms = truth.outcome.solve.totals.atoms;
  const optics = scenarioOptics(prepared.resolved);
  const renderer = createPictureRenderer(prepared.resolved.geometry.shape, optics, width, height, false);
  const atoms = planarToCamera({ values: renderer.render(truth.fields.density, { centreX: 18.5, centreY: 16.25, angleRad: 0, psfSigmaUm: optics.psfSigmaUm, offset: 0 }), nx: width, ny: height }).values;
  const random = seededRandom('cleanup/photons');
  // Stray light rising by 0.8 counts per column and 0.5 per row on top of the offset the background frame removes.
  const stray = (x: number, y: number) => 0.8 * x + 0.5 * y;
  const pages = Array.from({ length: 4 }, (_, s) => {
    const values = Float64Array.from(atoms, (a, i) => samplePoisson(a * c + offsetCounts + stray(i % width, Math.floor(i / width)), random));
    if (s === 2) values[15 * width + 25] = 60000; // a hot pixel at the edge of the cloud
    return { width, height, values };
  });
  writeFileSync(join(dir, 'stack.tif'), buildTiff(pages, 'uint16'));
  writeFileSync(join(dir, 'background.tif'), buildTiff([{ width, height, values: Float64Array.from(atoms, () => samplePoisson(offsetCounts, random)) }], 'uint16'));
  const mask = new Float64Array(width * height).fill(1);
  for (let y = 0; y < height; y++) mask[y * width + 9] = 0; // a dead column
  writeFileSync(join(dir, 'mask.npy'), encodeNpy(mask, [height, width]));
}, 60_000);

interface Result {
  fit: { parameters: Array<{ name: string; best: number; uncertainty: number; bootstrapUncertainty: number | null }> };
  centre: { fittedTrapCentrePixels: [number, number] };
  warnings: Array<{ code: string; message: string }>;
  image: { usedPixels: number; givenFrame: { width: number; height: number } };
}

async function compare(out: string, extra: Record<string, string | boolean>): Promise<Result> {
  const code = await runCompareCommand(scenarioPath, {
    image: join(dir, 'stack.tif'),
    backgroundFrame: join(dir, 'background.tif'),
    countsPerAtom: String(c),
    pixelSites: '1',
    hotPixels: true,
    region: '3,2,34,32',
    regionMask: join(dir, 'mask.npy'),
    set: [],
    threads: '1',
    quiet: true,
    out: join(dir, out),
    ...extra,
  });
  expect(code).toBe(0);
  return JSON.parse(readFileSync(join(dir, out, 'comparison.json'), 'utf8')) as Result;
}

describe('counts with a background frame, hot pixel, stray light, region and mask', () => {
  it('N within 2 % and 4 sigma, centre in the given frame within 0.1 pixel; the hot pixel is counted', async () => {
    const r = await compare('clean', { backgroundBorder: '3' });
    const atoms = r.fit.parameters.find((p) => p.name === 'atoms')!;
    expect(Math.abs(atoms.best - trueAtoms) / trueAtoms).toBeLessThan(0.02);
    expect(Math.abs(atoms.best - trueAtoms)).toBeLessThan(4 * atoms.uncertainty);
    expect(atoms.bootstrapUncertainty).not.toBeNull();
    expect(Math.abs(r.centre.fittedTrapCentrePixels[0] - centreGiven.x)).toBeLessThan(0.1);
    expect(Math.abs(r.centre.fittedTrapCentrePixels[1] - centreGiven.y)).toBeLessThan(0.1);
    expect(r.image.givenFrame).toEqual({ width, height });
    // 34 x 32 cropped pixels less the dead column (x = 9 lies inside the crop, from x0 = 3).
    expect(r.image.usedPixels).toBe(34 * 32 - 32);
    expect(r.warnings.map((w) => w.code)).toContain('hot-pixels-replaced');
    const rows = readFileSync(join(dir, 'clean', 'shots.csv'), 'utf8').trim().split('\n').map((l) => l.split(','));
    const column = rows[0].indexOf('hot_pixels_replaced');
    expect(Number(rows[3][column])).toBeGreaterThanOrEqual(1); // shot 2
  });

  it('the background plane finds the stray light: 0.8 and 0.5 counts per column and row, over the counts per atom', async () => {
    await compare('plane', { backgroundBorder: '3' });
    const rows = readFileSync(join(dir, 'plane', 'shots.csv'), 'utf8').trim().split('\n').map((l) => l.split(','));
    const mean = (name: string) => rows.slice(1).reduce((sum, r) => sum + Number(r[rows[0].indexOf(name)]), 0) / (rows.length - 1);
    // Slope noise: border pixels of sigma sqrt(2 x 1000) / 500 = 0.09 atoms over a ~34-pixel
    // span give about 4e-4 per shot, 2e-4 for the mean of four; 6e-4 is 3 sigma.
    expect(Math.abs(mean('plane_slope_x') - 0.8 / c)).toBeLessThan(6e-4);
    expect(Math.abs(mean('plane_slope_y') - 0.5 / c)).toBeLessThan(6e-4);
  });
});
