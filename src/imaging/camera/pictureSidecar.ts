// The scale of tiercake's own pictures, read from the JSON sidecar next to them (used by
// `compare` when --counts-per-atom or the pixel size is missing; the sidecar is written by
// src/output/pictureFiles.ts). The frames themselves are read by frameSources.ts.
//
// What a sidecar gives: the 16-bit PNG stores grey levels, atoms = grey x atomsPerGreyLevel,
// so its counts per atom are 1 / atomsPerGreyLevel; the float .npy of the same picture holds
// atoms per pixel (`quantity` 'atoms per pixel'), so its counts per atom are 1.

import { existsSync, readFileSync } from 'node:fs';

export interface SidecarScale {
  countsPerAtom?: number;
  /** object-plane pixel in the sidecar's length unit (micrometres, or lattice spacings in dimensionless mode) */
  pixelSize?: number;
  /** 'um' or 'sites' when the sidecar says (files of this version); absent for earlier files (pixelUm only) */
  lengthUnit?: 'um' | 'sites';
  file: string;
}

/** tiercake's own pictures carry their scale in a JSON sidecar: use it when options are missing. */
export function readSidecar(imagePath: string): SidecarScale | null {
  const candidates = [imagePath.replace(/\.gray16\.png$/i, '.json'), imagePath.replace(/\.(npy|png)$/i, '.json')];
  for (const file of candidates) {
    if (file === imagePath || !existsSync(file)) continue;
    let data: Record<string, unknown>;
    try {
      data = JSON.parse(readFileSync(file, 'utf8')) as Record<string, unknown>;
    } catch {
      return null; // not a sidecar of ours: the options must say it
    }
    const perLevel = data?.atomsPerGreyLevel;
    // This version writes pixelSize with lengthUnit ('um' or 'sites'), and pixelUm only when
    // the pixel is in micrometres; earlier versions wrote pixelUm in either unit.
    const unit = data?.lengthUnit === 'um' || data?.lengthUnit === 'sites' ? data.lengthUnit : undefined;
    const pixel = unit !== undefined && typeof data?.pixelSize === 'number' ? data.pixelSize : data?.pixelUm;
    const atomsArray = /\.npy$/i.test(imagePath) && data?.quantity === 'atoms per pixel';
    return {
      file,
      ...(typeof perLevel === 'number' && perLevel > 0 && /\.png$/i.test(imagePath) ? { countsPerAtom: 1 / perLevel } : {}),
      ...(atomsArray ? { countsPerAtom: 1 } : {}),
      ...(typeof pixel === 'number' && pixel > 0 ? { pixelSize: pixel } : {}),
      ...(unit !== undefined ? { lengthUnit: unit } : {}),
    };
  }
  return null;
}
