// Azimuthal (elliptical) average of an image about a centre: the mean over annuli of a
// trap-scaled radius. In an anisotropic harmonic trap the density is constant on ellipses,
// so each offset from the centre is scaled per axis before taking the radius:
//
//   u = cos(phi) dx + sin(phi) dy,  v = -sin(phi) dx + cos(phi) dy   (pixel offsets, phi = ellipseAngleDeg)
//   r = sqrt((s_u u)^2 + (s_v v)^2)
//
// with s_u, s_v the scale of each (rotated) axis, e.g. pixelUm * omega_u / omega_ref, so r is
// the radius in um of the equivalent isotropic trap of frequency omega_ref (trapScaling in
// localDensityEquationOfState.ts computes these). phi = 0 means the ellipse axes are the
// image's x (columns) and y (rows, downwards).
//
// Bins: bin b holds the pixels with b w <= r < (b + 1) w (w = binWidth, in the units of r).
// Per bin: used pixels, their mean radius, the mean value, the sample standard deviation,
// the standard error of the mean (std / sqrt(count): pixels treated as independent), the sum,
// and the mean of an optional per-pixel variance (e.g. photon noise) for error propagation.
// Pixels are assigned by their centre (no sub-pixel splitting; common practice).

import { ParameterError } from '../../physics/parameterError.js';
import { checkImage, checkMask, type PixelImage, type PixelMask } from './pixelImage.js';

export interface AzimuthalAverageOptions {
  /** Centre column (x), pixels (sub-pixel allowed). */
  centreX: number;
  /** Centre row (y), pixels. */
  centreY: number;
  /** Bin width in units of the scaled radius (default scales: pixels). */
  binWidth: number;
  /** Scale of the first ellipse axis (along phi), radius units per pixel; default 1. */
  scaleU?: number;
  /** Scale of the second ellipse axis, radius units per pixel; default scaleU. */
  scaleV?: number;
  /** Angle of the first ellipse axis from the +x (column) axis towards +y (down), degrees; default 0. */
  ellipseAngleDeg?: number;
  /** Pixels to use (1 = use); non-finite values are always left out. */
  mask?: PixelMask;
  /** Per-pixel variance to average per bin (same layout as the image). */
  variance?: Float64Array;
  /** Number of bins; default: enough to reach the farthest used pixel. */
  binCount?: number;
}

export interface AzimuthalProfile {
  binWidth: number;
  /** Inner edge of each bin, radius units. */
  binInner: Float64Array;
  /** Mean radius of the pixels in each bin (NaN if empty). */
  meanRadius: Float64Array;
  /** Used pixels per bin. */
  pixelCount: Float64Array;
  /** Mean value per bin (NaN if empty). */
  mean: Float64Array;
  /** Sample standard deviation of the values in each bin (NaN below 2 pixels). */
  std: Float64Array;
  /** std / sqrt(pixelCount). */
  standardError: Float64Array;
  /** Sum of the values in each bin. */
  sum: Float64Array;
  /** Mean of the given per-pixel variance per bin (when `variance` was given). */
  meanVariance?: Float64Array;
  /** Bin index of each pixel (-1 = not used), for per-bin sums of other images. */
  pixelBin: Int32Array;
}

export function azimuthalAverage(image: PixelImage, options: AzimuthalAverageOptions): AzimuthalProfile {
  checkImage('image', image);
  const { width, height, values } = image;
  const { centreX, centreY, binWidth } = options;
  if (!Number.isFinite(centreX) || !Number.isFinite(centreY)) throw new ParameterError('centre', `expected a finite centre in pixels, got (${centreX}, ${centreY})`);
  if (!(binWidth > 0) || !Number.isFinite(binWidth)) throw new ParameterError('binWidth', `expected a positive bin width in radius units, got ${binWidth}`);
  const su = options.scaleU ?? 1;
  const sv = options.scaleV ?? su;
  if (!(su > 0) || !(sv > 0) || !Number.isFinite(su) || !Number.isFinite(sv)) {
    throw new ParameterError('scaleU/scaleV', `expected positive axis scales (radius units per pixel), got ${su} and ${sv}`);
  }
  const phi = ((options.ellipseAngleDeg ?? 0) * Math.PI) / 180;
  const cp = Math.cos(phi);
  const sp = Math.sin(phi);
  if (options.mask !== undefined) checkMask('mask', options.mask, width, height);
  if (options.variance !== undefined && options.variance.length !== width * height) {
    throw new ParameterError('variance', `expected ${width * height} per-pixel variances, got ${options.variance.length}`);
  }
  const n = width * height;
  const radius = new Float64Array(n);
  let rMax = 0;
  for (let y = 0; y < height; y++) {
    const dy = y - centreY;
    for (let x = 0; x < width; x++) {
      const dx = x - centreX;
      const u = su * (cp * dx + sp * dy);
      const v = sv * (-sp * dx + cp * dy);
      const i = y * width + x;
      radius[i] = Math.sqrt(u * u + v * v);
      const usable = (options.mask === undefined || options.mask[i] !== 0) && Number.isFinite(values[i]);
      if (usable && radius[i] > rMax) rMax = radius[i];
    }
  }
  let binCount = options.binCount ?? Math.floor(rMax / binWidth) + 1;
  if (!Number.isInteger(binCount) || binCount < 1) throw new ParameterError('binCount', `expected a positive whole number of bins, got ${binCount}`);
  binCount = Math.max(1, binCount);
  const pixelCount = new Float64Array(binCount);
  const radiusSum = new Float64Array(binCount);
  const mean = new Float64Array(binCount);
  const m2 = new Float64Array(binCount);
  const sum = new Float64Array(binCount);
  const varianceSum = options.variance !== undefined ? new Float64Array(binCount) : undefined;
  const pixelBin = new Int32Array(n).fill(-1);
  for (let i = 0; i < n; i++) {
    if ((options.mask !== undefined && options.mask[i] === 0) || !Number.isFinite(values[i])) continue;
    const b = Math.floor(radius[i] / binWidth);
    if (b >= binCount) continue;
    if (varianceSum !== undefined && !Number.isFinite(options.variance![i])) continue;
    pixelBin[i] = b;
    const v = values[i];
    const k = ++pixelCount[b];
    radiusSum[b] += radius[i];
    const delta = v - mean[b];
    mean[b] += delta / k;
    m2[b] += delta * (v - mean[b]);
    sum[b] += v;
    if (varianceSum !== undefined) varianceSum[b] += options.variance![i];
  }
  const binInner = new Float64Array(binCount);
  const meanRadius = new Float64Array(binCount);
  const std = new Float64Array(binCount);
  const standardError = new Float64Array(binCount);
  for (let b = 0; b < binCount; b++) {
    binInner[b] = b * binWidth;
    const k = pixelCount[b];
    meanRadius[b] = k > 0 ? radiusSum[b] / k : NaN;
    if (k === 0) mean[b] = NaN;
    std[b] = k >= 2 ? Math.sqrt(m2[b] / (k - 1)) : NaN;
    standardError[b] = std[b] / Math.sqrt(k);
    if (varianceSum !== undefined) varianceSum[b] = k > 0 ? varianceSum[b] / k : NaN;
  }
  return {
    binWidth,
    binInner,
    meanRadius,
    pixelCount,
    mean,
    std,
    standardError,
    sum,
    ...(varianceSum !== undefined ? { meanVariance: varianceSum } : {}),
    pixelBin,
  };
}
