// A measured picture as the compare fit takes it: atoms per pixel on the grid of the camera
// model (x index slowest, y up: planarField.ts; converted from the camera convention of the
// files by cameraConvention.ts), the object-plane pixel size, the mask of usable pixels and
// what is known about its noise: either the per-pixel variance of the imaging noise
// (absorption imaging) or the detected counts per atom of a Poisson counts picture.
// Pure: built from plain arrays; the files are read and processed before
// (src/imaging/camera/frameSources.ts, src/pipeline/measuredShots.ts).

import type { PixelImage, PixelMask } from './camera/pixelImage.js';
import { cameraMaskToPlanar, cameraToPlanar } from './cameraConvention.js';
import type { PlanarField } from './planarField.js';
import { ParameterError } from '../physics/parameterError.js';

export interface MeasuredImage extends PlanarField {
  /** Object-plane pixel size (camera pixel / magnification), µm (lattice spacings in dimensionless mode). */
  pixelUm: number;
  /** Per-pixel variance of the imaging noise of `values`, atoms^2, grid layout; null: Poisson counts (countsPerAtom). */
  variance: Float64Array | null;
  /** Detected counts per atom of `values` (for the mean of M shots, M times one shot's); null with a variance. */
  countsPerAtom: number | null;
  /** 1 = used, grid layout. */
  mask: Uint8Array;
  usedPixels: number;
  /** Sum over the used pixels, atoms. */
  totalAtoms: number;
  /** Shots averaged into `values`. */
  shotCount: number;
}

/** An error in the measured image or in an option about it; `option` names the command-line option. */
export class MeasuredImageError extends ParameterError {
  constructor(option: string, message: string) {
    super(option, message);
    this.name = 'MeasuredImageError';
  }

  get option(): string {
    return this.parameter;
  }
}

export interface MeasuredImageOptions {
  pixelUm: number;
  /** Detected counts per atom of the values (Poisson weights); give it or `variance`. */
  countsPerAtom?: number;
  /** Per-pixel imaging-noise variance, same layout as the values. */
  variance?: Float64Array;
  /** 1 = used, same layout as the values; default: every finite pixel. */
  mask?: Uint8Array;
  shotCount?: number;
  /** Name shown in messages, e.g. the file. */
  name?: string;
}

/** Checks shared by both layouts: a usable, non-constant picture with a noise description. */
function finish(field: PlanarField, mask: Uint8Array, options: MeasuredImageOptions, variance: Float64Array | null): MeasuredImage {
  const name = options.name ?? 'the measured image';
  const { pixelUm } = options;
  if (!(pixelUm > 0) || !Number.isFinite(pixelUm)) {
    throw new MeasuredImageError('--pixel-um', `expected the object-plane pixel size (camera pixel / magnification) as a positive number, got ${pixelUm}`);
  }
  const c = options.countsPerAtom;
  if (c !== undefined && !(c > 0 && Number.isFinite(c))) throw new MeasuredImageError('--counts-per-atom', `expected a positive number of detected counts per atom, got ${c}`);
  if (c === undefined && variance === null) {
    throw new MeasuredImageError('--counts-per-atom', `${name}: its unit is not known; give the detected counts per atom (1 for an image already in atoms per pixel)`);
  }
  if (field.nx * field.ny < 9) throw new MeasuredImageError('--image', `${name} has only ${field.nx} x ${field.ny} pixels; a cloud image needs at least 3 x 3`);
  let used = 0;
  let total = 0;
  let first = NaN;
  let constant = true;
  const values = field.values;
  for (let p = 0; p < values.length; p++) {
    if (mask[p] === 0) continue;
    const v = values[p];
    if (!Number.isFinite(v) || (variance !== null && !Number.isFinite(variance[p]))) mask[p] = 0;
    else {
      if (used === 0) first = v;
      else if (v !== first) constant = false;
      used++;
      total += v;
    }
  }
  if (used < 9) throw new MeasuredImageError('--image', `${name} has only ${used} usable pixels (finite, inside the region and not masked); a cloud image needs at least 9`);
  if (constant) throw new MeasuredImageError('--image', `${name} holds no image: every pixel is ${first}; check that this is the exposure of the cloud`);
  return {
    values,
    nx: field.nx,
    ny: field.ny,
    pixelUm,
    variance,
    countsPerAtom: variance === null ? (c as number) : null,
    mask,
    usedPixels: used,
    totalAtoms: total,
    shotCount: options.shotCount ?? 1,
  };
}

/** A picture in atoms per pixel given on the model's grid (x index slowest, y up). */
export function measuredFromGrid(field: PlanarField, options: MeasuredImageOptions): MeasuredImage {
  const mask = options.mask !== undefined ? Uint8Array.from(options.mask) : new Uint8Array(field.values.length).fill(1);
  return finish({ values: Float64Array.from(field.values), nx: field.nx, ny: field.ny }, mask, options, options.variance !== undefined ? Float64Array.from(options.variance) : null);
}

/** A picture in atoms per pixel in the camera convention (row from the top), brought onto the model's grid. */
export function measuredFromCamera(image: PixelImage, options: MeasuredImageOptions & { mask?: PixelMask }): MeasuredImage {
  const field = cameraToPlanar(image);
  const mask = options.mask !== undefined ? cameraMaskToPlanar(options.mask, image.width, image.height) : new Uint8Array(field.values.length).fill(1);
  const variance = options.variance !== undefined ? cameraToPlanar({ width: image.width, height: image.height, values: options.variance }).values : null;
  return finish(field, mask, options, variance);
}
