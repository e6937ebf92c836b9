// Direct test of src/pipeline/measuredShots.ts (prepareShots) on synthetic frames whose atoms
// are known in closed form:
// - absorption, plain Beer-Lambert (no saturation term): a probe of I0 counts transmits
//   I = I0 exp(-OD) with OD = sigma0 n (W. Demtroeder, Laser Spectroscopy, Beer's law), plus
//   a dark offset on every frame, so atoms per pixel = ln((I0 - dark) / (I - dark)) A / sigma0
//   for pixel area A;
// - counts: atoms = (counts - background frame) / counts per atom, and the mean of M shots
//   carries M times the counts per atom of one (Poisson counts add);
// - the camera convention (row 0 at the top) against the model's grid (y up), a crop and a
//   transpose, and the refusals named after the option.

import { describe, expect, it } from 'vitest';
import { prepareShots, type RawShot, type ShotPreparation } from '../../src/pipeline/measuredShots.js';
import type { PixelImage } from '../../src/imaging/camera/pixelImage.js';
import { MeasuredImageError } from '../../src/imaging/measuredImage.js';

const width = 5;
const height = 4;
const frame = (f: (col: number, row: number) => number): PixelImage => ({
  width,
  height,
  values: Float64Array.from({ length: width * height }, (_, q) => f(q % width, Math.floor(q / width))),
});
/** Optical depth of the synthetic cloud at (col, row): a bright spot at column 3, row 1. */
const opticalDepth = (col: number, row: number) => 0.2 + 0.1 * col + 0.05 * row + (col === 3 && row === 1 ? 1 : 0);
const plain: ShotPreparation = { pixelUm: 2, hotPixels: false, orientation: { transpose: false, flipColumns: false, flipRows: false, rotateDeg: 0 } };
/** Grid index (x slowest, y up) of camera pixel (col, row) in a frame of `rows` rows. */
const gridIndex = (col: number, row: number, rows = height) => col * rows + (rows - 1 - row);

describe('prepareShots', () => {
  it('turns absorption frames into atoms by Beer-Lambert', () => {
    const I0 = 4000;
    const dark = 120;
    const sigma0 = 0.29;
    const shot: RawShot = {
      label: 'shot',
      signal: frame((c, r) => dark + I0 * Math.exp(-opticalDepth(c, r))),
      probe: frame(() => dark + I0),
      dark: frame(() => dark),
    };
    const prepared = prepareShots([shot], { kind: 'absorption', crossSection: sigma0, crossSectionSource: 'test' }, plain);
    const { measured } = prepared;
    expect([measured.nx, measured.ny, measured.usedPixels, measured.shotCount]).toEqual([width, height, width * height, 1]);
    let total = 0;
    for (let r = 0; r < height; r++) {
      for (let c = 0; c < width; c++) {
        const atoms = (opticalDepth(c, r) * 2 * 2) / sigma0;
        total += atoms;
        expect(measured.values[gridIndex(c, r)]).toBeCloseTo(atoms, 9);
      }
    }
    expect(prepared.perShot[0].atoms).toBeCloseTo(total, 8);
    expect(prepared.perShot[0].absorption?.beerLambertAtoms).toBeCloseTo(total, 8);
    expect(prepared.saturationCorrected).toBe(false);
    expect(prepared.method).toMatch(/^absorption imaging, plain Beer-Lambert/);
    // The imaging noise is a variance per pixel (photon counts), not a counts-per-atom scale.
    expect(measured.countsPerAtom).toBeNull();
    expect(measured.variance?.every((v) => v > 0)).toBe(true);
  });
  it('divides counts by the counts per atom; the mean of a stack carries M times the counts per atom', () => {
    const c = 4;
    const background = frame(() => 10);
    const shots: RawShot[] = [0, 1, 2].map((k) => ({ label: `s${k}`, signal: frame((col, row) => 10 + c * (col + 2 * row + k)), dark: background }));
    const prepared = prepareShots(shots, { kind: 'counts', countsPerAtom: c, unitSource: '--counts-per-atom' }, plain);
    expect(prepared.measured.countsPerAtom).toBe(3 * c);
    expect(prepared.measured.values[gridIndex(3, 1)]).toBeCloseTo(3 + 2 + 1, 12); // mean over k of col + 2 row + k
    // Per shot: sum over the frame of (col + 2 row + k) = 4 x 10 + 5 x 12 + 20 k.
    expect(prepared.perShot.map((s) => s.atoms)).toEqual([100, 120, 140]);
    expect(prepared.shots[2][gridIndex(0, 0)]).toBe(2);
    expect(prepared.method).toBe('counts picture: atoms = (counts - background frame) / 4 counts per atom (--counts-per-atom)');
  });
  it('crops, then transposes, with the map back to the given frame', () => {
    const shot: RawShot = { label: 'one', signal: frame((col, row) => 100 * row + col) };
    const prepared = prepareShots([shot], { kind: 'counts', countsPerAtom: 1, unitSource: 'test' }, {
      ...plain,
      region: { rectangle: { x0: 1, y0: 1, width: 4, height: 3 } },
      orientation: { ...plain.orientation, transpose: true },
    });
    const { measured } = prepared;
    // Cropped 4 wide x 3 high, transposed: 3 wide x 4 high; oriented (col, row) holds given (x0 + row, y0 + col).
    expect([measured.nx, measured.ny]).toEqual([3, 4]);
    for (let row = 0; row < 4; row++) for (let col = 0; col < 3; col++) expect(measured.values[gridIndex(col, row, 4)]).toBe(100 * (1 + col) + (1 + row));
    expect([prepared.map.givenWidth, prepared.map.givenHeight, prepared.map.orientedWidth, prepared.map.orientedHeight]).toEqual([5, 4, 3, 4]);
  });
  it('refuses no shot, frames of different sizes and an absorption shot without its probe', () => {
    const counts = { kind: 'counts' as const, countsPerAtom: 1, unitSource: 'test' };
    expect(() => prepareShots([], counts, plain)).toThrow(MeasuredImageError);
    const small: PixelImage = { width: 2, height: 2, values: new Float64Array(4) };
    expect(() => prepareShots([{ label: 'a', signal: frame(() => 1) }, { label: 'b', signal: small }], counts, plain)).toThrow(
      '--image: b is 2 x 2 pixels but the first frame is 5 x 4; every frame must have the same size',
    );
    expect(() => prepareShots([{ label: 'a', signal: frame(() => 1) }], { kind: 'absorption', crossSection: 1, crossSectionSource: 'test' }, plain)).toThrow(
      '--absorption-frames: a: an absorption shot needs its probe-only frame',
    );
  });
});
