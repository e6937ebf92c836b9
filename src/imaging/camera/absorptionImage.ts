// Absorption imaging from raw camera frames: optical depth, column density and atoms per
// pixel, with the saturation correction of Reinaudi, Lahaye, Wang and Guery-Odelin, "Strong
// saturation absorption imaging of dense clouds of ultracold atoms", Opt. Lett. 32, 3143
// (2007):
//
//   I  = I_atoms - I_dark,  I0 = I_probe - I_dark            (counts per pixel, one exposure)
//   OD = ln(I0 / I)                                          (measured optical depth)
//   sigma0 n = alpha ln(I0 / I) + (I0 - I) / I_sat           (modified Beer-Lambert law)
//
// with n the column density (atoms / um^2), sigma0 the resonant cross-section
// (resonantCrossSection.ts), I_sat the saturation intensity expressed in the same counts per
// pixel per exposure (`saturationCounts`), and alpha >= 1 the factor that absorbs the
// imperfections of the real transition (polarisation, pumping, detuning). Without
// saturationCounts the second term is dropped: plain Beer-Lambert, sigma0 n = alpha OD, and
// the result says so (`saturationCorrected: false` and a warning), because at probe
// intensities of a few per cent of I_sat and above the atom number is then too low.
//
// Atoms per pixel = n * pixelAreaUm2, the pixel's area in the object plane (camera pixel /
// magnification, squared), in um^2, matching sigma0 in um^2: both areas in one unit, so the
// result is a pure number of atoms.
//
// Pixels that cannot give a number are masked and counted, never turned into infinities:
// - outside the region mask given by the caller;
// - weak probe: I0 below `minimumProbeCounts` (default 20 counts: the logarithm of a few
//   counts is dominated by shot and read noise; common practice);
// - optical-depth limit: no transmitted light (I <= 0) or OD above `maximumOpticalDepth`
//   (default 4: above it the transmitted light is comparable to stray light and noise, so
//   the OD is not measured; common practice, set it from your imaging system);
// - a non-finite raw value (e.g. a FITS BLANK).
// Masked pixels hold NaN in every per-pixel output; totals are sums over the used pixels.
//
// Photon shot noise (for fit weights and for fluctuation thermometry): with g camera counts
// per photoelectron, var(raw) = g * raw + readNoise^2 per frame, propagated linearly through
// the formula above (derivatives of sigma0 n: -alpha/I - 1/I_sat with respect to I,
// alpha/I0 + 1/I_sat with respect to I0, and alpha (1/I - 1/I0) with respect to I_dark).

import { ParameterError, requirePositive } from '../../physics/parameterError.js';
import { checkImage, checkSameSize, type CameraWarning, type PixelImage, type PixelMask } from './pixelImage.js';
import type { CameraNoiseSettings } from './cameraNoise.js';
import { countingStart } from './countingStart.js';

export interface AbsorptionFrames {
  /** Raw counts with the cloud in the probe beam. */
  withAtoms: PixelImage;
  /** Raw counts of the probe beam alone. */
  probeOnly: PixelImage;
  /** Raw counts without probe light (background and camera offset); optional. */
  dark?: PixelImage;
}

export interface AbsorptionSettings extends CameraNoiseSettings {
  /** Resonant cross-section sigma0, um^2. */
  crossSectionUm2: number;
  /** Object-plane area of one pixel, um^2. */
  pixelAreaUm2: number;
  /** I_sat in counts per pixel per exposure; omit for plain Beer-Lambert. */
  saturationCounts?: number;
  /** Reinaudi's alpha (dimensionless, >= 1 in practice); default 1. */
  alpha?: number;
  /** Least dark-subtracted probe counts for a pixel to be used; default 20. */
  minimumProbeCounts?: number;
  /** Largest measured OD = ln(I0/I) a pixel may have; default 4. */
  maximumOpticalDepth?: number;
  /** Region to use (1 = use); default: every pixel. */
  region?: PixelMask;
}

/** Why a pixel is masked; 0 = used. */
export const AbsorptionPixel = { used: 0, outsideRegion: 1, weakProbe: 2, opticalDepthLimit: 3, nonFinite: 4 } as const;

export interface AbsorptionImage {
  width: number;
  height: number;
  /** Measured optical depth ln(I0 / I), NaN where masked. */
  opticalDepth: Float64Array;
  /** Column density n, atoms / um^2, NaN where masked. */
  columnDensityPerUm2: Float64Array;
  /** n * pixel area: atoms in each pixel, NaN where masked. */
  atomsPerPixel: Float64Array;
  /** Photon shot-noise (and read-noise) variance of atomsPerPixel, atoms^2, NaN where masked. */
  atomsVariance: Float64Array;
  /** 1 = used, 0 = masked. */
  mask: PixelMask;
  /** AbsorptionPixel code per pixel. */
  pixelStatus: Uint8Array;
  /** Masked pixels by reason. */
  maskedCounts: { outsideRegion: number; weakProbe: number; opticalDepthLimit: number; nonFinite: number };
  usedPixels: number;
  /** Sum of atomsPerPixel over the used pixels. */
  totalAtoms: number;
  /** Part of totalAtoms from alpha ln(I0/I). */
  beerLambertAtoms: number;
  /** Part of totalAtoms from (I0 - I) / I_sat (0 without saturationCounts). */
  saturationTermAtoms: number;
  /** False: plain Beer-Lambert (no saturationCounts given). */
  saturationCorrected: boolean;
  /** Largest I0 / I_sat over the used pixels (NaN without saturationCounts). */
  peakProbeSaturation: number;
  /** The settings in force (defaults filled in). */
  settings: Required<Omit<AbsorptionSettings, 'saturationCounts' | 'region'>> & { saturationCounts: number | null };
  warnings: CameraWarning[];
}

/** Column density and atoms per pixel from one shot's raw frames (see the file header). */
export function absorptionImage(frames: AbsorptionFrames, settings: AbsorptionSettings): AbsorptionImage {
  const { withAtoms, probeOnly, dark } = frames;
  checkImage('withAtoms', withAtoms);
  checkImage('probeOnly', probeOnly);
  checkSameSize('probeOnly', withAtoms, probeOnly);
  if (dark !== undefined) {
    checkImage('dark', dark);
    checkSameSize('dark', withAtoms, dark);
  }
  requirePositive('crossSectionUm2', settings.crossSectionUm2, 'um^2 (the resonant cross-section, e.g. 0.2907 um^2 for 87Rb)');
  requirePositive('pixelAreaUm2', settings.pixelAreaUm2, 'um^2 (object-plane pixel size squared: (camera pixel / magnification)^2)');
  const alpha = settings.alpha ?? 1;
  requirePositive('alpha', alpha, '(Reinaudi alpha, dimensionless; 1 for an ideal two-level cycling transition)');
  const saturation = settings.saturationCounts;
  if (saturation !== undefined) requirePositive('saturationCounts', saturation, 'counts per pixel per exposure corresponding to I_sat');
  const minimumProbeCounts = settings.minimumProbeCounts ?? 20;
  if (!(minimumProbeCounts > 0) || !Number.isFinite(minimumProbeCounts)) {
    throw new ParameterError('minimumProbeCounts', `expected a positive number of dark-subtracted probe counts, got ${minimumProbeCounts}`);
  }
  const maximumOpticalDepth = settings.maximumOpticalDepth ?? 4;
  requirePositive('maximumOpticalDepth', maximumOpticalDepth, '(largest usable measured OD, e.g. 4)');
  const { gain, readNoise, width, height, count, atomsPerPixel, atomsVariance, mask } = countingStart(withAtoms, settings);

  const opticalDepth = new Float64Array(count);
  const columnDensityPerUm2 = new Float64Array(count);
  const pixelStatus = new Uint8Array(count);
  const maskedCounts = { outsideRegion: 0, weakProbe: 0, opticalDepthLimit: 0, nonFinite: 0 };
  const atomsPerSigmaN = settings.pixelAreaUm2 / settings.crossSectionUm2; // atoms per unit of sigma0 n
  const invSat = saturation === undefined ? 0 : 1 / saturation;
  const read2 = readNoise * readNoise;
  let beerLambert = 0;
  let saturationTerm = 0;
  let usedPixels = 0;
  let peakProbeSaturation = saturation === undefined ? NaN : 0;
  const a = withAtoms.values;
  const p = probeOnly.values;
  const d = dark?.values;
  for (let i = 0; i < count; i++) {
    let status: number = AbsorptionPixel.used;
    const rawA = a[i];
    const rawP = p[i];
    const rawD = d === undefined ? 0 : d[i];
    const I = rawA - rawD;
    const I0 = rawP - rawD;
    let od = NaN;
    if (settings.region !== undefined && settings.region[i] === 0) status = AbsorptionPixel.outsideRegion;
    else if (!Number.isFinite(rawA) || !Number.isFinite(rawP) || !Number.isFinite(rawD)) status = AbsorptionPixel.nonFinite;
    else if (!(I0 >= minimumProbeCounts)) status = AbsorptionPixel.weakProbe;
    else if (!(I > 0)) status = AbsorptionPixel.opticalDepthLimit;
    else {
      od = Math.log(I0 / I);
      if (od > maximumOpticalDepth) status = AbsorptionPixel.opticalDepthLimit;
    }
    pixelStatus[i] = status;
    if (status !== AbsorptionPixel.used) {
      if (status === AbsorptionPixel.outsideRegion) maskedCounts.outsideRegion++;
      else if (status === AbsorptionPixel.weakProbe) maskedCounts.weakProbe++;
      else if (status === AbsorptionPixel.opticalDepthLimit) maskedCounts.opticalDepthLimit++;
      else maskedCounts.nonFinite++;
      opticalDepth[i] = NaN;
      columnDensityPerUm2[i] = NaN;
      atomsPerPixel[i] = NaN;
      atomsVariance[i] = NaN;
      continue;
    }
    mask[i] = 1;
    usedPixels++;
    const logTerm = alpha * od;
    const satTerm = (I0 - I) * invSat;
    const sigmaN = logTerm + satTerm;
    opticalDepth[i] = od;
    columnDensityPerUm2[i] = sigmaN / settings.crossSectionUm2;
    atomsPerPixel[i] = sigmaN * atomsPerSigmaN;
    beerLambert += logTerm * atomsPerSigmaN;
    saturationTerm += satTerm * atomsPerSigmaN;
    if (saturation !== undefined) peakProbeSaturation = Math.max(peakProbeSaturation, I0 * invSat);
    // Linear noise propagation (file header).
    const dI = alpha / I + invSat;
    const dI0 = alpha / I0 + invSat;
    const dDark = alpha * (1 / I - 1 / I0);
    const varA = gain * Math.max(rawA, 0) + read2;
    const varP = gain * Math.max(rawP, 0) + read2;
    const varD = d === undefined ? 0 : gain * Math.max(rawD, 0) + read2;
    atomsVariance[i] = atomsPerSigmaN * atomsPerSigmaN * (dI * dI * varA + dI0 * dI0 * varP + dDark * dDark * varD);
  }
  const warnings: CameraWarning[] = [];
  if (saturation === undefined) {
    warnings.push({
      code: 'beer-lambert-only',
      message: 'no saturation counts given: plain Beer-Lambert (sigma0 n = alpha OD); the atom number is too low when the probe is not far below saturation',
    });
  }
  if (maskedCounts.opticalDepthLimit > 0) {
    warnings.push({
      code: 'optical-depth-limit',
      message: `${maskedCounts.opticalDepthLimit} pixel(s) above the optical-depth limit ${maximumOpticalDepth} (or with no transmitted light) are masked: their atoms are missing from the totals`,
    });
  }
  if (maskedCounts.weakProbe > 0) {
    warnings.push({ code: 'weak-probe', message: `${maskedCounts.weakProbe} pixel(s) with fewer than ${minimumProbeCounts} probe counts are masked` });
  }
  if (maskedCounts.nonFinite > 0) {
    warnings.push({ code: 'non-finite-counts', message: `${maskedCounts.nonFinite} pixel(s) with NaN or infinite raw counts are masked` });
  }
  if (usedPixels === 0) warnings.push({ code: 'no-usable-pixels', message: 'no pixel passed the probe and optical-depth checks: no atom number can be given' });
  return {
    width,
    height,
    opticalDepth,
    columnDensityPerUm2,
    atomsPerPixel,
    atomsVariance,
    mask,
    pixelStatus,
    maskedCounts,
    usedPixels,
    totalAtoms: beerLambert + saturationTerm,
    beerLambertAtoms: beerLambert,
    saturationTermAtoms: saturationTerm,
    saturationCorrected: saturation !== undefined,
    peakProbeSaturation,
    settings: {
      crossSectionUm2: settings.crossSectionUm2,
      pixelAreaUm2: settings.pixelAreaUm2,
      alpha,
      minimumProbeCounts,
      maximumOpticalDepth,
      countsPerPhotoelectron: gain,
      readNoiseCounts: readNoise,
      saturationCounts: saturation ?? null,
    },
    warnings,
  };
}
