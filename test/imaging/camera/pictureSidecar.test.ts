// Direct test of src/imaging/camera/pictureSidecar.ts by a round trip through the writer of
// tiercake's pictures (src/output/pictureFiles.ts): a picture written with its sidecar is read
// back with the scale the writer put there. The expected numbers are the ones written, worked
// out by hand: whole counts at c counts per atom are stored as grey = counts, so the PNG's
// counts per atom are 1 / atomsPerGreyLevel = c; the float .npy holds atoms, 1 count per atom.

import { afterAll, describe, expect, it } from 'vitest';
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readSidecar } from '../../../src/imaging/camera/pictureSidecar.js';
import { pictureFiles } from '../../../src/output/pictureFiles.js';
import { latticeSites, micrometres, type LengthUnit, type PixelPicture } from '../../../src/imaging/pixelPicture.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-sidecar-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** Writes the sidecar of a 3 x 2 picture of whole counts / c under dir/<sub>/images/. */
function writePicture(sub: string, unit: LengthUnit, pixel: number, countsPerAtom: number): string {
  const counts = [0, 3, 7, 12, 5, 1];
  const picture: PixelPicture = {
    nx: 3,
    ny: 2,
    values: Float64Array.from(counts, (n) => n / countsPerAtom),
    pixelUm: pixel,
    xCentresUm: Float64Array.from([-pixel, 0, pixel]),
    yCentresUm: Float64Array.from([-pixel / 2, pixel / 2]),
  };
  const files = pictureFiles(picture, { name: 'in_situ', title: 'in situ', description: 'test picture', axisNames: ['x', 'y'], lengthUnit: unit, countsPerAtom });
  const images = join(dir, sub, 'images');
  mkdirSync(images, { recursive: true });
  for (const t of files.texts) writeFileSync(join(dir, sub, t.file), t.text);
  return images;
}

describe('readSidecar', () => {
  it('reads back the counts per atom and the pixel of a picture in lattice spacings', () => {
    const images = writePicture('hubbard', latticeSites, 0.5, 4);
    const sidecar = join(images, 'in_situ.json');
    expect(readSidecar(join(images, 'in_situ.gray16.png'))).toEqual({ file: sidecar, countsPerAtom: 4, pixelSize: 0.5, lengthUnit: 'sites' });
    // The float array holds atoms per pixel: one count per atom.
    expect(readSidecar(join(images, 'in_situ.npy'))).toEqual({ file: sidecar, countsPerAtom: 1, pixelSize: 0.5, lengthUnit: 'sites' });
    // The colour PNG finds the same sidecar (the frame reader refuses colour PNGs, so only its pixel matters here).
    expect(readSidecar(join(images, 'in_situ.png'))?.pixelSize).toBe(0.5);
  });
  it('reads a picture in micrometres', () => {
    const images = writePicture('lab', micrometres, 0.8, 2);
    expect(readSidecar(join(images, 'in_situ.gray16.png'))).toEqual({ file: join(images, 'in_situ.json'), countsPerAtom: 2, pixelSize: 0.8, lengthUnit: 'um' });
  });
  it('reads a sidecar of an earlier version (pixelUm only, no unit)', () => {
    const file = join(dir, 'old.json');
    writeFileSync(file, JSON.stringify({ atomsPerGreyLevel: 0.25, pixelUm: 1.2 }));
    expect(readSidecar(join(dir, 'old.gray16.png'))).toEqual({ file, countsPerAtom: 4, pixelSize: 1.2 });
  });
  it('gives nothing for a missing or foreign sidecar, or a file of another kind', () => {
    expect(readSidecar(join(dir, 'absent.npy'))).toBeNull();
    writeFileSync(join(dir, 'notes.json'), 'not json {');
    expect(readSidecar(join(dir, 'notes.npy'))).toBeNull();
    expect(readSidecar(join(dir, 'frames.tif'))).toBeNull();
  });
});
