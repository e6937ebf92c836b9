// The blur's shortcuts (src/imaging/pointSpreadFunction.ts: spans of non-zero pixels in the
// first pass, a table of folded indices at the 'reflect' edges) must give the very bits of
// the plain separable scatter blur. The reference below is that plain blur written out
// independently: for every output pixel, the sum over all input pixels in ascending order of
// w(d) times the input, with the mirror fold between pixel -1 and 0 and between n - 1 and n
// (no-flux boundaries), first along axis 0, then along axis 1. Floating-point addition is
// not associative, so equal bits also show the terms are added in the same order.

import { describe, expect, it } from 'vitest';
import { discreteGaussianKernel, gaussianBlur, type BlurBorder } from '../../src/imaging/pointSpreadFunction.js';
import type { PlanarField } from '../../src/imaging/planarField.js';

const fold = (index: number, n: number): number => {
  const period = 2 * n;
  const m = ((index % period) + period) % period;
  return m < n ? m : period - 1 - m;
};

/** Plain two-pass blur: every input pixel, every tap, zeros included. */
function referenceBlur(image: PlanarField, sigma: number, border: BlurBorder): { values: Float64Array; nx: number; ny: number } {
  const { weights, radius } = discreteGaussianKernel(sigma);
  const grow = border === 'grow';
  const m = grow ? radius : 0;
  const { nx, ny, values } = image;
  const outNx = nx + 2 * m;
  const outNy = ny + 2 * m;
  const tmp = new Float64Array(outNx * ny);
  for (let t = 0; t < outNx; t++) {
    for (let j = 0; j < ny; j++) {
      let sum = 0;
      for (let i = 0; i < nx; i++) {
        for (let d = -radius; d <= radius; d++) {
          const target = grow ? i + m + d : fold(i + d, nx);
          if (target === t) sum += weights[d + radius] * values[i * ny + j];
        }
      }
      tmp[t * ny + j] = sum;
    }
  }
  const out = new Float64Array(outNx * outNy);
  for (let p = 0; p < outNx; p++) {
    for (let t = 0; t < outNy; t++) {
      let sum = 0;
      for (let j = 0; j < ny; j++) {
        for (let e = -radius; e <= radius; e++) {
          const target = grow ? j + m + e : fold(j + e, ny);
          if (target === t) sum += weights[e + radius] * tmp[p * ny + j];
        }
      }
      out[p * outNy + t] = sum;
    }
  }
  return { values: out, nx: outNx, ny: outNy };
}

/** A cloud that covers part of the frame (exact zeros outside), a lone pixel on an edge and in a corner, an empty row. */
function partlyCoveredImage(nx: number, ny: number): PlanarField {
  const values = new Float64Array(nx * ny);
  for (let i = 0; i < nx; i++) {
    for (let j = 0; j < ny; j++) {
      const r2 = (i - 0.4 * nx) ** 2 + ((j - 0.55 * ny) / 1.3) ** 2;
      if (r2 < 0.09 * nx * nx) values[i * ny + j] = 1.7 * Math.exp(-r2 / (0.05 * nx * nx)) + 0.01 * Math.sin(i * 7.3 + j * 1.1);
    }
  }
  values[(nx - 1) * ny + 3] = 0.8; // last row, near the lower edge
  values[ny - 1] = 0.3; // corner
  for (let j = 0; j < ny; j++) values[Math.floor(0.4 * nx) * ny + j] = 0; // an empty row inside the cloud
  return { values, nx, ny };
}

describe('gaussianBlur: the shortcuts give the bits of the plain blur', () => {
  const cases: Array<[number, number, number, BlurBorder]> = [
    [23, 17, 0.5, 'reflect'],
    [23, 17, 0.5, 'grow'],
    [19, 26, 1.7, 'reflect'],
    [12, 9, 3.2, 'reflect'], // kernel radius larger than the image: folds more than once
  ];
  for (const [nx, ny, sigma, border] of cases) {
    it(`${nx} x ${ny}, sigma ${sigma} px, ${border}`, () => {
      const image = partlyCoveredImage(nx, ny);
      const got = gaussianBlur(image, { sigmaPixels: sigma, border });
      const want = referenceBlur(image, sigma, border);
      expect([got.nx, got.ny]).toEqual([want.nx, want.ny]);
      let differing = 0;
      for (let q = 0; q < want.values.length; q++) if (!Object.is(got.values[q], want.values[q])) differing++;
      expect(differing).toBe(0);
      // And atoms are conserved, so the comparison is not between two empty pictures.
      const total = image.values.reduce((s, v) => s + v, 0);
      expect(got.values.reduce((s, v) => s + v, 0)).toBeCloseTo(total, 12);
      expect(total).toBeGreaterThan(1);
    });
  }
  it('an all-zero picture stays zero', () => {
    const got = gaussianBlur({ values: new Float64Array(30), nx: 5, ny: 6 }, { sigmaPixels: 0.8, border: 'reflect' });
    expect(got.values.every((v) => v === 0)).toBe(true);
  });
});
