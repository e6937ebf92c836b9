// Geometry, region of interest, hot pixels, background plane and shot stacks. References:
// exact index permutations worked out by hand; conservation of the total and of a uniform
// field (area-weighted resampling, Fruchter & Hook, PASP 114, 144 (2002)); the first moment
// of a rotated Gaussian (rotation of its analytic centre); a plane recovered exactly from
// noise-free data and within its least-squares standard error from noisy data (Bevington &
// Robinson ch. 7); two-pass mean and variance for the stack statistics.

import { describe, expect, it } from 'vitest';
import { flipColumns, flipRows, rotateImage, rotatedPosition, rotationGeometry, transposeImage, unrotatedPosition } from '../../../src/imaging/camera/imageGeometry.js';
import { cropImage, parseRectangle, regionMask } from '../../../src/imaging/camera/regionOfInterest.js';
import { removeHotPixels } from '../../../src/imaging/camera/hotPixels.js';
import { subtractBackgroundPlane } from '../../../src/imaging/camera/backgroundPlane.js';
import { summariseShotStack } from '../../../src/imaging/camera/shotStack.js';
import { seededRandom } from '../../../src/numerics/seededRandom.js';
import { samplePoisson } from '../../../src/imaging/shotNoise.js';
import type { PixelImage } from '../../../src/imaging/camera/pixelImage.js';
import { gaussianAtomsPerPixel } from './syntheticFrames.js';

function brightPixel(width: number, height: number, x: number, y: number): PixelImage {
  const values = new Float64Array(width * height);
  values[y * width + x] = 1;
  return { width, height, values };
}

function argmax(img: PixelImage): { x: number; y: number } {
  let best = 0;
  for (let i = 1; i < img.values.length; i++) if (img.values[i] > img.values[best]) best = i;
  return { x: best % img.width, y: Math.floor(best / img.width) };
}

function centroid(img: PixelImage): { x: number; y: number } {
  let s = 0, sx = 0, sy = 0;
  for (let y = 0; y < img.height; y++) for (let x = 0; x < img.width; x++) {
    const v = img.values[y * img.width + x];
    s += v; sx += v * x; sy += v * y;
  }
  return { x: sx / s, y: sy / s };
}

describe('transpose and mirrors', () => {
  it('a pixel at (row 3, col 7) goes to (row 7, col 3) on transpose, and mirrors as worked out by hand', () => {
    const img = brightPixel(10, 6, 7, 3);
    const t = transposeImage(img);
    expect([t.width, t.height]).toEqual([6, 10]);
    expect(argmax(t)).toEqual({ x: 3, y: 7 });
    expect(argmax(flipColumns(img))).toEqual({ x: 2, y: 3 });
    expect(argmax(flipRows(img))).toEqual({ x: 7, y: 2 });
    expect(Array.from(transposeImage(t).values)).toEqual(Array.from(img.values));
  });
});

describe('rotation about the frame centre, conserving the total', () => {
  it('90 degrees counter-clockwise on screen is an exact permutation: right of centre goes above it', () => {
    const img = brightPixel(9, 9, 7, 4); // 3 pixels right of the centre (4, 4)
    const r = rotateImage(img, 90);
    expect(argmax(r)).toEqual({ x: 4, y: 1 });
    expect(r.values.reduce((a, b) => a + b, 0)).toBe(1);
    expect(argmax(rotateImage(img, -90))).toEqual({ x: 4, y: 7 });
    expect(argmax(rotateImage(img, 180))).toEqual({ x: 1, y: 4 });
  });

  it('any angle: the total is conserved to 1e-12 with expand, and a uniform field stays uniform where fully covered', () => {
    const rnd = seededRandom('geometry/total');
    const img = { width: 31, height: 23, values: Float64Array.from({ length: 31 * 23 }, () => rnd.uniform()) };
    const total = img.values.reduce((a, b) => a + b, 0);
    for (const angle of [7.5, 33, 45, 90 + 1e-3, 123.4, -61]) {
      const r = rotateImage(img, angle, { expand: true });
      expect(Math.abs(r.totalOut - total) / total).toBeLessThan(1e-12);
      expect(Math.abs(r.lostOutside)).toBeLessThan(1e-9);
    }
    const flat = { width: 40, height: 40, values: new Float64Array(1600).fill(2.5) };
    const r = rotateImage(flat, 27);
    let worst = 0;
    for (let i = 0; i < r.values.length; i++) if (r.coverage[i] > 1 - 1e-12) worst = Math.max(worst, Math.abs(r.values[i] - 2.5));
    expect(worst).toBeLessThan(1e-12);
    const lost = rotateImage(flat, 27);
    expect(lost.lostOutside).toBeGreaterThan(0); // corners leave a frame of the same size
    expect(lost.totalOut + lost.lostOutside).toBeCloseTo(4000, 9);
  });

  it('the centroid of a Gaussian moves to the rotated position of its analytic centre (within 0.02 pixel)', () => {
    const cloud = { width: 64, height: 48, centreX: 40.3, centreY: 20.8, sigmaXPixels: 4, sigmaYPixels: 2.5, atoms: 1000 };
    const img = gaussianAtomsPerPixel(cloud);
    for (const angle of [30, -72.5]) {
      const r = rotateImage(img, angle, { expand: true });
      const expected = rotatedPosition(r.geometry, cloud.centreX, cloud.centreY);
      const got = centroid(r);
      expect(Math.abs(got.x - expected.x)).toBeLessThan(0.02);
      expect(Math.abs(got.y - expected.y)).toBeLessThan(0.02);
      const back = unrotatedPosition(r.geometry, expected.x, expected.y);
      expect(back.x).toBeCloseTo(cloud.centreX, 10);
      expect(back.y).toBeCloseTo(cloud.centreY, 10);
    }
    expect(rotationGeometry(64, 48, 90, true)).toMatchObject({ outputWidth: 48, outputHeight: 64 });
  });

  it('masked pixels contribute nothing and show in the coverage; an unmasked NaN is refused', () => {
    const img = { width: 8, height: 8, values: new Float64Array(64).fill(1) };
    img.values[10] = NaN;
    expect(() => rotateImage(img, 10)).toThrow(/pixel \(x = 2, y = 1\) is not finite/);
    const mask = new Uint8Array(64).fill(1);
    mask[10] = 0;
    const r = rotateImage(img, 10, { mask, expand: true });
    expect(r.totalOut).toBeCloseTo(63, 10);
    expect(r.coverage.reduce((a, b) => a + b, 0)).toBeCloseTo(63, 10);
  });
});

describe('region of interest', () => {
  it('rectangle mask, crop, parsing', () => {
    const rect = parseRectangle('2, 1, 3, 2');
    expect(rect).toEqual({ x0: 2, y0: 1, width: 3, height: 2 });
    const m = regionMask({ kind: 'rectangle', rectangle: rect }, 6, 4);
    expect(Array.from(m)).toEqual([0, 0, 0, 0, 0, 0, 0, 0, 1, 1, 1, 0, 0, 0, 1, 1, 1, 0, 0, 0, 0, 0, 0, 0]);
    const img = { width: 6, height: 4, values: Float64Array.from({ length: 24 }, (_, i) => i) };
    expect(Array.from(cropImage(img, rect).values)).toEqual([8, 9, 10, 14, 15, 16]);
    expect(() => parseRectangle('1,2,3')).toThrow(/--roi: expected x0,y0,width,height/);
    expect(() => regionMask({ kind: 'rectangle', rectangle: { x0: 4, y0: 0, width: 3, height: 1 } }, 6, 4)).toThrow(/inside the 6 x 4 frame/);
    const maskImg = { width: 2, height: 2, values: Float64Array.of(0, 3, NaN, -1) };
    expect(Array.from(regionMask({ kind: 'mask', mask: maskImg }, 2, 2))).toEqual([0, 1, 0, 1]);
  });
});

describe('hot pixels', () => {
  it('finds injected hot and dead pixels in a Poisson frame with a smooth cloud, and no others', () => {
    const rnd = seededRandom('hot/frame');
    const cloud = gaussianAtomsPerPixel({ width: 60, height: 50, centreX: 30, centreY: 25, sigmaXPixels: 6, sigmaYPixels: 5, atoms: 2e5 });
    const values = Float64Array.from(cloud.values, (v) => samplePoisson(1000 + v, rnd));
    const hot = [[5, 5], [40, 12], [30, 25], [31, 25], [59, 49]];
    for (const [x, y] of hot) values[y * 60 + x] += 600;
    values[20 * 60 + 10] = 0;
    const r = removeHotPixels({ width: 60, height: 50, values });
    expect(r.hotCount).toBe(5);
    expect(r.coldCount).toBe(1);
    const found = Array.from(r.replacedIndices).sort((a, b) => a - b);
    expect(found).toEqual([...hot.map(([x, y]) => y * 60 + x), 20 * 60 + 10].sort((a, b) => a - b));
    // The MAD of the residuals is about 0.674 * sqrt(1000 * (1 + 1/8 * pi/2)) for Poisson noise (median of 8 has variance ~ pi/2 sigma^2/8): between 20 and 26.
    expect(r.residualMad).toBeGreaterThan(20);
    expect(r.residualMad).toBeLessThan(26);
  });
});

describe('background plane from the border', () => {
  it('recovers a + b x + c y without noise (to the cloud tail on the border), with a cloud in the middle', () => {
    const cloud = gaussianAtomsPerPixel({ width: 50, height: 40, centreX: 25, centreY: 20, sigmaXPixels: 3, sigmaYPixels: 3, atoms: 500 });
    const values = Float64Array.from(cloud.values, (v, i) => v + 12.5 + 0.03 * (i % 50) - 0.02 * Math.floor(i / 50));
    const r = subtractBackgroundPlane({ width: 50, height: 40, values }, { borderPixels: 4 });
    expect(r.offset).toBeCloseTo(12.5, 6);
    // The cloud's Gaussian tail reaches the border at about 5 sigma (1e-6 of its peak): slopes to 1e-7.
    expect(r.slopeX).toBeCloseTo(0.03, 7);
    expect(r.slopeY).toBeCloseTo(-0.02, 7);
    expect(r.subtracted.values.reduce((a, b) => a + b, 0)).toBeCloseTo(500, 3);
    expect(r.borderPixelCount).toBe(50 * 40 - 42 * 32);
  });

  it('with Gaussian noise, the slope is within 3 standard errors sigma / sqrt(sum (x - xbar)^2)', () => {
    const rnd = seededRandom('plane/noise');
    const w = 64, h = 48, sigma = 2;
    const values = Float64Array.from({ length: w * h }, (_, i) => 100 + 0.05 * (i % w) + sigma * rnd.normal());
    const r = subtractBackgroundPlane({ width: w, height: h, values }, { borderPixels: 6 });
    let sxx = 0, n = 0, mx = 0;
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) if (x < 6 || y < 6 || x >= w - 6 || y >= h - 6) { mx += x; n++; }
    mx /= n;
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) if (x < 6 || y < 6 || x >= w - 6 || y >= h - 6) sxx += (x - mx) ** 2;
    expect(Math.abs(r.slopeX - 0.05)).toBeLessThan(3 * sigma / Math.sqrt(sxx));
    expect(Math.abs(r.residualRms / sigma - 1)).toBeLessThan(0.05);
    expect(() => subtractBackgroundPlane({ width: w, height: h, values }, { borderPixels: 30 })).toThrow(/borderPixels/);
  });
});

describe('shot stacks', () => {
  it('per-shot atoms, mean/std images and N statistics agree with a two-pass computation; masks are common', () => {
    const rnd = seededRandom('stack/shots');
    const shots = Array.from({ length: 7 }, () => ({ image: { width: 4, height: 3, values: Float64Array.from({ length: 12 }, () => 10 + 3 * rnd.normal()) } }));
    const mask = new Uint8Array(12).fill(1);
    mask[5] = 0;
    (shots[2] as { image: PixelImage; mask?: Uint8Array }).mask = mask;
    const s = summariseShotStack(shots);
    expect(s.commonPixelCount).toBe(11);
    const N = shots.map((sh) => sh.image.values.reduce((a, v, i) => (i === 5 ? a : a + v), 0));
    N.forEach((v, k) => expect(s.atomsPerShot[k]).toBeCloseTo(v, 10));
    const mean = N.reduce((a, b) => a + b, 0) / 7;
    const std = Math.sqrt(N.reduce((a, b) => a + (b - mean) ** 2, 0) / 6);
    expect(s.atoms.mean).toBeCloseTo(mean, 10);
    expect(s.atoms.std).toBeCloseTo(std, 10);
    expect(s.atoms.standardError).toBeCloseTo(std / Math.sqrt(7), 10);
    const px = shots.map((sh) => sh.image.values[0]);
    const pm = px.reduce((a, b) => a + b, 0) / 7;
    expect(s.meanImage.values[0]).toBeCloseTo(pm, 12);
    expect(s.stdImage.values[0]).toBeCloseTo(Math.sqrt(px.reduce((a, b) => a + (b - pm) ** 2, 0) / 6), 12);
    expect(s.usedShotCount[5]).toBe(6);
  });
});
