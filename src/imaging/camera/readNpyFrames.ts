// NumPy .npy frames (NEP 1, "A simple file format for NumPy arrays", versions 1.0, 2.0 and
// 3.0), read strictly: the header must be the Python dict literal numpy writes, with exactly
// the keys 'descr', 'fortran_order' and 'shape'; the data must hold exactly
// product(shape) * itemsize bytes. A 2D array (rows, cols) is one frame, a 3D array
// (frames, rows, cols) a stack: arrays are indexed a[row = y, col = x] as numpy shows them
// (row 0 at the top). fortran_order True is read by transposing into C order.
// Unlike src/io/npy.ts (which reads tiercake's own files), every header fault here is an
// error that names the file and the field.

import { FrameReadError } from './frameReadError.js';
import type { FrameStack } from './frameStack.js';

const magic = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];

/** Supported dtypes: numpy kind + size -> our sample type name. */
const dtypes: Record<string, { sampleType: string; size: number }> = {
  f8: { sampleType: 'float64', size: 8 },
  f4: { sampleType: 'float32', size: 4 },
  u1: { sampleType: 'uint8', size: 1 },
  i1: { sampleType: 'int8', size: 1 },
  u2: { sampleType: 'uint16', size: 2 },
  i2: { sampleType: 'int16', size: 2 },
  u4: { sampleType: 'uint32', size: 4 },
  i4: { sampleType: 'int32', size: 4 },
};

export interface NpyHeader {
  /** Format version, e.g. [1, 0]. */
  version: [number, number];
  descr: string;
  littleEndian: boolean;
  sampleType: string;
  itemSize: number;
  fortranOrder: boolean;
  shape: number[];
  /** Byte offset of the data. */
  dataOffset: number;
}

/** Parse and validate an .npy header completely (see the file header). */
export function parseNpyHeader(bytes: Uint8Array, name: string): NpyHeader {
  if (bytes.length < 10 || magic.some((m, i) => bytes[i] !== m)) {
    throw new FrameReadError(name, 'unknown-format', 'is not a NumPy .npy file (the magic string \\x93NUMPY is missing)');
  }
  const major = bytes[6];
  const minor = bytes[7];
  if (!((major === 1 || major === 2 || major === 3) && minor === 0)) {
    throw new FrameReadError(name, 'unsupported', `.npy format version ${major}.${minor} is not known (1.0, 2.0 and 3.0 are)`);
  }
  const lengthBytes = major === 1 ? 2 : 4;
  if (bytes.length < 8 + lengthBytes) throw new FrameReadError(name, 'truncated', 'the .npy file ends inside its header length');
  let headerLength = 0;
  for (let i = lengthBytes - 1; i >= 0; i--) headerLength = headerLength * 256 + bytes[8 + i];
  const start = 8 + lengthBytes;
  if (start + headerLength > bytes.length) {
    throw new FrameReadError(name, 'truncated', `the .npy header says it is ${headerLength} bytes long but the file ends after ${bytes.length - start}`);
  }
  const header = new TextDecoder(major === 3 ? 'utf-8' : 'latin1').decode(bytes.subarray(start, start + headerLength));
  if (!header.endsWith('\n')) throw new FrameReadError(name, 'damaged', '.npy header does not end with a newline (NEP 1)');
  // numpy writes: {'descr': '<u2', 'fortran_order': False, 'shape': (64, 80), }  padded with spaces.
  const body = header.trim();
  if (!body.startsWith('{') || !body.endsWith('}')) throw new FrameReadError(name, 'damaged', '.npy header is not a Python dict literal');
  const entries = new Map<string, string>();
  const entryPattern = /\s*'([a-z_]+)'\s*:\s*('[^']*'|True|False|\([^)]*\))\s*(,|$)/y;
  const inner = body.slice(1, -1);
  let pos = 0;
  while (pos < inner.length && inner.slice(pos).trim().length > 0) {
    entryPattern.lastIndex = pos;
    const m = entryPattern.exec(inner);
    if (m === null) throw new FrameReadError(name, 'damaged', `.npy header cannot be parsed near "${inner.slice(pos, pos + 30).trim()}"`);
    if (entries.has(m[1])) throw new FrameReadError(name, 'damaged', `.npy header repeats the key '${m[1]}'`);
    entries.set(m[1], m[2]);
    pos = entryPattern.lastIndex;
  }
  for (const key of entries.keys()) {
    if (key !== 'descr' && key !== 'fortran_order' && key !== 'shape') {
      throw new FrameReadError(name, 'damaged', `.npy header has an unknown key '${key}' (expected descr, fortran_order, shape)`);
    }
  }
  const descrText = entries.get('descr');
  const fortranText = entries.get('fortran_order');
  const shapeText = entries.get('shape');
  if (descrText === undefined || fortranText === undefined || shapeText === undefined) {
    const missing = ['descr', 'fortran_order', 'shape'].filter((k) => !entries.has(k));
    throw new FrameReadError(name, 'damaged', `.npy header lacks ${missing.join(', ')}`);
  }
  if (!descrText.startsWith("'")) throw new FrameReadError(name, 'damaged', `.npy descr must be a quoted dtype string, got ${descrText}`);
  const descr = descrText.slice(1, -1);
  const order = descr[0];
  const kind = descr.slice(1);
  const dtype = dtypes[kind];
  const oneByte = dtype !== undefined && dtype.size === 1;
  if (dtype === undefined || !(order === '<' || order === '>' || (order === '|' && oneByte))) {
    throw new FrameReadError(
      name,
      'unsupported',
      `.npy dtype '${descr}' is not read; save the frame as float64, float32, (u)int8, (u)int16 or (u)int32 with an explicit byte order ('<u2', '>f4', '|u1', ...)`,
    );
  }
  if (fortranText !== 'True' && fortranText !== 'False') throw new FrameReadError(name, 'damaged', `.npy fortran_order must be True or False, got ${fortranText}`);
  if (!shapeText.startsWith('(')) throw new FrameReadError(name, 'damaged', `.npy shape must be a tuple, got ${shapeText}`);
  const parts = shapeText.slice(1, -1).split(',').map((s) => s.trim());
  if (parts.length > 0 && parts[parts.length - 1] === '') parts.pop();
  const shape = parts.map((p) => {
    if (!/^\d+$/.test(p)) throw new FrameReadError(name, 'damaged', `.npy shape ${shapeText} must list non-negative integers`);
    return Number(p);
  });
  const count = shape.reduce((a, b) => a * b, 1);
  const dataOffset = start + headerLength;
  const expected = count * dtype.size;
  const actual = bytes.length - dataOffset;
  if (actual !== expected) {
    throw new FrameReadError(
      name,
      actual < expected ? 'truncated' : 'damaged',
      `.npy of shape (${shape.join(', ')}) and dtype '${descr}' needs ${expected} data bytes, the file has ${actual}` +
        (actual < expected ? ' (cut short)' : ' (extra bytes after the array)'),
    );
  }
  return {
    version: [major, minor],
    descr,
    littleEndian: order !== '>',
    sampleType: dtype.sampleType,
    itemSize: dtype.size,
    fortranOrder: fortranText === 'True',
    shape,
    dataOffset,
  };
}

/** Read a 2D (rows, cols) or 3D (frames, rows, cols) .npy array into frames. Metadata: descr, shape, fortranOrder, version. */
export function readNpyFrames(bytes: Uint8Array, name: string): FrameStack {
  const header = parseNpyHeader(bytes, name);
  const { shape, itemSize, littleEndian, sampleType } = header;
  if (shape.length !== 2 && shape.length !== 3) {
    throw new FrameReadError(name, 'not-an-image', `holds an array of shape (${shape.join(', ')}); expected (rows, cols) for one frame or (frames, rows, cols) for a stack`);
  }
  const [frameCount, height, width] = shape.length === 2 ? [1, shape[0], shape[1]] : shape;
  if (frameCount < 1 || height < 1 || width < 1) throw new FrameReadError(name, 'not-an-image', `holds an empty array of shape (${shape.join(', ')})`);
  const view = new DataView(bytes.buffer, bytes.byteOffset + header.dataOffset, bytes.length - header.dataOffset);
  const read = (p: number): number => {
    switch (sampleType) {
      case 'float64': return view.getFloat64(p, littleEndian);
      case 'float32': return view.getFloat32(p, littleEndian);
      case 'uint8': return view.getUint8(p);
      case 'int8': return view.getInt8(p);
      case 'uint16': return view.getUint16(p, littleEndian);
      case 'int16': return view.getInt16(p, littleEndian);
      case 'uint32': return view.getUint32(p, littleEndian);
      default: return view.getInt32(p, littleEndian);
    }
  };
  const frames: Float64Array[] = [];
  const perFrame = width * height;
  for (let f = 0; f < frameCount; f++) {
    const out = new Float64Array(perFrame);
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        // C order: index (f, y, x) -> (f * height + y) * width + x; Fortran order: f * (height * width)... reversed strides.
        const flat = header.fortranOrder ? (x * height + y) * frameCount + f : (f * height + y) * width + x;
        out[y * width + x] = read(flat * itemSize);
      }
    }
    frames.push(out);
  }
  return {
    frames,
    width,
    height,
    sourceFormat: 'npy',
    sampleType,
    source: name,
    metadata: { descr: header.descr, shape: header.shape, fortranOrder: header.fortranOrder, version: `${header.version[0]}.${header.version[1]}` },
  };
}
