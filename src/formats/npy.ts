// NumPy .npy format, version 1.0 (NumPy Enhancement Proposal 1, "A simple file format for
// NumPy arrays"): magic "\x93NUMPY", version bytes, little-endian u16 header length, a
// Python-dict header padded with spaces to a multiple of 64 bytes and ended by "\n",
// then the raw data. We write float64 ('<f8'), int32 ('<i4') or uint8 ('|u1'), C order.

export type NpyArray = Float64Array | Int32Array | Uint8Array;

function descrOf(data: NpyArray): string {
  if (data instanceof Float64Array) return '<f8';
  if (data instanceof Int32Array) return '<i4';
  return '|u1';
}

/** Encode `data` with the given shape (C order, first axis slowest). */
export function encodeNpy(data: NpyArray, shape: readonly number[]): Uint8Array {
  const count = shape.reduce((a, b) => a * b, 1);
  if (count !== data.length) {
    throw new Error(`encodeNpy: shape ${JSON.stringify(shape)} holds ${count} values, data has ${data.length}`);
  }
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let header = `{'descr': '${descrOf(data)}', 'fortran_order': False, 'shape': ${shapeText}, }`;
  const unpadded = 10 + header.length + 1;
  header += ' '.repeat((64 - (unpadded % 64)) % 64) + '\n';
  const out = new Uint8Array(10 + header.length + data.byteLength);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0], 0);
  out[8] = header.length & 0xff;
  out[9] = header.length >> 8;
  for (let i = 0; i < header.length; i++) out[10 + i] = header.charCodeAt(i);
  const view = new DataView(out.buffer, 10 + header.length);
  if (data instanceof Float64Array) for (let i = 0; i < data.length; i++) view.setFloat64(i * 8, data[i], true);
  else if (data instanceof Int32Array) for (let i = 0; i < data.length; i++) view.setInt32(i * 4, data[i], true);
  else out.set(data, 10 + header.length);
  return out;
}

export interface DecodedNpy {
  data: Float64Array;
  shape: number[];
}

/** Decode a C-order .npy of float64/float32/int/uint into float64 values. */
export function decodeNpy(bytes: Uint8Array): DecodedNpy {
  const magic = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];
  if (bytes.length < 10 || magic.some((m, i) => bytes[i] !== m)) throw new Error('not a .npy file (bad magic bytes)');
  const major = bytes[6];
  const headerLength = major === 1 ? bytes[8] | (bytes[9] << 8) : bytes[8] | (bytes[9] << 8) | (bytes[10] << 16) | (bytes[11] << 24);
  const start = major === 1 ? 10 : 12;
  const header = new TextDecoder('latin1').decode(bytes.subarray(start, start + headerLength));
  const descr = /'descr':\s*'([^']+)'/.exec(header)?.[1];
  const fortran = /'fortran_order':\s*True/.test(header);
  const shapeText = /'shape':\s*\(([^)]*)\)/.exec(header)?.[1];
  if (!descr || shapeText === undefined) throw new Error('.npy header is missing descr or shape');
  if (fortran) throw new Error('.npy in Fortran order is not supported; save with C order');
  const shape = shapeText.split(',').map((s) => s.trim()).filter((s) => s.length > 0).map(Number);
  const count = shape.reduce((a, b) => a * b, 1);
  const offset = start + headerLength;
  const view = new DataView(bytes.buffer, bytes.byteOffset + offset, bytes.byteLength - offset);
  const little = descr[0] !== '>';
  const kind = descr.slice(1);
  const sizes: Record<string, number> = { f8: 8, f4: 4, i4: 4, u4: 4, i2: 2, u2: 2, i1: 1, u1: 1, i8: 8, u8: 8 };
  const size = sizes[kind];
  if (!size) throw new Error(`.npy dtype ${descr} is not supported (use float64, float32 or an integer type)`);
  if (view.byteLength < count * size) throw new Error(`.npy data is truncated: expected ${count * size} bytes`);
  const data = new Float64Array(count);
  for (let i = 0; i < count; i++) {
    const p = i * size;
    switch (kind) {
      case 'f8': data[i] = view.getFloat64(p, little); break;
      case 'f4': data[i] = view.getFloat32(p, little); break;
      case 'i4': data[i] = view.getInt32(p, little); break;
      case 'u4': data[i] = view.getUint32(p, little); break;
      case 'i2': data[i] = view.getInt16(p, little); break;
      case 'u2': data[i] = view.getUint16(p, little); break;
      case 'i1': data[i] = view.getInt8(p); break;
      case 'u1': data[i] = view.getUint8(p); break;
      case 'i8': data[i] = Number(view.getBigInt64(p, little)); break;
      case 'u8': data[i] = Number(view.getBigUint64(p, little)); break;
    }
  }
  return { data, shape };
}
