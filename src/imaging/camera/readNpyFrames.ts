// NumPy .npy frames (NEP 1, "A simple file format for NumPy arrays", versions 1.0, 2.0 and
// 3.0), read strictly by the project's one .npy reader (src/formats/npy.ts): the header must
// be the Python dict literal numpy writes, with exactly the keys 'descr', 'fortran_order'
// and 'shape'; the data must hold exactly product(shape) * itemsize bytes. A 2D array
// (rows, cols) is one frame, a 3D array (frames, rows, cols) a stack: arrays are indexed
// a[row = y, col = x] as numpy shows them (row 0 at the top). fortran_order True is read by
// transposing into C order (formats/npy.ts). Every header fault is a FrameReadError that
// names the file and the field.

import { FrameReadError, type FrameReadProblem } from './frameReadError.js';
import type { FrameStack } from './frameStack.js';
import { decodeNpy, NpyFormatError, readNpyHeader, type NpyHeader as FormatHeader, type NpyProblem } from '../../formats/npy.js';

/** numpy kind + size -> our sample type name. */
const sampleTypes: Record<string, string> = {
  f8: 'float64',
  f4: 'float32',
  u1: 'uint8',
  i1: 'int8',
  u2: 'uint16',
  i2: 'int16',
  u4: 'uint32',
  i4: 'int32',
  u8: 'uint64',
  i8: 'int64',
  b1: 'bool',
};

const problemOf: Record<NpyProblem, FrameReadProblem> = {
  'not-npy': 'unknown-format',
  unsupported: 'unsupported',
  truncated: 'truncated',
  damaged: 'damaged',
};

export interface NpyHeader extends FormatHeader {
  sampleType: string;
}

function frameError(err: unknown, name: string): unknown {
  return err instanceof NpyFormatError ? new FrameReadError(name, problemOf[err.problem], err.detail) : err;
}

/** Parse and validate an .npy header completely (formats/npy.ts); faults become FrameReadErrors. */
export function parseNpyHeader(bytes: Uint8Array, name: string): NpyHeader {
  try {
    const header = readNpyHeader(bytes, name, { fortranOrder: 'accept' });
    return { ...header, sampleType: sampleTypes[header.kind] ?? header.kind };
  } catch (err) {
    throw frameError(err, name);
  }
}

/** Read a 2D (rows, cols) or 3D (frames, rows, cols) .npy array into frames. Metadata: descr, shape, fortranOrder, version. */
export function readNpyFrames(bytes: Uint8Array, name: string): FrameStack {
  const header = parseNpyHeader(bytes, name);
  const { shape } = header;
  if (shape.length !== 2 && shape.length !== 3) {
    throw new FrameReadError(name, 'not-an-image', `holds an array of shape (${shape.join(', ')}); expected (rows, cols) for one frame or (frames, rows, cols) for a stack`);
  }
  const [frameCount, height, width] = shape.length === 2 ? [1, shape[0], shape[1]] : shape;
  if (frameCount < 1 || height < 1 || width < 1) throw new FrameReadError(name, 'not-an-image', `holds an empty array of shape (${shape.join(', ')})`);
  let values: Float64Array;
  try {
    values = decodeNpy(bytes, name, { fortranOrder: 'accept' }).data; // C order: (f, y, x) at (f * height + y) * width + x
  } catch (err) {
    throw frameError(err, name);
  }
  const perFrame = width * height;
  const frames: Float64Array[] = [];
  for (let f = 0; f < frameCount; f++) frames.push(values.slice(f * perFrame, (f + 1) * perFrame));
  return {
    frames,
    width,
    height,
    sourceFormat: 'npy',
    sampleType: header.sampleType,
    source: name,
    metadata: { descr: header.descr, shape: header.shape, fortranOrder: header.fortranOrder, version: `${header.version[0]}.${header.version[1]}` },
  };
}
