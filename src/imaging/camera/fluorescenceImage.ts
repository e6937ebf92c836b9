// Fluorescence imaging: atoms per pixel = (signal - background) / countsPerAtom, where the
// background frame is taken with the same light and no atoms (scattered light, camera
// offset) and countsPerAtom is the calibrated number of camera counts one atom gives in the
// exposure (scattering rate x exposure x collection efficiency x quantum efficiency x gain;
// calibrated by the user). Shot noise per pixel: var(atoms) = (g (S + B) + 2 r^2) / c^2 for
// signal S and background B counts, gain g counts per photoelectron, read noise r, c counts
// per atom (Poisson photoelectrons; common practice). Atom shot noise is not included: it is
// part of what a stack of shots measures.

import { requirePositive } from '../../physics/parameterError.js';
import { checkImage, checkSameSize, type PixelImage, type PixelMask } from './pixelImage.js';
import type { CameraNoiseSettings } from './cameraNoise.js';
import { countingStart } from './countingStart.js';

export interface FluorescenceSettings extends CameraNoiseSettings {
  /** Camera counts per atom in the exposure (> 0). */
  countsPerAtom: number;
  /** Region to use (1 = use); default every pixel. */
  region?: PixelMask;
}

export interface FluorescenceImage {
  width: number;
  height: number;
  /** (signal - background) / countsPerAtom; NaN outside the region or where a count is not finite. */
  atomsPerPixel: Float64Array;
  /** Photon shot + read noise variance of atomsPerPixel, atoms^2. */
  atomsVariance: Float64Array;
  mask: PixelMask;
  usedPixels: number;
  totalAtoms: number;
}

export function fluorescenceImage(signal: PixelImage, background: PixelImage | undefined, settings: FluorescenceSettings): FluorescenceImage {
  checkImage('signal', signal);
  if (background !== undefined) {
    checkImage('background', background);
    checkSameSize('background', signal, background);
  }
  requirePositive('countsPerAtom', settings.countsPerAtom, '(camera counts per atom in the exposure)');
  const { gain, readNoise, width, height, count: n, atomsPerPixel, atomsVariance, mask } = countingStart(signal, settings);
  const c = settings.countsPerAtom;
  const readVar = (background === undefined ? 1 : 2) * readNoise * readNoise;
  let total = 0;
  let used = 0;
  for (let i = 0; i < n; i++) {
    const s = signal.values[i];
    const b = background === undefined ? 0 : background.values[i];
    if ((settings.region !== undefined && settings.region[i] === 0) || !Number.isFinite(s) || !Number.isFinite(b)) {
      atomsPerPixel[i] = NaN;
      atomsVariance[i] = NaN;
      continue;
    }
    mask[i] = 1;
    used++;
    const atoms = (s - b) / c;
    atomsPerPixel[i] = atoms;
    atomsVariance[i] = (gain * (Math.max(s, 0) + Math.max(b, 0)) + readVar) / (c * c);
    total += atoms;
  }
  return { width, height, atomsPerPixel, atomsVariance, mask, usedPixels: used, totalAtoms: total };
}
