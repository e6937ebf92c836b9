// The camera-grid image every module in this folder works on, in the convention of
// camera software and of numpy's a[row, col]: row y counts from the top of the frame,
// column x from the left, stored row-major, values[y * width + x]. A pixel's centre is at
// (x, y) in pixel units, so pixel (0, 0) covers [-0.5, 0.5) x [-0.5, 0.5).
//
// A mask is a Uint8Array of the same size: 1 = use the pixel, 0 = leave it out.

import { ParameterError } from '../../physics/parameterError.js';

export interface PixelImage {
  /** Columns (x). */
  width: number;
  /** Rows (y). */
  height: number;
  /** values[y * width + x]; the unit is stated by whoever makes the image. */
  values: Float64Array;
}

/** 1 = pixel used, 0 = masked; same layout as PixelImage.values. */
export type PixelMask = Uint8Array;

/** Throws unless width and height are positive integers and `values` has width * height entries. */
export function checkImage(parameter: string, image: PixelImage): void {
  const { width, height, values } = image;
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new ParameterError(parameter, `width and height must be positive integers, got ${width} x ${height}`);
  }
  if (!(values instanceof Float64Array) || values.length !== width * height) {
    throw new ParameterError(parameter, `expected ${width * height} values (width ${width} x height ${height}), got ${values?.length}`);
  }
}

/** Throws unless `mask` has one entry per pixel of a width x height image. */
export function checkMask(parameter: string, mask: PixelMask, width: number, height: number): void {
  if (!(mask instanceof Uint8Array) || mask.length !== width * height) {
    throw new ParameterError(parameter, `expected a mask of ${width * height} entries (width ${width} x height ${height}), got ${mask?.length}`);
  }
}

/** Throws unless two images have the same width and height. */
export function checkSameSize(parameter: string, a: PixelImage, b: PixelImage): void {
  if (a.width !== b.width || a.height !== b.height) {
    throw new ParameterError(parameter, `frame is ${b.width} x ${b.height} pixels but the first frame is ${a.width} x ${a.height}; all frames of a shot must have the same size`);
  }
}

/** Sum of the values where the mask is 1 (all pixels without a mask). */
export function maskedSum(values: Float64Array, mask?: PixelMask): number {
  let sum = 0;
  if (mask === undefined) for (let i = 0; i < values.length; i++) sum += values[i];
  else for (let i = 0; i < values.length; i++) if (mask[i] !== 0) sum += values[i];
  return sum;
}

/** Number of pixels whose mask entry is 1. */
export function countUsed(mask: PixelMask): number {
  let n = 0;
  for (let i = 0; i < mask.length; i++) if (mask[i] !== 0) n++;
  return n;
}

/** A warning a reading carries: a stable code and a sentence for the user. */
export interface CameraWarning {
  code: string;
  message: string;
}
