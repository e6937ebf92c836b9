// Weights of the compare fit (src/pipeline/compareFitNoise.ts), checked by hand on small
// images: the border pixels, the background sigma as 1.4826 x the median absolute deviation
// (the consistent Gaussian estimate, Rousseeuw & Croux, JASA 88, 1273 (1993)), the variance
// sum background^2 + (3x3-smoothed atoms)/countsPerAtom + (1/countsPerAtom)^2, and the same
// terms from a model picture. A statistical check: for Poisson counts the weights give a
// reduced chi-square near 1.

import { describe, expect, it } from 'vitest';
import { borderPixels, modelNoiseSigma, pixelNoiseModel, smoothedOverMask } from '../../src/pipeline/compareFitNoise.js';
import { seededRandom } from '../../src/numerics/seededRandom.js';
import { samplePoisson } from '../../src/imaging/shotNoise.js';

describe('pixel noise model', () => {
  it('the border of a 4 x 3 image is its outer ring of 10 pixels', () => {
    const values = Float64Array.from({ length: 12 }, (_, i) => i);
    // (x, y) -> x * 3 + y; the inner pixels are (1, 1) = 4 and (2, 1) = 7.
    expect(borderPixels({ values, nx: 4, ny: 3 }).sort((a, b) => a - b)).toEqual([0, 1, 2, 3, 5, 6, 8, 9, 10, 11]);
  });

  it('sigma^2 = background sigma^2 + smoothed atoms / c + 1 / c^2, by hand', () => {
    // 3 x 3 image, border values 0, 0, 0, 0, 0.2, 0.2, 0.2, 0.2 (median 0.1, MAD 0.1), centre 9.
    const values = new Float64Array([0, 0, 0.2, 0, 9, 0.2, 0, 0.2, 0.2]);
    const c = 10;
    const noise = pixelNoiseModel({ values, nx: 3, ny: 3 }, 0.1, c);
    const bg = 1.4826 * 0.1;
    expect(noise.backgroundSigma).toBeCloseTo(bg, 14);
    // The centre pixel: the 3 x 3 mean is (9 + 0.8) / 9.
    const centre = Math.sqrt(bg * bg + (9.8 / 9) / c + 1 / (c * c));
    expect(noise.sigma[4]).toBeCloseTo(centre, 14);
    // The corner (0, 0): mean over its 2 x 2 neighbourhood (0, 0, 0, 9) = 2.25.
    expect(noise.sigma[0]).toBeCloseTo(Math.sqrt(bg * bg + 2.25 / c + 1 / (c * c)), 14);
    expect(noise.description).toContain('Poisson');
  });

  it('model weights: the same terms, negative model values count as zero', () => {
    const sigma = modelNoiseSigma(new Float64Array([4, -1]), 0.5, 2);
    expect(sigma[0]).toBeCloseTo(Math.sqrt(0.25 + 2 + 0.25), 15);
    expect(sigma[1]).toBeCloseTo(Math.sqrt(0.25 + 0.25), 15);
  });

  it('Poisson counts weighted by the model give a reduced chi-square near 1', () => {
    // 4000 pixels of mean 3 atoms at 50 counts per atom: chi2/nu has a standard deviation
    // sqrt(2 / 4000) = 0.022, so 0.9 .. 1.1 is far outside chance.
    const random = seededRandom('noise-weights');
    const c = 50;
    const mean = 3;
    const n = 4000;
    const model = new Float64Array(n).fill(mean);
    const data = Float64Array.from(model, (m) => samplePoisson(m * c, random) / c);
    const sigma = modelNoiseSigma(model, 0, c);
    let chi2 = 0;
    for (let i = 0; i < n; i++) chi2 += ((data[i] - model[i]) / sigma[i]) ** 2;
    expect(chi2 / n).toBeGreaterThan(0.9);
    expect(chi2 / n).toBeLessThan(1.1);
  });
});

describe('3 x 3 mean over the used pixels', () => {
  it('by hand on a 3 x 3 image with its centre masked, and bit for bit the plain form on a masked 37 x 29 picture', () => {
    // Values x * 3 + y; the corner (0, 0) sees (0, 1) = 1, (1, 0) = 3 and (1, 1) = 4, masked: mean 2.
    const small = Float64Array.from({ length: 9 }, (_, i) => i);
    const mask = Uint8Array.from({ length: 9 }, (_, i) => (i === 4 ? 0 : 1));
    const out = smoothedOverMask(small, 3, 3, mask);
    expect(out[0]).toBe((0 + 1 + 3) / 3);
    // The centre's own neighbours, all but itself: (0 + 1 + 2 + 3 + 5 + 6 + 7 + 8) / 8 = 4.
    expect(out[4]).toBe(32 / 8);
    const random = seededRandom('test/smoothed-over-mask');
    const [nx, ny] = [37, 29];
    const values = Float64Array.from({ length: nx * ny }, () => random.normal());
    const holes = Uint8Array.from({ length: nx * ny }, () => (random.uniform() < 0.2 ? 0 : 1));
    const plain = new Float64Array(nx * ny);
    for (let i = 0; i < nx; i++) {
      for (let j = 0; j < ny; j++) {
        let sum = 0;
        let count = 0;
        for (let a = Math.max(0, i - 1); a <= Math.min(nx - 1, i + 1); a++) {
          for (let b = Math.max(0, j - 1); b <= Math.min(ny - 1, j + 1); b++) {
            if (holes[a * ny + b] === 0) continue;
            sum += values[a * ny + b];
            count++;
          }
        }
        plain[i * ny + j] = count > 0 ? sum / count : 0;
      }
    }
    expect(Array.from(smoothedOverMask(values, nx, ny, holes))).toEqual(Array.from(plain));
  });
});
