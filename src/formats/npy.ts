// NumPy .npy format (NumPy Enhancement Proposal 1, "A simple file format for NumPy
// arrays", and numpy.lib.format): magic "\x93NUMPY", major and minor version bytes, the
// header length (little-endian u16 for version 1.0, u32 for 2.0 and 3.0), a Python-dict
// header `{'descr': '<f8', 'fortran_order': False, 'shape': (2, 3), }` padded with spaces
// and ended by "\n" (latin-1 for 1.0 and 2.0, UTF-8 for 3.0), then the raw data.
// We write float64 ('<f8'), int32 ('<i4') or uint8 ('|u1'), C order, version 1.0.
//
// Reading validates the whole header before touching the data: magic, version, header
// length within the file, the dict syntax (exactly the three keys, Python literals only),
// a supported numeric dtype, fortran_order, a shape of non-negative integers, and a data
// section of exactly shape x itemsize bytes. Every problem is an NpyFormatError whose
// message names the file (and whose `problem` says what kind of fault it is), so a caller
// can turn it into an input error as it is. Fortran-order arrays are refused unless the
// caller accepts them (`fortranOrder: 'accept'`); decodeNpy then transposes them into C
// order (element (i0, ..., ik) sits at i0 + n0 (i1 + n1 (...)) in Fortran order), so the
// values always come back in C order.

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

/** What kind of fault a .npy file has (for readers that sort faults, e.g. camera frames). */
export type NpyProblem = 'not-npy' | 'unsupported' | 'truncated' | 'damaged';

/** A .npy file that cannot be read; the message names the file and what is wrong. */
export class NpyFormatError extends Error {
  readonly file: string;
  readonly problem: NpyProblem;
  /** the message without the file name */
  readonly detail: string;
  constructor(file: string, detail: string, problem: NpyProblem = 'damaged') {
    super(`${file}: ${detail}`);
    this.name = 'NpyFormatError';
    this.file = file;
    this.problem = problem;
    this.detail = detail;
  }
}

export interface NpyReadOptions {
  /** 'refuse' (default): a Fortran-order array is an error; 'accept': it is read (decodeNpy transposes it). */
  fortranOrder?: 'refuse' | 'accept';
}

export interface NpyHeader {
  /** format version [major, minor] */
  version: [number, number];
  /** dtype string as written, e.g. '<f8' */
  descr: string;
  /** byte order: true for little-endian (or single-byte types) */
  littleEndian: boolean;
  /** dtype kind and size, e.g. 'f8' */
  kind: string;
  itemSize: number;
  shape: number[];
  /** true when the data are in Fortran order (only with fortranOrder: 'accept') */
  fortranOrder: boolean;
  /** values in the array (product of the shape) */
  count: number;
  /** offset of the first data byte */
  dataOffset: number;
}

export interface DecodedNpy {
  data: Float64Array;
  shape: number[];
}

const MAGIC = [0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59];
const ITEM_SIZES: Record<string, number> = { f8: 8, f4: 4, i8: 8, u8: 8, i4: 4, u4: 4, i2: 2, u2: 2, i1: 1, u1: 1, b1: 1 };

/** A tiny reader of the Python literals a header may hold: strings, True/False, tuples of integers. */
class HeaderScanner {
  private at = 0;
  constructor(
    private readonly text: string,
    private readonly fail: (problem: string, kind?: NpyProblem) => never,
  ) {}

  private space(): void {
    while (this.at < this.text.length && /\s/.test(this.text[this.at])) this.at++;
  }

  peek(): string {
    this.space();
    return this.text[this.at] ?? '';
  }

  expect(c: string, what: string): void {
    if (this.peek() !== c) this.fail(`the header dict is malformed: expected ${what} at character ${this.at + 1}`);
    this.at++;
  }

  string(): string {
    const quote = this.peek();
    if (quote !== "'" && quote !== '"') this.fail(`the header dict is malformed: expected a quoted name at character ${this.at + 1}`);
    const end = this.text.indexOf(quote, this.at + 1);
    if (end < 0) this.fail('the header dict is malformed: a quoted name is not closed');
    const value = this.text.slice(this.at + 1, end);
    this.at = end + 1;
    return value;
  }

  word(): string {
    this.space();
    const m = /^[A-Za-z_][A-Za-z0-9_]*/.exec(this.text.slice(this.at));
    if (!m) this.fail(`the header dict is malformed: expected True or False at character ${this.at + 1}`);
    this.at += m[0].length;
    return m[0];
  }

  /** A Python tuple of integers: (), (3,), (2, 3) or (2, 3,). */
  shape(): number[] {
    this.expect('(', "'(' to open the shape");
    const out: number[] = [];
    for (;;) {
      if (this.peek() === ')') {
        this.at++;
        break;
      }
      const m = /^[+-]?[0-9A-Za-z_.]+/.exec(this.text.slice(this.at));
      const token = m ? m[0] : (this.text[this.at] ?? 'the end of the header');
      if (!/^\d+$/.test(token)) this.fail(`the shape holds ${JSON.stringify(token)}; every axis length must be a non-negative integer`);
      const n = Number(token);
      if (!Number.isSafeInteger(n)) this.fail(`the axis length ${token} is too large`);
      out.push(n);
      this.at += token.length;
      const next = this.peek();
      if (next === ',') this.at++;
      else if (next !== ')') this.fail(`the shape is malformed: expected ',' or ')' at character ${this.at + 1}`);
    }
    if (out.length === 1 && !/,\s*\)\s*$/.test(this.text.slice(0, this.at))) {
      // (3) is the integer 3 in Python, not a tuple; numpy always writes (3,).
      this.fail("the shape (n) is not a tuple; a one-axis shape is written (n,)");
    }
    return out;
  }

  done(): boolean {
    this.space();
    return this.at >= this.text.length;
  }
}

/** Parse and check the header of a .npy file (see the file header); `file` names it in messages. */
export function readNpyHeader(bytes: Uint8Array, file = '.npy file', options: NpyReadOptions = {}): NpyHeader {
  const fail = (problem: string, kind: NpyProblem = 'damaged'): never => {
    throw new NpyFormatError(file, problem, kind);
  };
  if (bytes.length < 10 || MAGIC.some((m, i) => bytes[i] !== m)) fail('not a NumPy .npy file (it does not start with the bytes \\x93NUMPY)', 'not-npy');
  const major = bytes[6];
  const minor = bytes[7];
  if (major !== 1 && major !== 2 && major !== 3) fail(`.npy format version ${major}.${minor} is not known (1.0, 2.0 and 3.0 are)`, 'unsupported');
  const lengthBytes = major === 1 ? 2 : 4;
  const start = 8 + lengthBytes;
  if (bytes.length < start) fail('the file ends inside the .npy preamble', 'truncated');
  const headerLength = major === 1 ? bytes[8] | (bytes[9] << 8) : (bytes[8] | (bytes[9] << 8) | (bytes[10] << 16)) + bytes[11] * 2 ** 24;
  if (start + headerLength > bytes.length) {
    fail(`the .npy header length ${headerLength} runs past the end of the file (${bytes.length} bytes); the file is truncated or damaged`, 'truncated');
  }
  const headerBytes = bytes.subarray(start, start + headerLength);
  let header: string;
  try {
    header = new TextDecoder(major === 3 ? 'utf-8' : 'latin1', { fatal: true }).decode(headerBytes);
  } catch {
    return fail('the .npy header is not valid UTF-8 text');
  }
  if (!header.endsWith('\n')) fail('the .npy header does not end with a newline; the file is damaged');

  const scan = new HeaderScanner(header, fail);
  const entries = new Map<string, unknown>();
  scan.expect('{', "'{' to open the header dict");
  for (;;) {
    if (scan.peek() === '}') break;
    const key = scan.string();
    if (entries.has(key)) fail(`the header dict names '${key}' twice`);
    scan.expect(':', "':' after a key");
    if (key === 'descr') {
      if (scan.peek() === '[') fail('structured dtypes (a list in descr) are not supported; save a plain numeric array', 'unsupported');
      entries.set(key, scan.string());
    } else if (key === 'fortran_order') entries.set(key, scan.word());
    else if (key === 'shape') entries.set(key, scan.shape());
    else fail(`the header dict has the unknown key '${key}' (expected descr, fortran_order and shape)`);
    const next = scan.peek();
    if (next === ',') scan.expect(',', "','");
    else if (next !== '}') fail("the header dict is malformed: expected ',' or '}' after a value");
  }
  scan.expect('}', "'}' to close the header dict");
  if (!scan.done()) fail('the header has text after the closing }');
  for (const key of ['descr', 'fortran_order', 'shape']) if (!entries.has(key)) fail(`the header dict has no '${key}'`);

  const fortran = entries.get('fortran_order');
  if (fortran !== 'True' && fortran !== 'False') fail(`fortran_order is ${String(fortran)}; expected True or False`);
  if (fortran === 'True' && options.fortranOrder !== 'accept') {
    fail('the array is stored in Fortran order; save it in C order (numpy.ascontiguousarray) and try again', 'unsupported');
  }

  const descr = entries.get('descr') as string;
  const m = /^([<>|=])([fiub])(\d+)$/.exec(descr);
  const kind = m ? `${m[2]}${m[3]}` : '';
  const itemSize = ITEM_SIZES[kind];
  if (!m || itemSize === undefined) fail(`dtype ${JSON.stringify(descr)} is not supported (use float64, float32 or an integer type)`, 'unsupported');
  const order = (m as RegExpExecArray)[1];
  if (order === '|' && itemSize !== 1) fail(`dtype ${JSON.stringify(descr)} has no byte order; multi-byte types need '<' or '>'`, 'unsupported');

  const shape = entries.get('shape') as number[];
  let count = 1;
  for (const n of shape) count *= n;
  if (!Number.isSafeInteger(count * itemSize)) fail(`the shape (${shape.join(', ')}) is too large`);
  const dataOffset = start + headerLength;
  const dataBytes = bytes.length - dataOffset;
  if (dataBytes !== count * itemSize) {
    const short = dataBytes < count * itemSize;
    fail(
      `the header's shape (${shape.join(', ')}) of ${descr} needs ${count * itemSize} data bytes, the file holds ${dataBytes}; ` +
        `the file is ${short ? 'truncated' : 'damaged (extra bytes after the array)'}`,
      short ? 'truncated' : 'damaged',
    );
  }
  return { version: [major, minor], descr, littleEndian: order !== '>', kind, itemSize, shape, fortranOrder: fortran === 'True', count, dataOffset };
}

/**
 * Decode a .npy of float64/float32/integers/bool into float64 values in C order; `file`
 * names it in messages. Fortran order only with `fortranOrder: 'accept'` (transposed).
 */
export function decodeNpy(bytes: Uint8Array, file = '.npy file', options: NpyReadOptions = {}): DecodedNpy & { header: NpyHeader } {
  const h = readNpyHeader(bytes, file, options);
  const view = new DataView(bytes.buffer, bytes.byteOffset + h.dataOffset, h.count * h.itemSize);
  const little = h.littleEndian;
  const data = new Float64Array(h.count);
  const size = h.itemSize;
  for (let i = 0; i < h.count; i++) {
    const p = i * size;
    switch (h.kind) {
      case 'f8': data[i] = view.getFloat64(p, little); break;
      case 'f4': data[i] = view.getFloat32(p, little); break;
      case 'i4': data[i] = view.getInt32(p, little); break;
      case 'u4': data[i] = view.getUint32(p, little); break;
      case 'i2': data[i] = view.getInt16(p, little); break;
      case 'u2': data[i] = view.getUint16(p, little); break;
      case 'i1': data[i] = view.getInt8(p); break;
      case 'u1': case 'b1': data[i] = view.getUint8(p); break;
      case 'i8': data[i] = Number(view.getBigInt64(p, little)); break;
      case 'u8': data[i] = Number(view.getBigUint64(p, little)); break;
    }
  }
  return { data: h.fortranOrder ? fortranToC(data, h.shape) : data, shape: h.shape, header: h };
}

/** Values stored in Fortran order (first axis fastest) rearranged into C order (last axis fastest). */
export function fortranToC(values: Float64Array, shape: readonly number[]): Float64Array {
  const dims = shape.length;
  if (dims < 2) return values;
  const out = new Float64Array(values.length);
  const index = new Array<number>(dims).fill(0);
  // Fortran strides: 1, n0, n0 n1, ...
  const fStride = new Array<number>(dims);
  fStride[0] = 1;
  for (let d = 1; d < dims; d++) fStride[d] = fStride[d - 1] * shape[d - 1];
  for (let c = 0; c < values.length; c++) {
    let f = 0;
    for (let d = 0; d < dims; d++) f += index[d] * fStride[d];
    out[c] = values[f];
    for (let d = dims - 1; d >= 0; d--) {
      if (++index[d] < shape[d]) break;
      index[d] = 0;
    }
  }
  return out;
}
