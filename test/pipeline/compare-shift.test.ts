// The camera convention end to end (issue 13): a picture written the way `solve` writes its
// pictures (pictureFiles.ts: .npy a[row, col], row 0 at the top, with its sidecar) with the
// trap centre shifted by a known amount is read back by `compare` and the shift is fitted
// back in the right axes of the frame as given (x = column, y = row from the top); the same
// picture stored transposed, turned by a quarter turn, mirrored, or turned by 30 degrees is
// brought upright by --transpose, --rotate, --flip-x and the centre is reported in pixels of
// the file as given. A lattice turned by 7 degrees, a PSF, a background offset and a trap
// frequency factor are fitted back from pictures made with known values; a bound below the
// truth ends in the fit-at-bound warning; a fixed centre and the reduced chi-square over all
// pixels with its degrees of freedom. The pictures are noise-free renderings of the model,
// so the truth is the minimum; tolerances are far above the solver's accuracy (1e-8 in phi).

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { prepareScenario, scenarioOptics } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { createPictureRenderer, type PictureParameters } from '../../src/pipeline/compareFitPicture.js';
import { harmonicTrapPotential } from '../../src/pipeline/compareFitModel.js';
import { pictureFiles } from '../../src/output/pictureFiles.js';
import { latticeSites } from '../../src/imaging/pixelPicture.js';
import { planarToCamera } from '../../src/imaging/cameraConvention.js';
import { rotateImage, rotatedPosition, rotationGeometry } from '../../src/imaging/camera/imageGeometry.js';
import type { PixelImage } from '../../src/imaging/camera/pixelImage.js';
import { encodeNpy } from '../../src/formats/npy.js';
import { runCompareCommand } from '../../src/cli/commands/compare.js';
import { runLattice } from '../../src/solver/runLattice.js';
import { runRequestOf } from '../../src/pipeline/runRequest.js';
import { createSweepExecutor } from '../../src/solver/sweepExecutor.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-compare-shift-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const scenarioPath = join(dir, 'layer.json');
writeFileSync(
  scenarioPath,
  JSON.stringify({
    name: 'shift-layer',
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
const nx = 34;
const ny = 30;
let density: Float64Array;
let trueAtoms = 0;
let render: (p: Partial<PictureParameters>, rotated?: boolean, densityOf?: Float64Array) => Float64Array;

beforeAll(async () => {
  const prepared = prepareScenario(scenarioPath);
  const truth = await solveScenario(prepared, { threads: 1 });
  density = truth.fields.density;
  trueAtoms = truth.outcome.solve.totals.atoms;
  const optics = scenarioOptics(prepared.resolved);
  const plain = createPictureRenderer(prepared.resolved.geometry.shape, optics, nx, ny, false);
  const turned = createPictureRenderer(prepared.resolved.geometry.shape, optics, nx, ny, true);
  render = (p, rotated = false, densityOf = density) =>
    (rotated ? turned : plain).render(densityOf, { centreX: 16, centreY: 14, angleRad: 0, psfSigmaUm: optics.psfSigmaUm, offset: 0, ...p });
}, 60_000);

/** Write a grid picture the way `solve` does (pictureFiles) and return the .npy path. */
function writePicture(name: string, values: Float64Array): string {
  const files = pictureFiles(
    { values, nx, ny, pixelUm: 1, xCentresUm: Float64Array.from({ length: nx }, (_, i) => i - 16), yCentresUm: Float64Array.from({ length: ny }, (_, j) => j - 14) },
    { name, title: name, description: 'test picture', axisNames: ['x', 'y'], lengthUnit: latticeSites },
  );
  for (const a of files.arrays) writeFileSync(join(dir, a.file.replace('images/', '')), a.bytes);
  for (const t of files.texts) writeFileSync(join(dir, t.file.replace('images/', '')), t.text);
  return join(dir, `${name}.npy`);
}

function writeCameraNpy(name: string, image: PixelImage): string {
  const path = join(dir, `${name}.npy`);
  writeFileSync(path, encodeNpy(image.values, [image.height, image.width]));
  return path;
}

interface Result {
  fit: { parameters: Array<{ name: string; best: number; uncertainty: number }>; degreesOfFreedom: number; chiSquarePixels: string };
  centre: { fittedTrapCentrePixels: [number, number] };
  warnings: Array<{ code: string }>;
}

async function compare(out: string, options: Record<string, string | boolean>): Promise<Result> {
  await runCompareCommand(scenarioPath, { set: [], threads: '1', quiet: true, out: join(dir, out), ...options });
  return JSON.parse(readFileSync(join(dir, out, 'comparison.json'), 'utf8')) as Result;
}
const best = (r: Result, name: string) => r.fit.parameters.find((p) => p.name === name)!.best;

describe('a shifted picture written like solve writes its pictures', () => {
  it('fits back the shift in the right axes: +3.25 pixels along x (columns), +1.5 along y = 1.5 rows up', async () => {
    const still = await compare('still', { image: writePicture('still', render({})) });
    const moved = await compare('moved', { image: writePicture('moved', render({ centreX: 16 + 3.25, centreY: 14 + 1.5 })) });
    // Grid centre (16, 14) with y up is column 16, row ny - 1 - 14 = 15 of the file.
    expect(still.centre.fittedTrapCentrePixels[0]).toBeCloseTo(16, 4);
    expect(still.centre.fittedTrapCentrePixels[1]).toBeCloseTo(ny - 1 - 14, 4);
    expect(moved.centre.fittedTrapCentrePixels[0] - still.centre.fittedTrapCentrePixels[0]).toBeCloseTo(3.25, 4);
    expect(moved.centre.fittedTrapCentrePixels[1] - still.centre.fittedTrapCentrePixels[1]).toBeCloseTo(-1.5, 4);
    expect(Math.abs(best(moved, 'atoms') - trueAtoms) / trueAtoms).toBeLessThan(1e-4);
    // The sidecar said 'atoms per pixel' and the pixel size: no options needed.
    expect(moved.warnings.map((w) => w.code)).not.toContain('fit-at-bound');
  });

  it('--transpose, --rotate 90 and --flip-x bring stored frames upright and report the centre in the file as stored', async () => {
    const upright = planarToCamera({ values: render({ centreX: 19.25, centreY: 15.5 }), nx, ny });
    // Upright: column 19.25, row ny - 1 - 15.5 = 13.5.
    const col = 19.25;
    const row = ny - 1 - 15.5;
    // Stored transposed: a[c, r]; its frame has the centre at (x = row, y = col).
    const transposed: PixelImage = { width: ny, height: nx, values: new Float64Array(nx * ny) };
    for (let r = 0; r < ny; r++) for (let c = 0; c < nx; c++) transposed.values[c * ny + r] = upright.values[r * nx + c];
    const t = await compare('transposed', { image: writeCameraNpy('transposed', transposed), pixelSites: '1', countsPerAtom: '1', transpose: true });
    expect(t.centre.fittedTrapCentrePixels[0]).toBeCloseTo(row, 3);
    expect(t.centre.fittedTrapCentrePixels[1]).toBeCloseTo(col, 3);
    // Stored a quarter turn clockwise (so --rotate 90, counter-clockwise, undoes it): the
    // upright pixel (c, r) sits at column ny - 1 - r, row c.
    const clockwise: PixelImage = { width: ny, height: nx, values: new Float64Array(nx * ny) };
    for (let r = 0; r < ny; r++) for (let c = 0; c < nx; c++) clockwise.values[c * ny + (ny - 1 - r)] = upright.values[r * nx + c];
    const q = await compare('quarter', { image: writeCameraNpy('quarter', clockwise), pixelSites: '1', countsPerAtom: '1', rotate: '90' });
    expect(q.centre.fittedTrapCentrePixels[0]).toBeCloseTo(ny - 1 - row, 3);
    expect(q.centre.fittedTrapCentrePixels[1]).toBeCloseTo(col, 3);
    expect(Math.abs(best(q, 'atoms') - trueAtoms) / trueAtoms).toBeLessThan(1e-4);
    // Stored mirrored: column c -> nx - 1 - c.
    const mirrored: PixelImage = { width: nx, height: ny, values: new Float64Array(nx * ny) };
    for (let r = 0; r < ny; r++) for (let c = 0; c < nx; c++) mirrored.values[r * nx + (nx - 1 - c)] = upright.values[r * nx + c];
    const m = await compare('mirrored', { image: writeCameraNpy('mirrored', mirrored), pixelSites: '1', countsPerAtom: '1', flipX: true });
    expect(m.centre.fittedTrapCentrePixels[0]).toBeCloseTo(nx - 1 - col, 3);
    expect(m.centre.fittedTrapCentrePixels[1]).toBeCloseTo(row, 3);
  });

  it('--rotate 30 undoes a frame stored turned by -30 degrees (area-conserving, interpolated)', async () => {
    const upright = planarToCamera({ values: render({ centreX: 17.5, centreY: 14.25 }), nx, ny });
    const stored = rotateImage(upright, -30, { expand: true });
    const where = rotatedPosition(rotationGeometry(nx, ny, -30, true), 17.5, ny - 1 - 14.25);
    const r = await compare('turned', { image: writeCameraNpy('turned', stored), pixelSites: '1', countsPerAtom: '1', rotate: '30' });
    // Two resamplings smooth the picture by about a pixel: the centre and N are unbiased (symmetric, atom-conserving).
    expect(Math.abs(r.centre.fittedTrapCentrePixels[0] - where.x)).toBeLessThan(0.05);
    expect(Math.abs(r.centre.fittedTrapCentrePixels[1] - where.y)).toBeLessThan(0.05);
    expect(Math.abs(best(r, 'atoms') - trueAtoms) / trueAtoms).toBeLessThan(0.005);
  });
});

describe('the other fit parameters, any subset, with bounds', () => {
  it('fits back a lattice turned by 7 degrees (--fit atoms,angle)', async () => {
    const r = await compare('angle', { image: writePicture('angle', render({ angleRad: (7 * Math.PI) / 180 }, true)), fit: 'atoms,angle' });
    expect(best(r, 'angleDeg')).toBeCloseTo(7, 3);
    expect(Math.abs(best(r, 'atoms') - trueAtoms) / trueAtoms).toBeLessThan(1e-4);
  });

  it('fits back a PSF of 0.8 sites, an offset of 0.01 atoms per pixel and a trap 10 % stiffer (--fit atoms,psf,offset,trap)', async () => {
    // The truth at trap frequency factor 1.1: eps = eps + (1.1^2 - 1) eps_trap, solved at the same N.
    const prepared = prepareScenario(scenarioPath);
    const trap = harmonicTrapPotential(prepared.resolved);
    const eps = Float64Array.from(prepared.resolved.model.eps, (e, i) => e + (1.1 * 1.1 - 1) * trap[i]);
    const request = runRequestOf(prepared.resolved);
    const stiff = await runLattice({ ...request, model: { ...request.model, eps }, compressibility: false }, (state) => createSweepExecutor(state, null, 1));
    const values = render({ psfSigmaUm: 0.8, offset: 0.01 }, false, Float64Array.from(stiff.state.measure.density));
    const r = await compare('psf', { image: writePicture('psf', values), fit: 'atoms,psf,offset,trap' });
    expect(best(r, 'psfSigma')).toBeCloseTo(0.8, 3);
    expect(best(r, 'offset')).toBeCloseTo(0.01, 5);
    expect(best(r, 'trapFrequencyFactor')).toBeCloseTo(1.1, 4);
    expect(Math.abs(best(r, 'atoms') - stiff.solve.totals.atoms) / trueAtoms).toBeLessThan(1e-3);
  });

  it('a bound below the truth ends on the bound with the fit-at-bound warning; a fixed centre; chi-square over all pixels', async () => {
    const image = writePicture('bounded', render({}));
    const r = await compare('bounded', { image, fit: 'atoms=100:200' });
    const atoms = r.fit.parameters.find((p) => p.name === 'atoms')!;
    expect(atoms.best).toBeLessThan(201);
    expect(r.warnings.map((w) => w.code)).toContain('fit-at-bound');
    const html = readFileSync(join(dir, 'bounded', 'report.html'), 'utf8');
    expect(html).toContain('fit-at-bound');
    const fixed = await compare('fixed', { image, centrePixels: `16,${ny - 1 - 14}`, chiSquarePixels: 'all' });
    expect(fixed.fit.parameters.map((p) => p.name)).toEqual(['atoms']);
    expect(Math.abs(best(fixed, 'atoms') - trueAtoms) / trueAtoms).toBeLessThan(1e-4);
    expect(fixed.fit.chiSquarePixels).toBe('every used pixel');
    expect(fixed.fit.degreesOfFreedom).toBe(nx * ny - 1);
  });
});
