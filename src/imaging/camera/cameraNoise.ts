// Gain and read noise of a camera, the two settings both counting models (absorption,
// absorptionImage.ts, and fluorescence, fluorescenceImage.ts) need for the noise estimate
// of each pixel: var(counts) = gain * counts (photon shot noise through the gain) + read^2.
// Read once here so that both take the same defaults and refuse the same bad values: a
// negative or non-finite read noise would give a negative or NaN variance.

import { ParameterError, requirePositive } from '../../physics/parameterError.js';

export interface CameraNoiseSettings {
  /** Camera counts per photoelectron (gain), for the noise estimate; default 1. */
  countsPerPhotoelectron?: number;
  /** Read noise per pixel, counts (rms), for the noise estimate; default 0. */
  readNoiseCounts?: number;
}

/** The gain (> 0) and the read noise (>= 0, counts rms) with their defaults; throws on bad values. */
export function cameraNoise(settings: CameraNoiseSettings): { gain: number; readNoise: number } {
  const gain = settings.countsPerPhotoelectron ?? 1;
  requirePositive('countsPerPhotoelectron', gain, '(camera counts per photoelectron)');
  const readNoise = settings.readNoiseCounts ?? 0;
  if (!(readNoise >= 0) || !Number.isFinite(readNoise)) throw new ParameterError('readNoiseCounts', `expected a read noise >= 0 counts rms, got ${readNoise}`);
  return { gain, readNoise };
}
