// Reading the measured image `compare` is given: the file's bytes (a .npy or a greyscale
// PNG, decoded by src/imaging/measuredImage.ts) and, for tiercake's own pictures, the scale
// in the JSON sidecar next to it (used when --counts-per-atom or --pixel-um is missing).
// Every problem is an InputError naming the option or the file.

import { existsSync, readFileSync, statSync } from 'node:fs';
import { basename } from 'node:path';
import { decodeMeasuredImage, MeasuredImageError, type MeasuredImage } from '../imaging/measuredImage.js';
import { InputError } from '../scenario/inputError.js';

export interface SidecarScale {
  countsPerAtom?: number;
  /** object-plane pixel in the sidecar's length unit (micrometres, or lattice spacings in dimensionless mode) */
  pixelUm?: number;
  /** 'um' or 'sites' when the sidecar says (files of this version); absent for earlier files (pixelUm only) */
  lengthUnit?: 'um' | 'sites';
  file: string;
}

export interface MeasuredImageRequest {
  path: string;
  countsPerAtom?: number;
  pixelUm?: number;
  rotateDeg: number;
  flipX: boolean;
}

/** Largest image file read (a 16k x 16k float64 frame is 2 GiB; a camera frame is far smaller). */
const MAX_IMAGE_BYTES = 1 << 30;

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
    return {
      file,
      ...(typeof perLevel === 'number' && perLevel > 0 && /\.png$/i.test(imagePath) ? { countsPerAtom: 1 / perLevel } : {}),
      ...(typeof pixel === 'number' && pixel > 0 ? { pixelUm: pixel } : {}),
      ...(unit !== undefined ? { lengthUnit: unit } : {}),
    };
  }
  return null;
}

export function readMeasuredImage(request: MeasuredImageRequest): { image: MeasuredImage; sidecar: SidecarScale | null } {
  const path = request.path;
  let bytes: Uint8Array;
  try {
    const st = statSync(path);
    if (!st.isFile()) throw new InputError(`--image: ${path} is not a regular file; give the measured image (.npy or PNG)`);
    if (st.size > MAX_IMAGE_BYTES) throw new InputError(`--image: ${path} is ${st.size} bytes, more than a camera frame can be (limit ${MAX_IMAGE_BYTES}); is this the right file?`);
    bytes = readFileSync(path);
  } catch (err) {
    if (err instanceof InputError) throw err;
    throw new InputError(`--image: ${path} was not found or cannot be read; check the path`);
  }
  const sidecar = request.countsPerAtom === undefined || request.pixelUm === undefined ? readSidecar(path) : null;
  const pixelUm = request.pixelUm ?? sidecar?.pixelUm;
  if (pixelUm === undefined) {
    throw new InputError('--pixel-um: give the pixel size in the object plane (camera pixel / magnification), in µm (lattice spacings in dimensionless mode)');
  }
  const countsPerAtom = request.countsPerAtom ?? sidecar?.countsPerAtom;
  try {
    const image = decodeMeasuredImage(bytes, basename(path), {
      pixelUm,
      rotateDeg: request.rotateDeg,
      flipX: request.flipX,
      ...(countsPerAtom !== undefined ? { countsPerAtom } : {}),
    });
    return { image, sidecar };
  } catch (err) {
    if (err instanceof MeasuredImageError) throw new InputError(err.message);
    throw err;
  }
}
