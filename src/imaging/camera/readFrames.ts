// One entry to every frame reader: the format is told by the file's first bytes (never by
// its name alone), so a misnamed file is still read right or refused with a clear message.
//   TIFF  'II*\0' / 'MM\0*'          -> readTiff.ts (utif2)
//   HDF5  \x89HDF\r\n\x1a\n           -> readHdf5Frames.ts (h5wasm, asynchronous)
//   FITS  'SIMPLE  ='                -> readFits.ts
//   .npy  \x93NUMPY                  -> readNpyFrames.ts
//   PNG   \x89PNG\r\n\x1a\n           -> readPngFrame.ts (pngjs)
// Pure: takes bytes and a name (used in messages and as `source`); the caller reads the file.

import { FrameReadError } from './frameReadError.js';
import type { FrameSourceFormat, FrameStack } from './frameStack.js';
import { parseFrameAddress } from './frameAddress.js';
import { readFitsFrames } from './readFits.js';
import { hasHdf5Signature, readHdf5Frames } from './readHdf5Frames.js';
import { readNpyFrames } from './readNpyFrames.js';
import { readPngFrame } from './readPngFrame.js';
import { readTiffFrames } from './readTiff.js';

export interface ReadFramesOptions {
  /** HDF5 dataset path; default: the one after ':' in `name`, else the file's only image dataset. */
  dataset?: string;
}

function startsWith(bytes: Uint8Array, prefix: readonly number[]): boolean {
  return bytes.length >= prefix.length && prefix.every((b, i) => bytes[i] === b);
}

/** The format of a file from its first bytes, or undefined when none matches. */
export function detectFrameFormat(bytes: Uint8Array): FrameSourceFormat | undefined {
  if (startsWith(bytes, [0x49, 0x49, 0x2a, 0x00]) || startsWith(bytes, [0x4d, 0x4d, 0x00, 0x2a])) return 'tiff';
  if (startsWith(bytes, [0x49, 0x49, 0x2b, 0x00]) || startsWith(bytes, [0x4d, 0x4d, 0x00, 0x2b])) return 'tiff'; // BigTIFF: refused by the reader
  if (startsWith(bytes, [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59])) return 'npy';
  if (startsWith(bytes, [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])) return 'png';
  if (startsWith(bytes, Array.from('SIMPLE  =', (c) => c.charCodeAt(0)))) return 'fits';
  if (hasHdf5Signature(bytes)) return 'hdf5';
  return undefined;
}

/**
 * Read the frames of one file. `name` is the file name as the user gave it, optionally
 * with an HDF5 dataset address (`run7.h5:/shot/atoms`); `bytes` are the file's contents.
 */
export async function readFrames(bytes: Uint8Array, name: string, options: ReadFramesOptions = {}): Promise<FrameStack> {
  const address = parseFrameAddress(name);
  const format = detectFrameFormat(bytes);
  const dataset = options.dataset ?? address.dataset;
  if (dataset !== undefined && format !== 'hdf5') {
    throw new FrameReadError(name, 'unsupported', `a dataset path (${dataset}) was given but the file is ${format === undefined ? 'of an unknown format' : `a ${format.toUpperCase()} file`}, not HDF5`);
  }
  switch (format) {
    case 'tiff': return readTiffFrames(bytes, name);
    case 'npy': return readNpyFrames(bytes, name);
    case 'png': return readPngFrame(bytes, name);
    case 'fits': return readFitsFrames(bytes, name);
    case 'hdf5': return readHdf5Frames(bytes, address.file, dataset);
    default:
      throw new FrameReadError(
        name,
        bytes.length === 0 ? 'truncated' : 'unknown-format',
        bytes.length === 0 ? 'the file is empty' : 'is not a TIFF, HDF5, FITS, NumPy .npy or PNG file (checked its first bytes); save the frames in one of these formats',
      );
  }
}
