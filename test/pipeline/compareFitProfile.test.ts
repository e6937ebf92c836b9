// Direct test of src/pipeline/compareFitProfile.ts on analytic Gaussian pictures on the model's
// grid (values[i * ny + j], y up), turned and anisotropic. Every bin is recomputed here by a
// hand count over the pixels whose trap-scaled radius r = sqrt((s_u u)^2 + (s_v v)^2), with
// u = x cos(a) + y sin(a), v = -x sin(a) + y cos(a) about the centre (the lattice axis turned
// by a counter-clockwise, y up), falls in [b w, (b + 1) w): the bin means, the mean radius, the
// noise-model error sqrt(sum sigma^2) / P, the scatter error std / sqrt(P), and the model band
// of first-order propagation, var m_b = J_b C J_b^T with J_b the bin mean of d model / d p
// (Bevington & Robinson, Data Reduction and Error Analysis, 3rd ed., eq. 3.13).

import { describe, expect, it } from 'vitest';
import { compareProfile, type CompareProfileInput } from '../../src/pipeline/compareFitProfile.js';

const nx = 26;
const ny = 22;
const centreX = 12.4;
const centreY = 10.7;
const angleRad = 0.4;
const scaleU = 1;
const scaleV = 1.6;
const binWidth = 1.5;

const scaledRadius = (p: number) => {
  const x = Math.floor(p / ny) - centreX;
  const y = (p % ny) - centreY;
  const u = x * Math.cos(angleRad) + y * Math.sin(angleRad);
  const v = -x * Math.sin(angleRad) + y * Math.cos(angleRad);
  return Math.hypot(scaleU * u, scaleV * v);
};
const size = nx * ny;
const gaussian = (amplitude: number, width: number) => Float64Array.from({ length: size }, (_, p) => amplitude * Math.exp(-(scaledRadius(p) ** 2) / (2 * width * width)));
const model = gaussian(8, 3);
// The data: the model with a ripple that is not radial, so bins have a scatter.
const data = Float64Array.from(model, (m, p) => m + 0.3 * Math.sin(1.7 * p));
const sigma = Float64Array.from(model, (m) => Math.sqrt(m + 0.04));
const mask = Uint8Array.from({ length: size }, (_, p) => (p % 37 === 5 ? 0 : 1));
// Two parameters: the amplitude (d model / d A = model / A) and a flat offset (derivative 1).
const usedIndex = Int32Array.from([...mask.keys()].filter((p) => mask[p] !== 0));
const columns = [Float64Array.from(usedIndex, (p) => model[p] / 8), Float64Array.from(usedIndex, () => 1)];
const covariance = Float64Array.from([0.04, -0.003, -0.003, 0.0009]);

const input: CompareProfileInput = { nx, ny, data, model, sigma, mask, centreX, centreY, angleRad, scaleU, scaleV, binWidth, jacobian: { usedIndex, columns, covariance } };

describe('compareProfile', () => {
  const profile = compareProfile(input);
  it('averages measured and model pictures over the same turned, scaled annuli', () => {
    let checked = 0;
    for (let b = 0; b < profile.pixels.length; b++) {
      const pixels = usedIndex.filter((p) => Math.floor(scaledRadius(p) / binWidth) === b);
      expect(profile.pixels[b]).toBe(pixels.length);
      if (pixels.length === 0) continue;
      const P = pixels.length;
      const mean = (f: (p: number) => number) => pixels.reduce((s, p) => s + f(p), 0) / P;
      const dataMean = mean((p) => data[p]);
      expect(profile.binInner[b]).toBeCloseTo(b * binWidth, 12);
      expect(profile.radius[b]).toBeCloseTo(mean(scaledRadius), 10);
      expect(profile.measuredMean[b]).toBeCloseTo(dataMean, 10);
      expect(profile.modelMean[b]).toBeCloseTo(mean((p) => model[p]), 10);
      expect(profile.measuredError[b]).toBeCloseTo(Math.sqrt(pixels.reduce((s, p) => s + sigma[p] ** 2, 0)) / P, 10);
      if (P >= 2) {
        const variance = pixels.reduce((s, p) => s + (data[p] - dataMean) ** 2, 0) / (P - 1);
        expect(profile.measuredScatterError[b]).toBeCloseTo(Math.sqrt(variance / P), 8);
      }
      const jA = mean((p) => model[p] / 8);
      const jB = 1;
      const band = Math.sqrt(jA * jA * covariance[0] + 2 * jA * jB * covariance[1] + jB * jB * covariance[3]);
      expect(profile.modelBand[b]).toBeCloseTo(band, 10);
      checked++;
    }
    expect(checked).toBeGreaterThan(6);
    expect(profile.binWidth).toBe(binWidth);
  });
  it('has no band without the fit covariance', () => {
    const plain = compareProfile({ ...input, jacobian: undefined });
    expect(Array.from(plain.modelBand).every((v) => Number.isNaN(v))).toBe(true);
    expect(Array.from(plain.measuredMean)).toEqual(Array.from(profile.measuredMean));
  });
});
