// Absorption imaging from synthetic raw frames with known truth (syntheticFrames.ts).
// External references: the modified Beer-Lambert law of Reinaudi et al., Opt. Lett. 32,
// 3143 (2007), evaluated independently through the Lambert W function (Corless et al., Adv.
// Comput. Math. 5, 329 (1996)); Beer-Lambert as its I_sat -> infinity limit; Poisson
// statistics of photon counts for the noise estimate; D. A. Steck, "Rubidium 87 D Line
// Data" for sigma0.

import { describe, expect, it } from 'vitest';
import { absorptionImage, AbsorptionPixel } from '../../../src/imaging/camera/absorptionImage.js';
import { resonantCrossSection } from '../../../src/imaging/camera/resonantCrossSection.js';
import { fluorescenceImage } from '../../../src/imaging/camera/fluorescenceImage.js';
import { findCloudCentre } from '../../../src/observables/cloudCentre.js';
import { gaussianAtomsPerPixel, rawAbsorptionFrames, transmittedCountsLambertW, transmittedCountsNewton, type RawFrameSettings } from './syntheticFrames.js';

const rb = resonantCrossSection('87Rb');
const pixelUm = 2.0;
const cloud = { width: 80, height: 64, centreX: 41.3, centreY: 30.6, sigmaXPixels: 8, sigmaYPixels: 6, atoms: 1.0e4 };
const truth = gaussianAtomsPerPixel(cloud);
const trueAtoms = truth.values.reduce((a, b) => a + b, 0);
const base: RawFrameSettings = {
  atomsPerPixel: truth,
  pixelAreaUm2: pixelUm * pixelUm,
  crossSectionUm2: rb.crossSectionUm2,
  probePeakCounts: 3000,
  probeWaistPixels: 200,
  saturationCounts: 2500,
  alpha: 1,
  darkCounts: 110,
};

describe('resonant cross-section', () => {
  it('87Rb D2: sigma0 = 3 lambda^2 / 2 pi = 2.9066929e-9 cm^2 (Steck, Rb 87 D Line Data, table of D2 optical properties; recalled from memory)', () => {
    expect(rb.crossSectionCm2).toBeCloseTo(2.9066929e-9, 15);
    expect(rb.wavelengthNm).toBeCloseTo(780.241, 3);
    expect(resonantCrossSection('7Li').note).toMatch(/not resolved/);
    expect(() => resonantCrossSection('174Yb')).toThrow(/no alkali D2 line/);
  });
});

describe('synthetic frame generator (self-check against the closed form)', () => {
  it('Newton inversion of the Reinaudi law agrees with the Lambert-W closed form to 1e-12', () => {
    for (const D of [0.01, 0.5, 2, 5]) {
      for (const [I0, Isat] of [[3000, 2500], [500, 100], [3000, 30000]]) {
        const a = transmittedCountsNewton(D, I0, Isat, 1.3);
        const b = transmittedCountsLambertW(D, I0, Isat, 1.3);
        expect(Math.abs(a - b) / b).toBeLessThan(1e-12);
        expect(1.3 * Math.log(I0 / a) + (I0 - a) / Isat).toBeCloseTo(D, 12);
      }
    }
  });
});

describe('absorption imaging: atom number and centre from noisy raw frames', () => {
  const frames = rawAbsorptionFrames({ ...base, seed: 'absorption/noisy-1' });
  const result = absorptionImage(frames, { crossSectionUm2: rb.crossSectionUm2, pixelAreaUm2: base.pixelAreaUm2, saturationCounts: base.saturationCounts });

  it('atom number within 1 % of the truth with saturation, Poisson photon noise and a dark frame', () => {
    expect(result.saturationCorrected).toBe(true);
    expect(result.usedPixels).toBe(80 * 64);
    expect(Math.abs(result.totalAtoms / trueAtoms - 1)).toBeLessThan(0.01);
    expect(result.warnings.map((w) => w.code)).not.toContain('beer-lambert-only');
  });

  it('centre within 0.3 pixel in the right axes (x = column 41.3, y = row 30.6), by the windowed centroid of cloudCentre.ts', () => {
    // findCloudCentre indexes axis 0 slowest: shape [height, width] gives centre[0] = row (y), centre[1] = column (x).
    const c = findCloudCentre(result.atomsPerPixel, [cloud.height, cloud.width]);
    expect(Math.abs(c.centre[1] - cloud.centreX)).toBeLessThan(0.3);
    expect(Math.abs(c.centre[0] - cloud.centreY)).toBeLessThan(0.3);
    // A known shift of (+2.4, -1.7) pixels moves the found centre by that amount in the same axes.
    const shifted = rawAbsorptionFrames({ ...base, atomsPerPixel: gaussianAtomsPerPixel({ ...cloud, centreX: cloud.centreX + 2.4, centreY: cloud.centreY - 1.7 }), seed: 'absorption/noisy-2' });
    const r2 = absorptionImage(shifted, { crossSectionUm2: rb.crossSectionUm2, pixelAreaUm2: base.pixelAreaUm2, saturationCounts: base.saturationCounts });
    const c2 = findCloudCentre(r2.atomsPerPixel, [cloud.height, cloud.width]);
    expect(Math.abs(c2.centre[1] - c.centre[1] - 2.4)).toBeLessThan(0.3);
    expect(Math.abs(c2.centre[0] - c.centre[0] + 1.7)).toBeLessThan(0.3);
  });

  it('the saturation term changes N by (A / sigma0) sum (I0 - I) / I_sat, computed in closed form (Lambert W) on the noise-free frames', () => {
    let expected = 0;
    let expectedLog = 0;
    for (let i = 0; i < truth.values.length; i++) {
      const I0 = frames.expectedProbe[i];
      const D = (truth.values[i] / base.pixelAreaUm2) * rb.crossSectionUm2;
      const I = transmittedCountsLambertW(D, I0, base.saturationCounts, 1);
      expected += ((I0 - I) / base.saturationCounts) * (base.pixelAreaUm2 / rb.crossSectionUm2);
      expectedLog += Math.log(I0 / I) * (base.pixelAreaUm2 / rb.crossSectionUm2);
    }
    expect(expected / trueAtoms).toBeGreaterThan(0.2); // the correction matters here: I0 is above I_sat
    expect(Math.abs(result.saturationTermAtoms / expected - 1)).toBeLessThan(0.01);
    expect(Math.abs(result.beerLambertAtoms / expectedLog - 1)).toBeLessThan(0.01);
    const plain = absorptionImage(frames, { crossSectionUm2: rb.crossSectionUm2, pixelAreaUm2: base.pixelAreaUm2 });
    expect(plain.saturationCorrected).toBe(false);
    expect(plain.warnings.map((w) => w.code)).toContain('beer-lambert-only');
    expect(plain.totalAtoms).toBeCloseTo(result.beerLambertAtoms, 8);
    expect(Math.abs(result.totalAtoms - plain.totalAtoms - expected) / expected).toBeLessThan(0.01);
  });

  it('the Beer-Lambert limit: frames made with I_sat -> infinity give the truth with and without the saturation term', () => {
    const bl = rawAbsorptionFrames({ ...base, saturationCounts: Infinity, seed: 'absorption/beer-lambert' });
    const withTerm = absorptionImage(bl, { crossSectionUm2: rb.crossSectionUm2, pixelAreaUm2: base.pixelAreaUm2, saturationCounts: 1e12 });
    const without = absorptionImage(bl, { crossSectionUm2: rb.crossSectionUm2, pixelAreaUm2: base.pixelAreaUm2 });
    expect(Math.abs(withTerm.totalAtoms / without.totalAtoms - 1)).toBeLessThan(1e-6);
    expect(Math.abs(without.totalAtoms / trueAtoms - 1)).toBeLessThan(0.01);
  });

  it('alpha scales the logarithmic term: frames made with alpha = 1.7 are read back right only with alpha = 1.7', () => {
    const f = rawAbsorptionFrames({ ...base, alpha: 1.7 });
    const right = absorptionImage(f, { crossSectionUm2: rb.crossSectionUm2, pixelAreaUm2: base.pixelAreaUm2, saturationCounts: base.saturationCounts, alpha: 1.7 });
    expect(Math.abs(right.totalAtoms / trueAtoms - 1)).toBeLessThan(1e-6); // noise-free frames: exact up to erf and rounding
  });

  it('the photon-noise variance per pixel matches the scatter of 300 noisy realisations (Poisson counts, linear propagation)', () => {
    const small = gaussianAtomsPerPixel({ width: 12, height: 10, centreX: 5.5, centreY: 4.5, sigmaXPixels: 3, sigmaYPixels: 3, atoms: 400 });
    const settings = { ...base, atomsPerPixel: small };
    const M = 300;
    const n = 120;
    const sum = new Float64Array(n);
    const sum2 = new Float64Array(n);
    const predicted = new Float64Array(n);
    for (let s = 0; s < M; s++) {
      const r = absorptionImage(rawAbsorptionFrames({ ...settings, seed: `absorption/variance-${s}` }), { crossSectionUm2: rb.crossSectionUm2, pixelAreaUm2: base.pixelAreaUm2, saturationCounts: base.saturationCounts });
      for (let i = 0; i < n; i++) {
        sum[i] += r.atomsPerPixel[i];
        sum2[i] += r.atomsPerPixel[i] ** 2;
        predicted[i] += r.atomsVariance[i] / M;
      }
    }
    let ratio = 0;
    for (let i = 0; i < n; i++) ratio += (sum2[i] / M - (sum[i] / M) ** 2) * (M / (M - 1)) / predicted[i] / n;
    // Mean over 120 pixels of a variance ratio with relative scatter sqrt(2/299) = 8 %: expect 1 within 3 %.
    expect(Math.abs(ratio - 1)).toBeLessThan(0.03);
  });
});

describe('absorption masks: counted, never infinities', () => {
  it('weak probe, no transmitted light, OD above the limit, non-finite counts and the region', () => {
    const w = 5;
    const h = 2;
    // dark = 100 everywhere; probe 1100 (I0 = 1000) except pixel 1 (I0 = 10: weak).
    const dark = new Float64Array(w * h).fill(100);
    const probe = new Float64Array(w * h).fill(1100);
    probe[1] = 110;
    const atoms = new Float64Array(w * h).fill(600); // OD = ln 2
    atoms[2] = 90; // I < 0: no transmitted light
    atoms[3] = 100 + 1000 * Math.exp(-4.5); // OD 4.5 > 4
    atoms[4] = 100 + 1000 * Math.exp(-3.9); // OD 3.9: used
    atoms[5] = NaN;
    const region = new Uint8Array(w * h).fill(1);
    region[9] = 0;
    const r = absorptionImage(
      { withAtoms: { width: w, height: h, values: atoms }, probeOnly: { width: w, height: h, values: probe }, dark: { width: w, height: h, values: dark } },
      { crossSectionUm2: 0.29, pixelAreaUm2: 1, region },
    );
    expect(r.maskedCounts).toEqual({ outsideRegion: 1, weakProbe: 1, opticalDepthLimit: 2, nonFinite: 1 });
    expect(r.usedPixels).toBe(5);
    expect(Array.from(r.pixelStatus.subarray(0, 6))).toEqual([
      AbsorptionPixel.used, AbsorptionPixel.weakProbe, AbsorptionPixel.opticalDepthLimit, AbsorptionPixel.opticalDepthLimit, AbsorptionPixel.used, AbsorptionPixel.nonFinite,
    ]);
    expect(r.opticalDepth[0]).toBeCloseTo(Math.LN2, 12);
    expect(r.opticalDepth[4]).toBeCloseTo(3.9, 10);
    expect(Number.isNaN(r.atomsPerPixel[2])).toBe(true);
    expect(Number.isFinite(r.totalAtoms)).toBe(true);
    expect(r.totalAtoms).toBeCloseTo((4 * Math.LN2 + 3.9) / 0.29, 8);
    expect(r.warnings.map((x) => x.code)).toEqual(expect.arrayContaining(['beer-lambert-only', 'optical-depth-limit', 'weak-probe', 'non-finite-counts']));
    const higher = absorptionImage(
      { withAtoms: { width: w, height: h, values: atoms }, probeOnly: { width: w, height: h, values: probe }, dark: { width: w, height: h, values: dark } },
      { crossSectionUm2: 0.29, pixelAreaUm2: 1, maximumOpticalDepth: 5, minimumProbeCounts: 5 },
    );
    expect(higher.maskedCounts).toEqual({ outsideRegion: 0, weakProbe: 0, opticalDepthLimit: 1, nonFinite: 1 });
  });

  it('bad settings name the parameter', () => {
    const img = { width: 2, height: 2, values: new Float64Array(4).fill(100) };
    expect(() => absorptionImage({ withAtoms: img, probeOnly: img }, { crossSectionUm2: 0, pixelAreaUm2: 1 })).toThrow(/crossSectionUm2/);
    expect(() => absorptionImage({ withAtoms: img, probeOnly: { ...img, width: 4, height: 1 } }, { crossSectionUm2: 1, pixelAreaUm2: 1 })).toThrow(/probeOnly/);
    expect(() => absorptionImage({ withAtoms: img, probeOnly: img }, { crossSectionUm2: 1, pixelAreaUm2: 1, saturationCounts: -3 })).toThrow(/saturationCounts/);
  });
});

describe('fluorescence', () => {
  it('atoms = (signal - background) / counts per atom; Poisson variance', () => {
    const s = { width: 2, height: 1, values: Float64Array.of(1250, 400) };
    const b = { width: 2, height: 1, values: Float64Array.of(250, 400) };
    const r = fluorescenceImage(s, b, { countsPerAtom: 50 });
    expect(Array.from(r.atomsPerPixel)).toEqual([20, 0]);
    expect(r.totalAtoms).toBe(20);
    expect(r.atomsVariance[0]).toBeCloseTo(1500 / 2500, 12);
  });
});
