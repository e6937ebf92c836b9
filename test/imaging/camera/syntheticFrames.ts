// Synthetic camera data with known truth, for the tests of src/imaging/camera:
// - a Gaussian cloud integrated over each pixel (erf differences), with a sub-pixel centre;
// - raw absorption frames from a column-density image through the modified Beer-Lambert
//   law of Reinaudi et al., Opt. Lett. 32, 3143 (2007), alpha ln(I0/I) + (I0 - I)/I_sat =
//   sigma0 n, inverted for the transmitted counts I per pixel by Newton's method in ln I
//   (the left side is strictly decreasing and concave in ln I, so Newton from the
//   Beer-Lambert guess converges);
// - an independent closed form of the same inversion through the Lambert W function,
//   I = alpha I_sat W( (I0 / (alpha I_sat)) exp((I0 / I_sat - sigma0 n) / alpha) ), used to
//   compute expected values (R. M. Corless et al., "On the Lambert W function", Adv. Comput.
//   Math. 5, 329 (1996), for W and Halley's iteration);
// - Poisson photon counts (src/imaging/shotNoise.ts, seeded), a dark frame with its own
//   offset and noise, and a probe beam that varies across the frame.

import { seededRandom, type SeededRandom } from '../../../src/numerics/seededRandom.js';
import { samplePoisson } from '../../../src/imaging/shotNoise.js';
import type { PixelImage } from '../../../src/imaging/camera/pixelImage.js';

/** erf by Abramowitz & Stegun 7.1.26 (absolute error below 1.5e-7). */
export function erf(x: number): number {
  const sign = x < 0 ? -1 : 1;
  const ax = Math.abs(x);
  const t = 1 / (1 + 0.3275911 * ax);
  const poly = t * (0.254829592 + t * (-0.284496736 + t * (1.421413741 + t * (-1.453152027 + t * 1.061405429))));
  return sign * (1 - poly * Math.exp(-ax * ax));
}

export interface GaussianCloud {
  width: number;
  height: number;
  /** Centre column and row, pixels (sub-pixel). */
  centreX: number;
  centreY: number;
  sigmaXPixels: number;
  sigmaYPixels: number;
  atoms: number;
}

/** Atoms per pixel of a 2D Gaussian, integrated exactly over each pixel square. */
export function gaussianAtomsPerPixel(cloud: GaussianCloud): PixelImage {
  const { width, height } = cloud;
  const fx = new Float64Array(width);
  const fy = new Float64Array(height);
  const sx = Math.SQRT2 * cloud.sigmaXPixels;
  const sy = Math.SQRT2 * cloud.sigmaYPixels;
  for (let x = 0; x < width; x++) fx[x] = 0.5 * (erf((x + 0.5 - cloud.centreX) / sx) - erf((x - 0.5 - cloud.centreX) / sx));
  for (let y = 0; y < height; y++) fy[y] = 0.5 * (erf((y + 0.5 - cloud.centreY) / sy) - erf((y - 0.5 - cloud.centreY) / sy));
  const values = new Float64Array(width * height);
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) values[y * width + x] = cloud.atoms * fx[x] * fy[y];
  return { width, height, values };
}

/** Transmitted counts I solving alpha ln(I0/I) + (I0 - I)/Isat = D by Newton in ln I (Isat = Infinity: Beer-Lambert). */
export function transmittedCountsNewton(D: number, I0: number, saturationCounts: number, alpha: number): number {
  if (D === 0) return I0;
  const invSat = Number.isFinite(saturationCounts) ? 1 / saturationCounts : 0;
  let L = Math.log(I0) - D / alpha; // Beer-Lambert guess
  for (let it = 0; it < 100; it++) {
    const I = Math.exp(L);
    const g = alpha * (Math.log(I0) - L) + (I0 - I) * invSat - D;
    const dg = -alpha - I * invSat;
    const step = g / dg;
    L -= step;
    if (Math.abs(step) < 1e-15) break;
  }
  return Math.exp(L);
}

/** Principal-branch Lambert W for z > 0 by Halley's iteration (Corless et al. 1996, eq. 5.9). */
export function lambertW(z: number): number {
  let w = z < 3 ? Math.log1p(z) : Math.log(z) - Math.log(Math.log(z));
  for (let it = 0; it < 100; it++) {
    const e = Math.exp(w);
    const f = w * e - z;
    const step = f / (e * (w + 1) - ((w + 2) * f) / (2 * w + 2));
    w -= step;
    if (Math.abs(step) < 1e-15 * Math.max(1, Math.abs(w))) break;
  }
  return w;
}

/** The same inversion in closed form (file header). */
export function transmittedCountsLambertW(D: number, I0: number, saturationCounts: number, alpha: number): number {
  const z = (I0 / (alpha * saturationCounts)) * Math.exp((I0 / saturationCounts - D) / alpha);
  return alpha * saturationCounts * lambertW(z);
}

export interface RawFrameSettings {
  /** Atoms per pixel (the truth). */
  atomsPerPixel: PixelImage;
  pixelAreaUm2: number;
  crossSectionUm2: number;
  /** Peak probe counts (dark-subtracted) at the beam centre. */
  probePeakCounts: number;
  /** 1/e^2 radius of the probe beam in pixels (large = flat); centred on the frame. */
  probeWaistPixels: number;
  saturationCounts: number;
  alpha: number;
  /** Mean dark counts (camera offset + stray light). */
  darkCounts: number;
  /** Seed name for the photon noise; omit for noise-free expectation frames. */
  seed?: string;
}

export interface RawFrames {
  withAtoms: PixelImage;
  probeOnly: PixelImage;
  dark: PixelImage;
  /** Noise-free dark-subtracted counts: probe I0 and transmitted I. */
  expectedProbe: Float64Array;
  expectedTransmitted: Float64Array;
}

export function probeCounts(settings: RawFrameSettings, x: number, y: number): number {
  const { width, height } = settings.atomsPerPixel;
  const dx = x - (width - 1) / 2;
  const dy = y - (height - 1) / 2;
  const w = settings.probeWaistPixels;
  return settings.probePeakCounts * Math.exp((-2 * (dx * dx + dy * dy)) / (w * w));
}

/** Raw with-atoms, probe-only and dark frames (counts) from a known column density. */
export function rawAbsorptionFrames(settings: RawFrameSettings): RawFrames {
  const { width, height, values } = settings.atomsPerPixel;
  const n = width * height;
  const random: SeededRandom | undefined = settings.seed === undefined ? undefined : seededRandom(settings.seed);
  const draw = (mean: number) => (random === undefined ? mean : samplePoisson(mean, random));
  const expectedProbe = new Float64Array(n);
  const expectedTransmitted = new Float64Array(n);
  const withAtoms = new Float64Array(n);
  const probeOnly = new Float64Array(n);
  const dark = new Float64Array(n);
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x;
      const I0 = probeCounts(settings, x, y);
      const D = (values[i] / settings.pixelAreaUm2) * settings.crossSectionUm2; // sigma0 n
      const I = transmittedCountsNewton(D, I0, settings.saturationCounts, settings.alpha);
      expectedProbe[i] = I0;
      expectedTransmitted[i] = I;
      withAtoms[i] = draw(I + settings.darkCounts);
      probeOnly[i] = draw(I0 + settings.darkCounts);
      dark[i] = draw(settings.darkCounts);
    }
  }
  return {
    withAtoms: { width, height, values: withAtoms },
    probeOnly: { width, height, values: probeOnly },
    dark: { width, height, values: dark },
    expectedProbe,
    expectedTransmitted,
  };
}

/** Shift an image by a sub-pixel amount along x and y, by re-integrating the analytic Gaussian (helper for clarity in tests). */
export function shiftedCloud(cloud: GaussianCloud, dx: number, dy: number): GaussianCloud {
  return { ...cloud, centreX: cloud.centreX + dx, centreY: cloud.centreY + dy };
}
