// The start both counting models share (absorption, absorptionImage.ts, and fluorescence,
// fluorescenceImage.ts): the camera's gain and read noise with their checks (cameraNoise.ts),
// the region mask checked against the frame, and the three per-pixel results each model
// fills (atoms, their variance, the mask of used pixels). In one place so that both refuse
// the same bad settings in the same order and hand back arrays of the frame's size.

import { cameraNoise, type CameraNoiseSettings } from './cameraNoise.js';
import { checkMask, type PixelImage, type PixelMask } from './pixelImage.js';

export interface CountingStart {
  gain: number;
  readNoise: number;
  width: number;
  height: number;
  /** width * height */
  count: number;
  /** atoms per pixel, to be filled (zeros) */
  atomsPerPixel: Float64Array;
  /** variance of atomsPerPixel, to be filled (zeros) */
  atomsVariance: Float64Array;
  /** 1 where a pixel is used, to be filled (zeros) */
  mask: Uint8Array;
}

/** Checks the noise settings and the region against `frame`; allocates the per-pixel results. */
export function countingStart(frame: PixelImage, settings: CameraNoiseSettings & { region?: PixelMask }): CountingStart {
  const { gain, readNoise } = cameraNoise(settings);
  const { width, height } = frame;
  const count = width * height;
  if (settings.region !== undefined) checkMask('region', settings.region, width, height);
  return { gain, readNoise, width, height, count, atomsPerPixel: new Float64Array(count), atomsVariance: new Float64Array(count), mask: new Uint8Array(count) };
}
