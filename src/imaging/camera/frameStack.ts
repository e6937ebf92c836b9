// What every frame reader returns: one or more frames of the same size in the camera
// convention of pixelImage.ts (row y from the top, column x from the left,
// frame[y * width + x]), in the file's own units (counts for a camera file), as float64.

import type { PixelImage } from './pixelImage.js';

export type FrameSourceFormat = 'tiff' | 'hdf5' | 'fits' | 'npy' | 'png';

/** A metadata value as read from the file (TIFF tag, HDF5 attribute, FITS card, npy header field). */
export type MetadataValue = string | number | boolean | readonly (string | number | boolean)[];

export interface FrameStack {
  /** One Float64Array of width * height values per frame (page, shot, plane), in file order. */
  frames: Float64Array[];
  width: number;
  height: number;
  sourceFormat: FrameSourceFormat;
  /** Sample type stored in the file, numpy style: 'uint16', 'int16', 'float32', ... */
  sampleType: string;
  /** The name the frames were read from (with ':/dataset' for HDF5). */
  source: string;
  /** Format-specific metadata (see each reader); values exactly as stored, no unit conversion. */
  metadata: Record<string, MetadataValue>;
}

/** Frame k of a stack as a PixelImage (shares the array). */
export function stackFrame(stack: FrameStack, k: number): PixelImage {
  if (!Number.isInteger(k) || k < 0 || k >= stack.frames.length) {
    throw new RangeError(`stackFrame: frame ${k} does not exist; ${stack.source} holds ${stack.frames.length} frame(s), numbered from 0`);
  }
  return { width: stack.width, height: stack.height, values: stack.frames[k] };
}
