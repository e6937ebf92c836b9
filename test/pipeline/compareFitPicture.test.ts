// The compare fit's picture renderer (src/pipeline/compareFitPicture.ts) keeps its last
// pictures and answers a repeat from them. Checked against the camera chain written out
// here from its parts (column along the imaging axis, area-weighted resampling onto the
// grid with the trap centre at the given pixel, Gaussian PSF in 'reflect' mode, flat
// offset): every answer, new or repeated, must be those very bits, and a kept picture must
// not be changed through an answer handed out before.

import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { prepareScenario, scenarioOptics } from '../../src/pipeline/prepareScenario.js';
import { createPictureRenderer, type PictureParameters } from '../../src/pipeline/compareFitPicture.js';
import { columnDensity } from '../../src/imaging/columnDensity.js';
import { resampleToCamera } from '../../src/imaging/cameraResample.js';
import { gaussianBlur } from '../../src/imaging/pointSpreadFunction.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-fit-picture-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));
const path = join(dir, 'layer.json');
writeFileSync(
  path,
  JSON.stringify({ name: 'picture-layer', energyUnit: 'U', lattice: { shape: [14, 12] }, hubbard: { hopping: 0.02 }, trap: { coefficient: 0.02 }, particles: { atoms: 60 }, truncation: { nmax: 4 }, camera: { cameraPixelSites: 1, psf: { sigmaSites: 0.7 } } }),
);
const prepared = prepareScenario(path);
const shape = prepared.resolved.geometry.shape;
const optics = scenarioOptics(prepared.resolved);
const nx = 19;
const ny = 17;

/** A made-up cloud: a Gaussian of atoms per site about a point of the layer. */
function cloud(x0: number, y0: number, peak: number): Float64Array {
  const d = new Float64Array(shape[0] * shape[1]);
  for (let i = 0; i < shape[0]; i++) for (let j = 0; j < shape[1]; j++) d[i * shape[1] + j] = peak * Math.exp(-((i - x0) ** 2 + (j - y0) ** 2) / 8);
  return d;
}

/** The camera chain from its parts. */
function reference(density: Float64Array, q: PictureParameters): Float64Array {
  const column = columnDensity(density, shape, optics.axis);
  const image = resampleToCamera(column, {
    cellUm: optics.cellUm,
    pixelUm: optics.pixelUm,
    originUm: optics.originUm,
    grid: { nx, ny, firstXUm: -q.centreX * optics.pixelUm, firstYUm: -q.centreY * optics.pixelUm },
  });
  const values = gaussianBlur(image, { sigmaPixels: q.psfSigmaUm / optics.pixelUm, border: 'reflect' }).values;
  for (let i = 0; i < values.length; i++) values[i] += q.offset;
  return values;
}

const sameBits = (a: Float64Array, b: Float64Array): boolean => a.length === b.length && a.every((v, i) => Object.is(v, b[i]));
const at = (centreX: number, offset = 0): PictureParameters => ({ centreX, centreY: 8.3, angleRad: 0, psfSigmaUm: optics.psfSigmaUm, offset });

describe('compare fit picture renderer: kept pictures', () => {
  it('a repeat gives the bits of the camera chain, also after the first answer was changed', () => {
    const renderer = createPictureRenderer(shape, optics, nx, ny, false);
    const density = cloud(6.2, 5.4, 1.3);
    const want = reference(density, at(9.37, 0.02));
    const first = renderer.render(density, at(9.37, 0.02));
    expect(sameBits(first, want)).toBe(true);
    first.fill(-1); // a caller writing into its answer
    const repeat = renderer.render(density, at(9.37, 0.02));
    expect(sameBits(repeat, want)).toBe(true);
    repeat.fill(-2); // and into an answer from the kept pictures
    expect(sameBits(renderer.render(density, at(9.37, 0.02)), want)).toBe(true);
    expect(want.reduce((s, v) => s + v, 0)).toBeGreaterThan(10);
  });

  it('another solution with the same picture parameters is rendered anew', () => {
    const renderer = createPictureRenderer(shape, optics, nx, ny, false);
    const a = cloud(6.2, 5.4, 1.3);
    const b = cloud(7.1, 5.0, 0.9);
    renderer.render(a, at(9.37));
    const got = renderer.render(b, at(9.37));
    expect(sameBits(got, reference(b, at(9.37)))).toBe(true);
    expect(sameBits(got, reference(a, at(9.37)))).toBe(false);
  });

  it('after many other pictures (the oldest dropped) every answer is still the camera chain', () => {
    const renderer = createPictureRenderer(shape, optics, nx, ny, false);
    const density = cloud(6.2, 5.4, 1.3);
    const centres = Array.from({ length: 90 }, (_, k) => 8 + 0.013 * k);
    for (const c of centres) renderer.render(density, at(c));
    for (const c of [centres[0], centres[45], centres[89]]) expect(sameBits(renderer.render(density, at(c)), reference(density, at(c)))).toBe(true);
  });
});
