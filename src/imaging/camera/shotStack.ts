// A stack of N shots of the same experiment processed together: the atom number of every
// shot, the mean and standard-deviation images, and the shot-to-shot statistics of N.
// Per-pixel mean and sample variance by Welford's update (Welford, Technometrics 4, 419
// (1962)), so large means with small spreads lose no digits. A pixel counts in a shot's
// atom number only where it is used in every shot (the common mask), so the numbers of
// different shots cover the same pixels and their spread is not inflated by masking.
// The standard error of the mean atom number is std / sqrt(N); the standard error of the
// standard deviation is std / sqrt(2 (N - 1)) for Gaussian scatter (e.g. Taylor, An
// Introduction to Error Analysis, 2nd ed. (1997), eq. 5.46).

import { ParameterError } from '../../physics/parameterError.js';
import { checkImage, checkMask, checkSameSize, type PixelImage, type PixelMask } from './pixelImage.js';

export interface Shot {
  /** Atoms per pixel. */
  image: PixelImage;
  /** Used pixels of this shot (1 = used); default all finite pixels. */
  mask?: PixelMask;
}

export interface ShotStackSummary {
  shotCount: number;
  width: number;
  height: number;
  /** Atoms of each shot over the common mask. */
  atomsPerShot: Float64Array;
  /** Mean atoms per pixel over the shots where the pixel is used (NaN where used in none). */
  meanImage: PixelImage;
  /** Sample standard deviation per pixel (n - 1), NaN where used in fewer than 2 shots. */
  stdImage: PixelImage;
  /** Number of shots each pixel is used in. */
  usedShotCount: Uint16Array;
  /** Pixels used in every shot. */
  commonMask: PixelMask;
  commonPixelCount: number;
  atoms: {
    mean: number;
    /** Sample standard deviation over shots (NaN for one shot). */
    std: number;
    /** std / sqrt(N). */
    standardError: number;
    /** std / mean. */
    relativeStd: number;
    /** std / sqrt(2 (N - 1)): uncertainty of std for Gaussian scatter. */
    stdUncertainty: number;
    min: number;
    max: number;
  };
}

export function summariseShotStack(shots: readonly Shot[]): ShotStackSummary {
  if (shots.length === 0) throw new ParameterError('shots', 'give at least one shot');
  const first = shots[0].image;
  checkImage('shots[0].image', first);
  const { width, height } = first;
  const n = width * height;
  shots.forEach((shot, k) => {
    checkImage(`shots[${k}].image`, shot.image);
    checkSameSize(`shots[${k}].image`, first, shot.image);
    if (shot.mask !== undefined) checkMask(`shots[${k}].mask`, shot.mask, width, height);
  });
  const used = (shot: Shot, i: number) => (shot.mask === undefined || shot.mask[i] !== 0) && Number.isFinite(shot.image.values[i]);
  const mean = new Float64Array(n);
  const m2 = new Float64Array(n);
  const usedShotCount = new Uint16Array(n);
  const commonMask = new Uint8Array(n).fill(1);
  for (const shot of shots) {
    for (let i = 0; i < n; i++) {
      if (!used(shot, i)) {
        commonMask[i] = 0;
        continue;
      }
      const v = shot.image.values[i];
      const k = ++usedShotCount[i];
      const delta = v - mean[i];
      mean[i] += delta / k;
      m2[i] += delta * (v - mean[i]);
    }
  }
  const std = new Float64Array(n);
  let commonPixelCount = 0;
  for (let i = 0; i < n; i++) {
    if (usedShotCount[i] === 0) mean[i] = NaN;
    std[i] = usedShotCount[i] >= 2 ? Math.sqrt(m2[i] / (usedShotCount[i] - 1)) : NaN;
    if (commonMask[i] === 1) commonPixelCount++;
  }
  const atomsPerShot = new Float64Array(shots.length);
  shots.forEach((shot, k) => {
    let sum = 0;
    for (let i = 0; i < n; i++) if (commonMask[i] === 1) sum += shot.image.values[i];
    atomsPerShot[k] = sum;
  });
  const N = shots.length;
  let mN = 0;
  let s2 = 0;
  let min = Infinity;
  let max = -Infinity;
  for (let k = 0; k < N; k++) {
    const v = atomsPerShot[k];
    const d = v - mN;
    mN += d / (k + 1);
    s2 += d * (v - mN);
    min = Math.min(min, v);
    max = Math.max(max, v);
  }
  const sN = N >= 2 ? Math.sqrt(s2 / (N - 1)) : NaN;
  return {
    shotCount: N,
    width,
    height,
    atomsPerShot,
    meanImage: { width, height, values: mean },
    stdImage: { width, height, values: std },
    usedShotCount,
    commonMask,
    commonPixelCount,
    atoms: {
      mean: mN,
      std: sN,
      standardError: sN / Math.sqrt(N),
      relativeStd: sN / mN,
      stdUncertainty: N >= 2 ? sN / Math.sqrt(2 * (N - 1)) : NaN,
      min,
      max,
    },
  };
}
