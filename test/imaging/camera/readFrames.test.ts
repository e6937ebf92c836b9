// Frame readers: round trips from files built in the tests (TIFF and FITS byte by byte from
// their specifications, .npy from NEP 1, PNG through pngjs, HDF5 through h5wasm itself in its
// in-memory file system), the camera orientation (a bright pixel at row 3, column 7 must come
// back at x = 7, y = 3 in every format), stacks, scaling keywords, and read failures that
// name the file and the fault in our words.

import { deflateSync } from 'node:zlib';
import h5wasm from 'h5wasm';
import { describe, expect, it } from 'vitest';
import { encodeGray16, encodeRgba8 } from '../../../src/formats/pngCodec.js';
import { FrameReadError } from '../../../src/imaging/camera/frameReadError.js';
import { parseFrameAddress } from '../../../src/imaging/camera/frameAddress.js';
import { readFrames } from '../../../src/imaging/camera/readFrames.js';
import { parseNpyHeader } from '../../../src/imaging/camera/readNpyFrames.js';
import { buildTiff, type TiffSampleType } from './tiffBytes.js';
import { buildFits, buildNpy } from './fileBytes.js';

const width = 10;
const height = 6;
const brightRow = 3;
const brightCol = 7;

/** A frame with a gradient and one bright pixel at (row 3, col 7), values[y * width + x]. */
function testFrame(offset = 0): number[] {
  const v: number[] = [];
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) v.push(offset + y * 10 + x);
  v[brightRow * width + brightCol] = 200 + offset;
  return v;
}

function expectBrightPixel(frame: Float64Array, w: number, offset = 0): void {
  let best = 0;
  for (let i = 1; i < frame.length; i++) if (frame[i] > frame[best]) best = i;
  expect({ x: best % w, y: Math.floor(best / w) }).toEqual({ x: brightCol, y: brightRow });
  expect(frame[best]).toBe(200 + offset);
  expect(frame[1 * w + 2]).toBe(offset + 12); // row 1, column 2
}

async function expectReadError(bytes: Uint8Array, name: string, problem: string, pattern: RegExp, dataset?: string): Promise<void> {
  let caught: unknown;
  try {
    await readFrames(bytes, name, dataset === undefined ? {} : { dataset });
  } catch (err) {
    caught = err;
  }
  expect(caught).toBeInstanceOf(FrameReadError);
  const e = caught as FrameReadError;
  expect(e.problem).toBe(problem);
  expect(e.message.startsWith(name.split(':')[0])).toBe(true);
  expect(e.message).toMatch(pattern);
  expect(e.message).not.toMatch(/outside the bounds|RangeError|TypeError|undefined|HDF5-DIAG/);
}

async function hdf5File(build: (file: InstanceType<typeof h5wasm.File>) => void): Promise<Uint8Array> {
  const { FS } = await h5wasm.ready;
  const path = `/test-build-${Math.random().toString(36).slice(2)}.h5`;
  const file = new h5wasm.File(path, 'w');
  build(file);
  file.close();
  const bytes = FS!.readFile(path) as Uint8Array;
  FS!.unlink(path);
  return bytes.slice();
}

describe('TIFF through utif2 (files built from TIFF 6.0)', () => {
  const types: TiffSampleType[] = ['uint8', 'uint16', 'int16', 'uint32', 'float32', 'float64'];
  for (const type of types) {
    for (const bigEndian of [false, true]) {
      it(`${type} ${bigEndian ? 'big' : 'little'}-endian: values exact, bright pixel at x = 7, y = 3`, async () => {
        const bytes = buildTiff([{ width, height, values: testFrame() }], type, bigEndian);
        const stack = await readFrames(bytes, 'shot.tif');
        expect(stack).toMatchObject({ width, height, sourceFormat: 'tiff', sampleType: type });
        expect(Array.from(stack.frames[0])).toEqual(testFrame());
        expectBrightPixel(stack.frames[0], width);
      });
    }
  }

  it('reads a file handed over as a Node Buffer that is a view into a larger buffer (as readFileSync gives small files)', async () => {
    const bytes = buildTiff([{ width, height, values: testFrame() }], 'uint16');
    // Buffer.slice shares memory: a copy must be made through the Uint8Array constructor.
    const pooled = Buffer.concat([Buffer.alloc(24, 7), Buffer.from(bytes)]).subarray(24);
    expect(pooled.byteOffset).toBeGreaterThan(0);
    const stack = await readFrames(pooled, 'pooled.tif');
    expect(Array.from(stack.frames[0])).toEqual(testFrame());
  });

  it('a multi-page file is a stack, with the image description as metadata', async () => {
    const pages = [0, 1000, 2000].map((o) => ({ width, height, values: testFrame(o), description: 'probe 780 nm' }));
    const stack = await readFrames(buildTiff(pages, 'uint16'), 'stack.tif');
    expect(stack.frames.length).toBe(3);
    stack.frames.forEach((f, k) => expectBrightPixel(f, width, k * 1000));
    expect(stack.metadata).toMatchObject({ pages: 3, imageDescription: 'probe 780 nm', bitsPerSample: 16 });
  });

  it('Deflate-compressed strips (TIFF compression 8, zlib stream) decode exactly', async () => {
    const raw = buildTiff([{ width, height, values: testFrame() }], 'uint16');
    // Rebuild with the strip deflated: replace the pixel bytes and patch tags 259 and 279.
    const pixels = raw.subarray(8, 8 + width * height * 2);
    const packed = deflateSync(pixels);
    const plain = buildTiff([{ width, height, values: testFrame() }], 'uint16');
    const view = new DataView(plain.buffer);
    const ifd = view.getUint32(4, true);
    const out = new Uint8Array(8 + packed.length + (packed.length % 2) + (plain.length - ifd));
    out.set(plain.subarray(0, 8));
    out.set(packed, 8);
    const newIfd = 8 + packed.length + (packed.length % 2);
    out.set(plain.subarray(ifd), newIfd);
    const o = new DataView(out.buffer);
    o.setUint32(4, newIfd, true);
    const entries = o.getUint16(newIfd, true);
    for (let e = 0; e < entries; e++) {
      const p = newIfd + 2 + 12 * e;
      const tag = o.getUint16(p, true);
      if (tag === 259) o.setUint16(p + 8, 8, true);
      if (tag === 279) o.setUint32(p + 8, packed.length, true);
    }
    const stack = await readFrames(out, 'deflate.tif');
    expect(Array.from(stack.frames[0])).toEqual(testFrame());
    expect(stack.metadata.compression).toBe('Deflate');
  });

  it('a file cut inside its pixel data is refused as truncated, naming the file', async () => {
    const bytes = buildTiff([{ width, height, values: testFrame() }], 'uint16');
    // Move the IFD before the pixels so that cutting the tail removes pixel bytes only.
    const view = new DataView(bytes.buffer);
    const ifd = view.getUint32(4, true);
    const ifdBytes = bytes.slice(ifd);
    const moved = new Uint8Array(8 + ifdBytes.length + width * height * 2);
    moved.set(bytes.subarray(0, 8));
    moved.set(ifdBytes, 8);
    const pixelStart = 8 + ifdBytes.length;
    moved.set(bytes.subarray(8, 8 + width * height * 2), pixelStart);
    const m = new DataView(moved.buffer);
    m.setUint32(4, 8, true);
    m.setUint32(8 + 2 + ifdBytes.length - 4 - 2, 0, true);
    const entries = m.getUint16(8, true);
    for (let e = 0; e < entries; e++) {
      const p = 8 + 2 + 12 * e;
      if (m.getUint16(p, true) === 273) m.setUint32(p + 8, pixelStart, true);
    }
    expect(Array.from((await readFrames(moved, 'ok.tif')).frames[0])).toEqual(testFrame());
    await expectReadError(moved.subarray(0, moved.length - 30), 'cut.tif', 'truncated', /strip 0 ends at byte \d+ but the file has \d+ bytes/);
  });

  it('pages of different sizes are refused', async () => {
    const bytes = buildTiff([{ width, height, values: testFrame() }, { width: 5, height: 6, values: new Array(30).fill(1) }], 'uint16');
    await expectReadError(bytes, 'mixed.tif', 'inconsistent-frames', /page 1 is 5 x 6 uint16 but page 0 is 10 x 6 uint16/);
  });
});

describe('FITS primary HDU (files built from the FITS 4.0 standard)', () => {
  // Stored row j is our row y = j, so the FITS stored order equals our row-major order.
  it('BITPIX 16 with BZERO = 32768 reads unsigned 16-bit counts', async () => {
    const counts = testFrame().map((v) => v * 300); // up to 60000, above int16
    const bytes = buildFits({ bitpix: 16, axes: [width, height], stored: counts.map((v) => v - 32768), cards: [['BZERO', '32768'], ['BSCALE', '1'], ['EXPTIME', '2.5D-4'], ['OBJECT', "'Rb cloud''s shot'"]] });
    const stack = await readFrames(bytes, 'shot.fits');
    expect(stack).toMatchObject({ width, height, sourceFormat: 'fits', sampleType: 'uint16' });
    expect(Array.from(stack.frames[0])).toEqual(counts);
    expect(stack.metadata.EXPTIME).toBeCloseTo(2.5e-4, 15);
    expect(stack.metadata.OBJECT).toBe("Rb cloud's shot");
    const flat = Float64Array.from(counts.map((v) => v / 300));
    expectBrightPixel(flat, width);
  });

  it('BITPIX -32 and -64, BSCALE, a 3D stack (NAXIS3 = frames)', async () => {
    const values = [...testFrame(0), ...testFrame(1000)];
    const f64 = await readFrames(buildFits({ bitpix: -64, axes: [width, height, 2], stored: values.map((v) => v + 0.125) }), 'd.fits');
    expect(f64.frames.length).toBe(2);
    expect(Array.from(f64.frames[1])).toEqual(testFrame(1000).map((v) => v + 0.125));
    const f32 = await readFrames(buildFits({ bitpix: -32, axes: [width, height], stored: testFrame(), cards: [['BSCALE', '2.0'], ['BZERO', '-1.0']] }), 'f.fits');
    expect(Array.from(f32.frames[0])).toEqual(testFrame().map((v) => 2 * v - 1));
    expectBrightPixel(Float64Array.from(f64.frames[0], (v) => v - 0.125), width);
  });

  it('BLANK integers become NaN and are counted; unpadded last block is accepted', async () => {
    const stored = testFrame();
    stored[5] = -999;
    const stack = await readFrames(buildFits({ bitpix: 32, axes: [width, height], stored, cards: [['BLANK', '-999']], noPadding: true }), 'b.fits');
    expect(Number.isNaN(stack.frames[0][5])).toBe(true);
    expect(stack.metadata.blankPixels).toBe(1);
  });

  it('faults: no END card, data cut short, extension-only file', async () => {
    const good = buildFits({ bitpix: 16, axes: [width, height], stored: testFrame() });
    const noEnd = good.slice();
    const text = new TextDecoder('latin1').decode(noEnd.subarray(0, 2880));
    const endAt = text.indexOf('END     ');
    for (let i = 0; i < 3; i++) noEnd[endAt + i] = 0x20;
    await expectReadError(noEnd, 'noend.fits', 'damaged', /no END card before binary data \(card 37\)/);
    await expectReadError(good.subarray(0, 2880 + 50), 'cut.fits', 'truncated', /needs 120 bytes after the 2880-byte header but the file has only 50/);
    await expectReadError(buildFits({ bitpix: 16, axes: [], stored: [], cards: [['EXTEND', 'T']] }), 'ext.fits', 'unsupported', /NAXIS = 0/);
  });
});

describe('.npy (NEP 1), header validated completely', () => {
  it('(rows, cols) in every supported dtype and byte order: bright pixel at x = 7, y = 3', async () => {
    for (const descr of ['<f8', '<f4', '<u2', '<i2', '|u1', '<i4', '<u4', '>f8', '>f4', '>u2', '>i2', '>i4', '>u4']) {
      const stack = await readFrames(buildNpy(descr, [height, width], testFrame()), `frame${descr}.npy`);
      expect(stack).toMatchObject({ width, height, sourceFormat: 'npy' });
      expect(Array.from(stack.frames[0])).toEqual(testFrame());
      expectBrightPixel(stack.frames[0], width);
    }
  });

  it('(frames, rows, cols) is a stack; fortran_order True is transposed into C order', async () => {
    const c = [...testFrame(0), ...testFrame(500)];
    const stack = await readFrames(buildNpy('<f8', [2, height, width], c), 'stack.npy');
    expect(stack.frames.length).toBe(2);
    expectBrightPixel(stack.frames[1], width, 500);
    // Fortran order: element (f, y, x) at f + 2 * (y + height * x).
    const fortran = new Array(c.length);
    for (let f = 0; f < 2; f++) for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) fortran[f + 2 * (y + height * x)] = c[(f * height + y) * width + x];
    const fstack = await readFrames(buildNpy('<f8', [2, height, width], fortran, { fortranOrder: true }), 'fortran.npy');
    expect(Array.from(fstack.frames[0])).toEqual(testFrame(0));
    expect(Array.from(fstack.frames[1])).toEqual(testFrame(500));
  });

  it('header faults are named: dtype, shape, keys, byte count', async () => {
    const v = testFrame();
    const cases: [Uint8Array, string, RegExp][] = [
      // The messages are those of the project's one .npy reader (src/formats/npy.ts).
      [buildNpy('<f8', [height, width], v, { headerText: "{'descr': '<c16', 'fortran_order': False, 'shape': (6, 10), }" }), 'unsupported', /dtype "<c16" is not supported/],
      [buildNpy('<f8', [height, width], v, { headerText: "{'descr': '<f8', 'fortran_order': False, 'shape': (-6, 10), }" }), 'damaged', /every axis length must be a non-negative integer/],
      [buildNpy('<f8', [height, width], v, { headerText: "{'descr': '<f8', 'shape': (6, 10), }" }), 'damaged', /has no 'fortran_order'/],
      [buildNpy('<f8', [height, width], v, { headerText: "{'descr': '<f8', 'fortran_order': 0, 'shape': (6, 10), }" }), 'damaged', /expected True or False/],
      [buildNpy('<f8', [height, width], v, { headerText: "{'descr': '<f8', 'fortran_order': False, 'shape': (6, 10), 'extra': True, }" }), 'damaged', /unknown key 'extra'/],
      [buildNpy('<f8', [height, width + 1], v), 'truncated', /needs 528 data bytes, the file holds 480; the file is truncated/],
      [buildNpy('<f8', [height, width - 1], v), 'damaged', /extra bytes after the array/],
      [buildNpy('<f8', [width * height], v), 'not-an-image', /shape \(60\); expected \(rows, cols\)/],
    ];
    for (const [bytes, problem, pattern] of cases) await expectReadError(bytes, 'bad.npy', problem, pattern);
    expect(parseNpyHeader(buildNpy('<u2', [height, width], v), 'x.npy')).toMatchObject({ descr: '<u2', shape: [6, 10], fortranOrder: false, version: [1, 0] });
    expect(() => parseNpyHeader(new Uint8Array([1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11]), 'x.npy')).toThrow(/^x\.npy: not a NumPy \.npy file/);
    let problem = '';
    try {
      parseNpyHeader(new Uint8Array(11), 'x.npy');
    } catch (e) {
      problem = (e as FrameReadError).problem;
    }
    expect(problem).toBe('unknown-format');
  });
});

describe('PNG (pngjs)', () => {
  it('16-bit greyscale: counts exact, row 0 at the top', async () => {
    const stack = await readFrames(encodeGray16(width, height, Uint16Array.from(testFrame().map((v) => v * 300))), 'frame.png');
    expect(stack).toMatchObject({ width, height, sourceFormat: 'png', sampleType: 'uint16' });
    expectBrightPixel(Float64Array.from(stack.frames[0], (v) => v / 300), width);
  });

  it('a colour PNG is refused', async () => {
    await expectReadError(encodeRgba8(2, 2, new Uint8Array(16).fill(9)), 'colour.png', 'unsupported', /colour PNG/);
  });
});

describe('HDF5 through h5wasm (files made by h5wasm in memory)', () => {
  it('a 2D uint16 dataset addressed as file.h5:/group/name, with its attributes', async () => {
    const bytes = await hdf5File((f) => {
      const g = f.create_group('shot');
      const ds = g.create_dataset({ name: 'atoms', data: Uint16Array.from(testFrame()), shape: [height, width] });
      ds.create_attribute('exposure_ms', 0.08);
      ds.create_attribute('camera', 'sCMOS-2');
      g.create_dataset({ name: 'probe', data: new Float32Array(width * height).fill(3), shape: [height, width] });
    });
    const stack = await readFrames(bytes, 'run7.h5:/shot/atoms');
    expect(stack).toMatchObject({ width, height, sourceFormat: 'hdf5', sampleType: 'uint16', source: 'run7.h5:/shot/atoms' });
    expectBrightPixel(stack.frames[0], width);
    expect(stack.metadata).toMatchObject({ dataset: '/shot/atoms', exposure_ms: 0.08, camera: 'sCMOS-2' });
    const probe = await readFrames(bytes, 'run7.h5:/shot/probe');
    expect(probe.sampleType).toBe('float32');
    await expectReadError(bytes, 'run7.h5', 'dataset-missing', /holds 2 image datasets \(\/shot\/atoms, \/shot\/probe\); name one as run7.h5:\/path\/to\/dataset/);
    await expectReadError(bytes, 'run7.h5:/shot/dark', 'dataset-missing', /has no dataset at \/shot\/dark; datasets in the file: \/shot\/atoms, \/shot\/probe/);
  });

  it('a 3D gzip-chunked float64 dataset is a stack; the only dataset is found without a path', async () => {
    const values = [...testFrame(0), ...testFrame(100), ...testFrame(200)];
    const bytes = await hdf5File((f) => {
      f.create_dataset({ name: 'frames', data: Float64Array.from(values), shape: [3, height, width], chunks: [1, height, width], compression: 'gzip' });
    });
    const stack = await readFrames(bytes, 'stack.h5');
    expect(stack.frames.length).toBe(3);
    stack.frames.forEach((f, k) => expectBrightPixel(f, width, 100 * k));
  });

  it('a damaged or foreign file is refused in our words (no HDF5 error stack)', async () => {
    const bytes = await hdf5File((f) => {
      f.create_dataset({ name: 'a', data: new Float64Array(4), shape: [2, 2] });
    });
    await expectReadError(bytes.subarray(0, 600), 'cut.h5', 'damaged', /cannot be opened: it is damaged or cut short/);
    await expectReadError(new Uint8Array(100).fill(7), 'x.h5', 'unknown-format', /not a TIFF, HDF5, FITS/);
    await expectReadError(buildNpy('<f8', [2, 2], [1, 2, 3, 4]), 'a.npy', 'unsupported', /a dataset path \(\/x\) was given but the file is a NPY file/, '/x');
  });
});

describe('frame addresses', () => {
  it('splits only after an HDF5 extension', () => {
    expect(parseFrameAddress('data/run7.h5:/shot/atoms')).toEqual({ file: 'data/run7.h5', dataset: '/shot/atoms' });
    expect(parseFrameAddress('C:/lab/run.HDF5:/img')).toEqual({ file: 'C:/lab/run.HDF5', dataset: '/img' });
    expect(parseFrameAddress('C:/lab/frame.tif')).toEqual({ file: 'C:/lab/frame.tif' });
    expect(parseFrameAddress('run.h5')).toEqual({ file: 'run.h5' });
  });
});

describe('.npy files written by numpy itself (skipped only where python3 with numpy is missing)', () => {
  it('uint16 C order, big-endian float32, Fortran-order float64 stack', async () => {
    const { spawnSync } = await import('node:child_process');
    const { mkdtempSync, readFileSync, rmSync } = await import('node:fs');
    const { tmpdir } = await import('node:os');
    const { join } = await import('node:path');
    const probe = spawnSync('python3', ['-c', 'import numpy'], { encoding: 'utf8' });
    if (probe.status !== 0) return; // no numpy on this machine: the hand-built files above still run
    const dir = mkdtempSync(join(tmpdir(), 'tiercake-npy-'));
    try {
      const script = [
        'import numpy as np, sys',
        'd = sys.argv[1]',
        'a = np.arange(60).reshape(6, 10).astype("<u2"); a[3, 7] = 200; np.save(d + "/u2.npy", a)',
        'np.save(d + "/bf4.npy", (a.astype(">f4") + 0.5))',
        'np.save(d + "/f8.npy", np.asfortranarray(np.stack([a, a + 1000]).astype("<f8")))',
      ].join('\n');
      const run = spawnSync('python3', ['-c', script, dir], { encoding: 'utf8' });
      expect(run.status, run.stderr).toBe(0);
      const u2 = await readFrames(new Uint8Array(readFileSync(join(dir, 'u2.npy'))), 'u2.npy');
      expect(u2.frames[0][3 * 10 + 7]).toBe(200);
      expect(u2.frames[0][1 * 10 + 2]).toBe(12);
      const bf4 = await readFrames(new Uint8Array(readFileSync(join(dir, 'bf4.npy'))), 'bf4.npy');
      expect(bf4.frames[0][3 * 10 + 7]).toBe(200.5);
      const f8 = await readFrames(new Uint8Array(readFileSync(join(dir, 'f8.npy'))), 'f8.npy');
      expect(f8.metadata.fortranOrder).toBe(true);
      expect(f8.frames.length).toBe(2);
      expect(f8.frames[1][3 * 10 + 7]).toBe(1200);
      expect(f8.frames[1][1 * 10 + 2]).toBe(1012);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
