// `tiercake compare` on raw camera frames, end to end through the command (issue 15). The
// truth: an invented 87Rb layer solved by the project, rendered by the fit's own camera model
// on a 40 x 34 pixel frame with the trap centre at a known off-centre sub-pixel position, then
// turned into raw absorption frames by the camera core's test helper (syntheticFrames.ts):
// the transmitted counts solve the modified Beer-Lambert law of Reinaudi et al., Opt. Lett.
// 32, 3143 (2007), alpha ln(I0/I) + (I0 - I)/I_sat = sigma0 n, with a probe beam of 20000
// counts (I0/I_sat about 1.3: strongly saturated), a dark frame with its own offset, and
// Poisson photon counts on every frame. sigma0 = 3 lambda^2 / 2 pi of the 87Rb D2 line
// (780.241 nm; Steck, "Rubidium 87 D Line Data"; resonantCrossSection.ts).
//
// Checked: the fitted atom number within 1 % of the truth (and within 4 of its quoted
// uncertainties), the trap centre within 0.3 pixel in the right axes of the given frame
// (x = column, y = row from the top), from three TIFF files, from one HDF5 file with three
// datasets, and from a folder of HDF5 shots (a stack: per-shot rows and a bootstrap); and the
// saturation term: without --saturation-counts the measured atoms drop by exactly
// sum_i (I0 - I)/I_sat x pixel area / sigma0 (the second term of Reinaudi's law, computed
// here from the noise-free counts), to within the photon noise.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import h5wasm from 'h5wasm';
import { prepareScenario, scenarioOptics } from '../../src/pipeline/prepareScenario.js';
import { solveScenario } from '../../src/pipeline/solveScenario.js';
import { createPictureRenderer } from '../../src/pipeline/compareFitPicture.js';
import { planarToCamera } from '../../src/imaging/cameraConvention.js';
import { runCompareCommand } from '../../src/cli/commands/compare.js';
import { rawAbsorptionFrames, type RawFrames } from '../imaging/camera/syntheticFrames.js';
import { buildTiff } from '../imaging/camera/tiffBytes.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-compare-camera-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

const scenarioPath = join(dir, 'rb-layer.json');
writeFileSync(
  scenarioPath,
  JSON.stringify({
    name: 'rb-camera-layer',
    energyUnit: 'Hz',
    lattice: { shape: [24, 24] },
    laboratory: { species: '87Rb', wavelengthNm: 1064, depthEr: 12, transverse: { trapFrequencyHz: 9000 } },
    trap: { frequencyHz: 90 },
    particles: { atoms: 600 },
    temperature: { nanokelvin: 2 },
    truncation: { nmax: 5 },
    // Object-plane pixel 5.32 um / 10 = 0.532 um, one lattice spacing.
    camera: { cameraPixelUm: 5.32, magnification: 10, psf: { sigmaUm: 0.4 } },
  }),
);
const pixelUm = 0.532;
const width = 40;
const height = 34;
/** Trap centre on the model's grid (x index, y index upwards) and in the frame as given (column, row from the top). */
const centreGrid = { x: 18.3, y: 15.6 };
const centreGiven = { x: 18.3, y: height - 1 - 15.6 };
const sigma0 = (3 * 0.780241 ** 2) / (2 * Math.PI); // um^2
const saturationCounts = 15000;

let trueAtoms = 0;
let frames: RawFrames;
let truthPerPixel: Float64Array;

function rawFrames(seed: string): RawFrames {
  return rawAbsorptionFrames({
    atomsPerPixel: { width, height, values: truthPerPixel },
    pixelAreaUm2: pixelUm * pixelUm,
    crossSectionUm2: sigma0,
    probePeakCounts: 20000,
    probeWaistPixels: 120,
    saturationCounts,
    alpha: 1,
    darkCounts: 200,
    seed,
  });
}

beforeAll(async () => {
  const prepared = prepareScenario(scenarioPath);
  const truth = await solveScenario(prepared, { threads: 1 });
  trueAtoms = truth.outcome.solve.totals.atoms;
  const optics = { ...scenarioOptics(prepared.resolved), pixelUm };
  const renderer = createPictureRenderer(prepared.resolved.geometry.shape, optics, width, height, false);
  const grid = renderer.render(truth.fields.density, { centreX: centreGrid.x, centreY: centreGrid.y, angleRad: 0, psfSigmaUm: optics.psfSigmaUm, offset: 0 });
  truthPerPixel = planarToCamera({ values: grid, nx: width, ny: height }).values;
  frames = rawFrames('camera/shot-0');
}, 60_000);

const tiffOf = (image: { width: number; height: number; values: Float64Array }) => buildTiff([{ width: image.width, height: image.height, values: image.values }], 'uint16');

async function hdf5Shot(f: RawFrames): Promise<Uint8Array> {
  const { FS } = await h5wasm.ready;
  const path = `/compare-shot-${Math.random().toString(36).slice(2)}.h5`;
  const file = new h5wasm.File(path, 'w');
  const g = file.create_group('shot');
  for (const [name, image] of [['atoms', f.withAtoms], ['probe', f.probeOnly], ['dark', f.dark]] as const) {
    g.create_dataset({ name, data: Uint16Array.from(image.values), shape: [height, width] });
  }
  file.close();
  const bytes = (FS!.readFile(path) as Uint8Array).slice();
  FS!.unlink(path);
  return bytes;
}

interface Comparison {
  fit: { parameters: Array<{ name: string; best: number; uncertainty: number; bootstrapUncertainty: number | null }>; degreesOfFreedom: number; reducedChiSquare: number };
  centre: { fittedTrapCentrePixels: [number, number] };
  image: { totalAtoms: number; measurement: { kind: string; saturationCounts: number | null; crossSection: number } };
  warnings: Array<{ code: string; message: string }>;
  shots: { count: number } | null;
}

async function compare(out: string, options: Record<string, string | boolean>): Promise<Comparison> {
  const code = await runCompareCommand(scenarioPath, { set: [], threads: '1', quiet: true, pixelUm: String(pixelUm), out: join(dir, out), ...options });
  expect(code).toBe(0);
  return JSON.parse(readFileSync(join(dir, out, 'comparison.json'), 'utf8')) as Comparison;
}

function checkFit(result: Comparison): void {
  const byName = Object.fromEntries(result.fit.parameters.map((p) => [p.name, p]));
  const atoms = byName.atoms;
  expect(Math.abs(atoms.best - trueAtoms) / trueAtoms).toBeLessThan(0.01);
  expect(Math.abs(atoms.best - trueAtoms)).toBeLessThan(4 * atoms.uncertainty);
  const [x, y] = result.centre.fittedTrapCentrePixels;
  expect(Math.abs(x - centreGiven.x)).toBeLessThan(0.3);
  expect(Math.abs(y - centreGiven.y)).toBeLessThan(0.3);
  expect([byName.centreXPixels.best, byName.centreYPixels.best]).toEqual([x, y]);
  expect(result.image.measurement.crossSection).toBeCloseTo(sigma0, 6);
}

describe('compare on raw absorption frames', () => {
  it('three TIFF files: N within 1 %, centre within 0.3 pixel in the given frame, saturation term as Reinaudi predicts', async () => {
    writeFileSync(join(dir, 'atoms.tif'), tiffOf(frames.withAtoms));
    writeFileSync(join(dir, 'probe.tif'), tiffOf(frames.probeOnly));
    writeFileSync(join(dir, 'dark.tif'), tiffOf(frames.dark));
    const list = ['atoms.tif', 'probe.tif', 'dark.tif'].map((f) => join(dir, f)).join(',');
    const saturated = await compare('tiff-sat', { absorptionFrames: list, saturationCounts: String(saturationCounts) });
    checkFit(saturated);
    expect(saturated.image.measurement.saturationCounts).toBe(saturationCounts);
    expect(saturated.warnings.map((w) => w.code)).not.toContain('beer-lambert-only');
    // Degrees of freedom: the pixels above the noise less the 3 parameters (N, x, y), fewer than the frame's.
    expect(saturated.fit.degreesOfFreedom).toBeLessThan(width * height - 3);
    expect(saturated.fit.degreesOfFreedom).toBeGreaterThan(200);
    expect(saturated.fit.reducedChiSquare).toBeGreaterThan(0.8);
    expect(saturated.fit.reducedChiSquare).toBeLessThan(1.25);

    // Without the saturation counts: plain Beer-Lambert, said in the output, and the image's
    // atoms lower by the saturation term of Reinaudi's law.
    const plain = await compare('tiff-plain', { absorptionFrames: list });
    expect(plain.warnings.map((w) => w.code)).toContain('beer-lambert-only');
    expect(plain.image.measurement.saturationCounts).toBeNull();
    let predicted = 0;
    for (let i = 0; i < frames.expectedProbe.length; i++) predicted += ((frames.expectedProbe[i] - frames.expectedTransmitted[i]) / saturationCounts) * ((pixelUm * pixelUm) / sigma0);
    const drop = saturated.image.totalAtoms - plain.image.totalAtoms;
    // Photon noise of the term: sqrt(sum var(I0 - I)) / I_sat x area / sigma0 ~ 1.3 atoms here; 5 atoms is 4 sigma.
    expect(Math.abs(drop - predicted)).toBeLessThan(5);
    expect(predicted).toBeGreaterThan(0.2 * trueAtoms); // the term matters at I0 ~ 1.3 I_sat
    // The fit without it is too low, by about that amount.
    const plainAtoms = plain.fit.parameters.find((p) => p.name === 'atoms')!.best;
    expect(plainAtoms).toBeLessThan(0.9 * trueAtoms);
    expect(existsSync(join(dir, 'tiff-sat', 'report.html'))).toBe(true);
    const report = readFileSync(join(dir, 'tiff-plain', 'report.html'), 'utf8');
    expect(report).toContain('beer-lambert-only');
  });

  it('one HDF5 file with three datasets (file.h5:/shot/atoms ...): the same fit', async () => {
    writeFileSync(join(dir, 'shot.h5'), await hdf5Shot(frames));
    const h5 = join(dir, 'shot.h5');
    const result = await compare('hdf5', { absorptionFrames: `${h5}:/shot/atoms,${h5}:/shot/probe,${h5}:/shot/dark`, saturationCounts: String(saturationCounts) });
    checkFit(result);
    expect(result.shots).toBeNull();
  });

  it('a folder of HDF5 shots (--shots with dataset roles): the fit of the mean, per-shot rows and a bootstrap', async () => {
    const folder = join(dir, 'run7');
    mkdirSync(folder);
    for (let k = 0; k < 5; k++) writeFileSync(join(folder, `shot${k + 1}.h5`), await hdf5Shot(rawFrames(`camera/stack-${k}`)));
    writeFileSync(join(folder, 'notes.txt'), 'not a frame file\n'); // skipped
    const result = await compare('stack', { shots: folder, absorptionFrames: '/shot/atoms,/shot/probe,/shot/dark', saturationCounts: String(saturationCounts) });
    checkFit(result);
    expect(result.shots?.count).toBe(5);
    const atoms = result.fit.parameters.find((p) => p.name === 'atoms')!;
    // Shots differ by photon noise only: the bootstrap spread of the mean agrees with the
    // noise-model uncertainty within the scatter of a 5-shot estimate (a factor ~2).
    expect(atoms.bootstrapUncertainty).not.toBeNull();
    expect(atoms.bootstrapUncertainty! / atoms.uncertainty).toBeGreaterThan(0.3);
    expect(atoms.bootstrapUncertainty! / atoms.uncertainty).toBeLessThan(3);
    const rows = readFileSync(join(dir, 'stack', 'shots.csv'), 'utf8').trim().split('\n');
    expect(rows[0].split(',').slice(0, 3)).toEqual(['shot', 'source', 'atoms']);
    expect(rows).toHaveLength(6);
    expect(rows[1]).toContain('shot1.h5');
    for (const file of ['images/stack_mean.npy', 'images/stack_spread.npy', 'thermometry.csv', 'shots.csv-metadata.json']) expect(existsSync(join(dir, 'stack', file)), file).toBe(true);
  });
});
