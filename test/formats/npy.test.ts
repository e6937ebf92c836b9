// NumPy .npy reader and writer (src/formats/npy.ts) against the format's definition
// (NumPy Enhancement Proposal 1 and numpy.lib.format: magic, version, little-endian header
// length, a Python-dict header ending in "\n", a data section of shape x itemsize bytes) and
// against numpy itself as a general-purpose reader and writer (skipped when python3 with
// numpy is missing): files numpy writes (versions 1.0 and 2.0, several dtypes, 0- to
// 3-axis shapes) are read exactly, and files numpy refuses are refused here too.

import { execFileSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { decodeNpy, encodeNpy, NpyFormatError, readNpyHeader } from '../../src/formats/npy.js';

const dir = mkdtempSync(join(tmpdir(), 'tiercake-npy-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

function hasNumpy(): boolean {
  try {
    execFileSync('python3', ['-c', 'import numpy'], { stdio: 'ignore' });
    return true;
  } catch {
    return false;
  }
}

/** A version 1.0 file with the given header dict text (padded as numpy pads it) and data. */
function npyWith(dict: string, data: Uint8Array, options: { version?: number; declaredLength?: number; pad?: boolean } = {}): Uint8Array {
  const version = options.version ?? 1;
  const lengthBytes = version === 1 ? 2 : 4;
  const pre = 8 + lengthBytes;
  let header = dict;
  if (options.pad !== false) header += `${' '.repeat((64 - ((pre + dict.length + 1) % 64)) % 64)}\n`;
  const head = Buffer.from(header, 'latin1');
  const out = new Uint8Array(pre + head.length + data.length);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, version, 0], 0);
  const length = options.declaredLength ?? head.length;
  for (let k = 0; k < lengthBytes; k++) out[8 + k] = (length >>> (8 * k)) & 0xff;
  out.set(head, pre);
  out.set(data, pre + head.length);
  return out;
}

const f8 = (values: number[]): Uint8Array => new Uint8Array(Float64Array.from(values).buffer);

describe('the header is validated completely, and the message names the file', () => {
  const cases: Array<[string, Uint8Array, RegExp]> = [
    ['bad magic', new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11]), /not a NumPy \.npy file/],
    ['unknown version', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", f8([1]), { version: 7 }), /version 7\.0 is not known/],
    ['header past the end', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", f8([1]), { declaredLength: 60018 }), /header length 60018 runs past the end of the file/],
    ['no newline', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", f8([1]), { pad: false }), /does not end with a newline/],
    ['missing key', npyWith("{'descr': '<f8', 'shape': (1,), }", f8([1])), /has no 'fortran_order'/],
    ['unknown key', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), 'extra': 1, }", f8([1])), /unknown key 'extra'/],
    ['key twice', npyWith("{'descr': '<f8', 'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", f8([1])), /names 'descr' twice/],
    ['negative axis', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (-1,), }", f8([1])), /the shape holds "-1"/],
    ['fractional axis', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1.5,), }", f8([1])), /the shape holds "1\.5"/],
    ['word axis', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (n,), }", f8([1])), /the shape holds "n"/],
    ['integer, not tuple', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1), }", f8([1])), /is not a tuple/],
    ['fortran order', npyWith("{'descr': '<f8', 'fortran_order': True, 'shape': (1,), }", f8([1])), /Fortran order/],
    ['odd fortran flag', npyWith("{'descr': '<f8', 'fortran_order': 0, 'shape': (1,), }", f8([1])), /expected True or False/],
    ['structured dtype', npyWith("{'descr': [('a', '<f8')], 'fortran_order': False, 'shape': (1,), }", f8([1])), /structured dtypes/],
    ['unsupported dtype', npyWith("{'descr': '<U8', 'fortran_order': False, 'shape': (1,), }", f8([1])), /dtype "<U8" is not supported/],
    ['no byte order on a wide type', npyWith("{'descr': '|f8', 'fortran_order': False, 'shape': (1,), }", f8([1])), /multi-byte types need/],
    ['data short', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (2, 2), }", f8([1, 2, 3])), /needs 32 data bytes, the file holds 24; the file is truncated/],
    ['data long', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", f8([1, 2])), /needs 8 data bytes, the file holds 16; the file is damaged/],
    ['text after the dict', npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), } x", f8([1])), /text after the closing/],
  ];
  it.each(cases)('%s', (_name, bytes, why) => {
    expect(() => decodeNpy(bytes, 'frame.npy')).toThrow(NpyFormatError);
    expect(() => decodeNpy(bytes, 'frame.npy')).toThrow(why);
    expect(() => decodeNpy(bytes, 'frame.npy')).toThrow(/^frame\.npy: /);
  });
});

describe('reading and writing', () => {
  it('round-trips float64, int32 and uint8 with any shape (C order), 1-axis shapes written as (n,)', () => {
    const data = Float64Array.from({ length: 24 }, (_, i) => (i - 7) / 3);
    const back = decodeNpy(encodeNpy(data, [2, 3, 4]));
    expect(back.shape).toEqual([2, 3, 4]);
    expect(Array.from(back.data)).toEqual(Array.from(data));
    expect(Array.from(decodeNpy(encodeNpy(Int32Array.of(-5, 7), [2])).data)).toEqual([-5, 7]);
    expect(Array.from(decodeNpy(encodeNpy(Uint8Array.of(0, 255, 3), [3])).data)).toEqual([0, 255, 3]);
    const header = readNpyHeader(encodeNpy(Uint8Array.of(1), [1]));
    expect(header).toMatchObject({ version: [1, 0], descr: '|u1', shape: [1], count: 1, dataOffset: 128 });
    // The preamble plus header is a multiple of 64 bytes, as numpy writes it.
    expect(readNpyHeader(encodeNpy(data, [2, 3, 4])).dataOffset % 64).toBe(0);
    expect(() => encodeNpy(data, [5, 5])).toThrow(/holds 25 values, data has 24/);
  });

  it('reads big-endian, version 2.0, 0-d and empty arrays as numpy writes them', () => {
    const be = new Uint8Array(8);
    new DataView(be.buffer).setFloat64(0, 1.25, false);
    expect(Array.from(decodeNpy(npyWith("{'descr': '>f8', 'fortran_order': False, 'shape': (1,), }", be)).data)).toEqual([1.25]);
    expect(Array.from(decodeNpy(npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (1,), }", f8([3.5]), { version: 2 })).data)).toEqual([3.5]);
    expect(decodeNpy(npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (), }", f8([2]))).shape).toEqual([]);
    expect(decodeNpy(npyWith("{'descr': '<f8', 'fortran_order': False, 'shape': (0, 3), }", new Uint8Array(0))).data.length).toBe(0);
  });

  it('agrees with numpy: numpy reads what we write, we read what numpy writes (versions 1.0 and 2.0)', () => {
    if (!hasNumpy()) return;
    const ours = join(dir, 'ours.npy');
    const data = Float64Array.from({ length: 6 }, (_, i) => Math.PI * (i - 2));
    execFileSync('python3', ['-c', 'import sys; open(sys.argv[1], "wb").write(sys.stdin.buffer.read())', ours], { input: encodeNpy(data, [2, 3]) });
    const check = JSON.parse(execFileSync('python3', ['-c', 'import numpy, sys, json; a = numpy.load(sys.argv[1]); print(json.dumps({"shape": a.shape, "dtype": str(a.dtype), "v": [repr(float(x)) for x in a.ravel()]}))', ours], { encoding: 'utf8' }));
    expect(check.shape).toEqual([2, 3]);
    expect(check.dtype).toBe('float64');
    expect(check.v.map(Number)).toEqual(Array.from(data));
    const script =
      'import numpy, sys\n' +
      'from numpy.lib import format as f\n' +
      'a = numpy.arange(24, dtype=numpy.int16).reshape(2, 3, 4) - 5\n' +
      "numpy.save(sys.argv[1] + '/i2.npy', a)\n" +
      "numpy.save(sys.argv[1] + '/f4.npy', (a / 4).astype('>f4'))\n" +
      "numpy.save(sys.argv[1] + '/b.npy', a > 0)\n" +
      "with open(sys.argv[1] + '/v2.npy', 'wb') as fh:\n" +
      "    f.write_array(fh, a.astype(numpy.float64), version=(2, 0))\n";
    execFileSync('python3', ['-c', script, dir]);
    const expected = Array.from({ length: 24 }, (_, i) => i - 5);
    expect(Array.from(decodeNpy(readFileSync(join(dir, 'i2.npy'))).data)).toEqual(expected);
    expect(Array.from(decodeNpy(readFileSync(join(dir, 'f4.npy'))).data)).toEqual(expected.map((v) => v / 4));
    expect(Array.from(decodeNpy(readFileSync(join(dir, 'b.npy'))).data)).toEqual(expected.map((v) => (v > 0 ? 1 : 0)));
    const v2 = decodeNpy(readFileSync(join(dir, 'v2.npy')));
    expect(v2.shape).toEqual([2, 3, 4]);
    expect(Array.from(v2.data)).toEqual(expected);
    expect(readNpyHeader(readFileSync(join(dir, 'v2.npy'))).version).toEqual([2, 0]);
  });

  it('Fortran order: refused by default, transposed into C order when accepted (numpy.asfortranarray as the reference)', () => {
    // Element (i, j, k) of a (2, 3, 4) array sits at i + 2 (j + 3 k) in Fortran order (numpy.lib.format).
    const shape = [2, 3, 4];
    const c = Array.from({ length: 24 }, (_, n) => n * 1.5 - 3);
    const stored = new Float64Array(24);
    for (let i = 0; i < 2; i++) for (let j = 0; j < 3; j++) for (let k = 0; k < 4; k++) stored[i + 2 * (j + 3 * k)] = c[(i * 3 + j) * 4 + k];
    const bytes = npyWith("{'descr': '<f8', 'fortran_order': True, 'shape': (2, 3, 4), }", new Uint8Array(stored.buffer));
    expect(() => decodeNpy(bytes, 'f.npy')).toThrow(/Fortran order/);
    let problem = '';
    try {
      decodeNpy(bytes, 'f.npy');
    } catch (e) {
      problem = (e as NpyFormatError).problem;
    }
    expect(problem).toBe('unsupported');
    const read = decodeNpy(bytes, 'f.npy', { fortranOrder: 'accept' });
    expect(read.shape).toEqual(shape);
    expect(read.header.fortranOrder).toBe(true);
    expect(Array.from(read.data)).toEqual(c);
    if (!hasNumpy()) return;
    const file = join(dir, 'fortran.npy');
    execFileSync('python3', ['-c', 'import numpy, sys; numpy.save(sys.argv[1], numpy.asfortranarray(numpy.arange(24.0).reshape(2, 3, 4) * 1.5 - 3))', file]);
    const fromNumpy = decodeNpy(readFileSync(file), 'fortran.npy', { fortranOrder: 'accept' });
    expect(fromNumpy.header.fortranOrder).toBe(true);
    expect(Array.from(fromNumpy.data)).toEqual(c);
  });
});
