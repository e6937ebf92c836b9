// Resampling of a turned lattice onto camera pixels (src/imaging/rotatedResample.ts) and the
// orientation of camera frames with its map back (src/imaging/camera/frameOrientation.ts).
// References: at angle 0 the exact overlaps of axis-aligned squares (cameraResample.ts,
// itself checked against hand-computed overlaps); at 45 degrees the analytic overlaps of a
// unit square turned about a pixel centre: the centre pixel keeps 1 - (sqrt 2 - 1)^2 =
// 2 sqrt 2 - 2 and each of the four edge neighbours gets (sqrt 2 - 1)^2 / 4 (four corner
// triangles of legs sqrt(2)/2 - 1/2); atoms are conserved for a cloud inside the grid;
// a quarter turn takes a site right of the centre to above it (counter-clockwise, y up).

import { describe, expect, it } from 'vitest';
import { resampleRotated } from '../../src/imaging/rotatedResample.js';
import { resampleToCamera } from '../../src/imaging/cameraResample.js';
import { orientFrame, toGivenFrame, toOrientedFrame, givenFrameJacobian } from '../../src/imaging/camera/frameOrientation.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';

const grid = (nx: number, ny: number, x0: number, y0: number, p = 1) => ({ nx, ny, firstXUm: -x0 * p, firstYUm: -y0 * p });

describe('resampling a turned lattice', () => {
  it('at angle 0 equals the separable exact overlaps, for pixels smaller and larger than a site', () => {
    const random = seededRandom('rotated/zero');
    const sites = { values: Float64Array.from({ length: 9 * 7 }, () => random.uniform()), nx: 9, ny: 7 };
    for (const [cell, pixel] of [[1, 1], [1, 0.4], [0.5, 0.7]] as const) {
      const options = { cellUm: cell, pixelUm: pixel, originUm: { x: -4 * cell + 0.13, y: -3 * cell - 0.21 }, grid: grid(31, 29, 15.2, 13.7, pixel) };
      const a = resampleRotated(sites, { ...options, angleRad: 0 });
      const b = resampleToCamera(sites, options);
      for (let i = 0; i < a.values.length; i++) expect(Math.abs(a.values[i] - b.values[i])).toBeLessThan(1e-12);
    }
  });

  it('at 45 degrees gives the analytic overlaps of a turned unit square', () => {
    const one = { values: Float64Array.of(1), nx: 1, ny: 1 };
    const image = resampleRotated(one, { cellUm: 1, pixelUm: 1, originUm: { x: 0, y: 0 }, angleRad: Math.PI / 4, grid: grid(3, 3, 1, 1) });
    const corner = (Math.SQRT2 - 1) ** 2 / 4;
    expect(image.values[1 * 3 + 1]).toBeCloseTo(2 * Math.SQRT2 - 2, 14);
    for (const q of [0 * 3 + 1, 2 * 3 + 1, 1 * 3 + 0, 1 * 3 + 2]) expect(image.values[q]).toBeCloseTo(corner, 14);
    for (const q of [0, 2, 6, 8]) expect(image.values[q]).toBe(0);
    expect(image.atomsOutside).toBeCloseTo(0, 14);
  });

  it('conserves atoms at any angle and turns counter-clockwise (a site right of the centre goes above it)', () => {
    const random = seededRandom('rotated/conserve');
    const sites = { values: Float64Array.from({ length: 11 * 11 }, () => random.uniform()), nx: 11, ny: 11 };
    const total = sites.values.reduce((a, b) => a + b, 0);
    for (const angle of [0.1, 0.7, 2.2, -1.3]) {
      const image = resampleRotated(sites, { cellUm: 1, pixelUm: 0.6, originUm: { x: -5, y: -5 }, angleRad: angle, grid: grid(41, 41, 20, 20, 0.6) });
      const out = image.values.reduce((a, b) => a + b, 0);
      expect(Math.abs(out - total) / total).toBeLessThan(1e-12);
    }
    const marker = { values: new Float64Array(25), nx: 5, ny: 5 };
    marker.values[4 * 5 + 2] = 1; // site (4, 2): 2 sites right of the centre site (2, 2)
    const turned = resampleRotated(marker, { cellUm: 1, pixelUm: 1, originUm: { x: -2, y: -2 }, angleRad: Math.PI / 2, grid: grid(5, 5, 2, 2) });
    expect(turned.values[2 * 5 + 4]).toBeCloseTo(1, 12); // pixel (2, 4): above the centre
  });
});

describe('orienting a camera frame and mapping positions back', () => {
  it('crop, transpose, mirror and turn by 30 degrees: positions map there and back; the linear part is orthogonal', () => {
    const width = 20;
    const height = 14;
    const image = { width, height, values: Float64Array.from({ length: width * height }, (_, i) => i % 7) };
    const { map, mask } = orientFrame(image, null, new Uint8Array(width * height).fill(1), { crop: { x0: 2, y0: 1, width: 15, height: 12 }, transpose: true, flipColumns: true, rotateDeg: 30 });
    for (const [x, y] of [[5, 4], [10.3, 7.9], [16, 12]]) {
      const o = toOrientedFrame(map, x, y);
      const back = toGivenFrame(map, o.col, o.row);
      expect(back.x).toBeCloseTo(x, 12);
      expect(back.y).toBeCloseTo(y, 12);
    }
    const [a, b, c, d] = givenFrameJacobian(map);
    expect(a * a + c * c).toBeCloseTo(1, 12);
    expect(a * b + c * d).toBeCloseTo(0, 12);
    expect(mask.some((m) => m === 0)).toBe(true); // corners of the turned frame are not covered
  });

  it('a quarter turn moves a marker exactly where the map says, with values and variance alike', () => {
    const width = 6;
    const height = 4;
    const values = new Float64Array(width * height);
    values[1 * width + 4] = 5; // column 4, row 1
    const variance = Float64Array.from(values, (v) => 2 * v);
    const o = orientFrame({ width, height, values }, variance, new Uint8Array(width * height).fill(1), { rotateDeg: 90 });
    const where = toOrientedFrame(o.map, 4, 1);
    // Counter-clockwise as displayed: right of the centre goes to the top.
    expect(where.row).toBeLessThan((o.image.height - 1) / 2);
    const q = Math.round(where.row) * o.image.width + Math.round(where.col);
    expect(o.image.values[q]).toBe(5);
    expect(o.variance![q]).toBe(10);
  });
});
