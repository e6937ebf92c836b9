// In-situ camera picture of a column density: area-weighted resampling to camera pixels
// (cameraResample.ts), then the Gaussian point-spread function on the pixel grid
// (pointSpreadFunction.ts). Resample-then-blur is the order argued for in
// cameraResample.ts. The automatic pixel grid gets a margin of 4 PSF sigmas (plus one
// pixel) so the blurred cloud fits; the blur then runs in 'reflect' mode, which keeps
// the grid and its pixel coordinates unchanged and conserves the atom number exactly
// (weight beyond the margin, below 3e-4 of the peak per pixel, is folded back rather than lost).

import { resampleToCamera, type CameraGrid, type CameraImage } from './cameraResample.js';
import { gaussianBlur } from './pointSpreadFunction.js';
import type { PlanarField } from './planarField.js';

export interface InSituCameraSettings {
  /** Lattice spacing a, um. */
  cellUm: number;
  /** Pixel size in the object plane (camera pixel / magnification), um. */
  pixelUm: number;
  /** Gaussian PSF sigma in the object plane, um (see psfSigmaUm); 0 for none. */
  psfSigmaUm: number;
  /** Centre of site (0, 0), um; default centres the lattice at 0, 0. */
  originUm?: { x: number; y: number };
  /** A fixed pixel grid (e.g. that of a measured image); default: automatic with margin. */
  grid?: CameraGrid;
}

export function inSituImage(column: PlanarField, settings: InSituCameraSettings): CameraImage {
  const { psfSigmaUm, pixelUm } = settings;
  if (!(psfSigmaUm >= 0) || !Number.isFinite(psfSigmaUm)) {
    throw new Error(`inSituImage: PSF sigma must be a finite number of micrometres >= 0, got ${psfSigmaUm}`);
  }
  const image = resampleToCamera(column, {
    cellUm: settings.cellUm,
    pixelUm,
    ...(settings.originUm !== undefined ? { originUm: settings.originUm } : {}),
    ...(settings.grid !== undefined ? { grid: settings.grid } : { marginUm: 4 * psfSigmaUm + pixelUm }),
  });
  if (psfSigmaUm === 0) return image;
  const blurred = gaussianBlur(image, { sigmaPixels: psfSigmaUm / pixelUm, border: 'reflect' });
  return { ...image, values: blurred.values };
}
