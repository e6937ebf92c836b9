// The files of one picture (src/output/pictureFiles.ts): 16-bit grey levels store whole
// detected counts exactly (atomsPerGreyLevel = 1 / counts per atom) and otherwise map the
// maximum to 65535 with an error of at most half a level; picture point (i, j) is column i,
// row ny - 1 - j from the top (x right, y up; PNG rows counted from the top, PNG
// specification section 4.1) in the PNGs and in the .npy alike, which is stored a[row, col]
// with shape (ny, nx); scale bars are 1-2-5 lengths of at most a fifth of the picture; the
// sidecar counts the atoms of the picture and states the layout.

import { describe, expect, it } from 'vitest';
import { pictureFiles, quantiseGray16, scaleBarLength, toPngRowOrder } from '../../src/output/pictureFiles.js';
import { latticeSites, micrometres } from '../../src/imaging/pixelPicture.js';
import { decodeNpy } from '../../src/formats/npy.js';

describe('picture files', () => {
  it('grey levels: exact counts when they fit, else the maximum at 65535 within half a level', () => {
    const counts = quantiseGray16(new Float64Array([0, 0.1, 0.25, 3]), 20);
    expect(counts.atomsPerGreyLevel).toBe(1 / 20);
    expect(Array.from(counts.gray)).toEqual([0, 2, 5, 60]);
    const values = new Float64Array([0, 0.3, 1.7, 2.5]);
    const scaled = quantiseGray16(values);
    expect(scaled.atomsPerGreyLevel).toBe(2.5 / 65535);
    for (let i = 0; i < values.length; i++) expect(Math.abs(scaled.gray[i] * scaled.atomsPerGreyLevel - values[i])).toBeLessThanOrEqual(scaled.atomsPerGreyLevel / 2);
    expect(quantiseGray16(new Float64Array([-1, 1])).clippedPixels).toBe(1);
  });

  it('array (i, j) goes to PNG column i, row ny - 1 - j', () => {
    // nx = 3, ny = 2: element (2, 0) (x = 2, bottom row) is PNG row 1, column 2.
    const values = new Uint16Array(6);
    values[2 * 2 + 0] = 9;
    const rows = toPngRowOrder(values, 3, 2, new Uint16Array(6));
    expect(rows[1 * 3 + 2]).toBe(9);
  });

  it('scale bars: the largest 1-2-5 length up to a fifth of the extent', () => {
    expect([scaleBarLength(100), scaleBarLength(24), scaleBarLength(7), scaleBarLength(0.9)]).toEqual([20, 2, 1, 0.1]);
    expect(scaleBarLength(0)).toBe(1);
  });

  it('writes .npy, 16-bit PNG, sidecar and colour PNG; the sidecar sums the atoms', () => {
    const values = Float64Array.from({ length: 12 }, (_, i) => i / 4);
    const picture = { values, nx: 4, ny: 3, pixelUm: 0.5, xCentresUm: Float64Array.of(-0.75, -0.25, 0.25, 0.75), yCentresUm: Float64Array.of(-0.5, 0, 0.5) };
    const files = pictureFiles(picture, { name: 'test', title: 'test picture', description: 'd', axisNames: ['x', 'y'], lengthUnit: latticeSites });
    expect(files.arrays.map((a) => a.file)).toEqual(['images/test.npy', 'images/test.gray16.png']);
    expect(files.image.file).toBe('images/test.png');
    const npy = decodeNpy(files.arrays[0].bytes);
    expect(npy.shape).toEqual([3, 4]);
    // Grid point (i, j) = values[i * 3 + j] sits at row 2 - j, column i.
    for (let i = 0; i < 4; i++) for (let j = 0; j < 3; j++) expect(npy.data[(2 - j) * 4 + i]).toBe(values[i * 3 + j]);
    expect(files.sidecar.arrayOrder).toBe('row = y (top first), column = x');
    expect(files.sidecar.shape).toEqual([3, 4]);
    expect(files.sidecar.atomsInPicture).toBe(values.reduce((s, v) => s + v, 0));
    // Lattice spacings (dimensionless mode): neutral keys with their unit, no key ending in Um.
    expect(files.sidecar.firstPixelCentre).toEqual({ x: -0.75, y: -0.5 });
    expect(files.sidecar.pixelSize).toBe(0.5);
    expect(files.sidecar.lengthUnit).toBe('sites');
    expect(Object.keys(files.sidecar).filter((k) => k.endsWith('Um'))).toEqual([]);
    // Micrometres (laboratory mode): the same plus the ...Um keys, which then hold micrometres.
    const lab = pictureFiles(picture, { name: 'test', title: 'test picture', description: 'd', axisNames: ['x', 'y'], lengthUnit: micrometres });
    expect(lab.sidecar).toMatchObject({ pixelSize: 0.5, pixelUm: 0.5, lengthUnit: 'um', firstPixelCentreUm: { x: -0.75, y: -0.5 } });
    expect(Array.from(files.image.png.subarray(1, 4))).toEqual([0x50, 0x4e, 0x47]); // "PNG"
  });
});
