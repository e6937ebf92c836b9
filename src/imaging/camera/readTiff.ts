// TIFF frames (TIFF Revision 6.0, Adobe 1992) through utif2 (photopea's UTIF.js, MIT), one
// frame per page (IFD of the main chain), so a multi-page file is a shot stack. Greyscale
// only (SamplesPerPixel 1, PhotometricInterpretation 0 or 1 treated as stored counts; 0 is
// refused because it would invert the counts), 8/16/32-bit unsigned or signed integers and
// 32/64-bit IEEE floats (SampleFormat, tag 339), uncompressed, LZW, Deflate or PackBits.
// Rows are stored from the top (TIFF 6.0 section 8, default Orientation 1), so stored row r
// is our row y = r; other Orientation values are refused rather than guessed.
//
// Behaviour of utif2 4.1.0 that this file relies on, checked by the tests with files built
// byte by byte: decodeImage leaves `ifd.data` as raw sample bytes; it swaps 16-bit samples of
// big-endian ('MM') files into little-endian order but leaves 32- and 64-bit samples in the
// file's byte order. utif2 does not check that strips lie inside the file (missing bytes read
// as 0), prints to the console for tiled files and unknown compressions, and does not undo
// the floating-point predictor: all of these are checked here before decoding.

import UTIF from 'utif2';
import { FrameReadError } from './frameReadError.js';
import type { FrameStack, MetadataValue } from './frameStack.js';

type Ifd = UTIF.IFD;

const supportedCompression: Record<number, string> = { 1: 'none', 5: 'LZW', 8: 'Deflate', 32946: 'Deflate', 32773: 'PackBits' };

function tagNumbers(ifd: Ifd, tag: number): number[] | undefined {
  const v = ifd[`t${tag}`];
  if (v === undefined) return undefined;
  if (Array.isArray(v) && v.every((x) => typeof x === 'number')) return v as number[];
  return undefined;
}

function tagText(ifd: Ifd, tag: number): string | undefined {
  const v = ifd[`t${tag}`];
  if (Array.isArray(v) && typeof v[0] === 'string') return (v as string[]).join('');
  return undefined;
}

function sampleTypeOf(bits: number, format: number): string | undefined {
  if (format === 1 && (bits === 8 || bits === 16 || bits === 32)) return `uint${bits}`;
  if (format === 2 && (bits === 8 || bits === 16 || bits === 32)) return `int${bits}`;
  if (format === 3 && (bits === 32 || bits === 64)) return `float${bits}`;
  return undefined;
}

/** Checks on one page that utif2 would not make; returns the page's sample type. */
function checkPage(ifd: Ifd, page: number, name: string, fileLength: number): { sampleType: string; bits: number } {
  const where = `page ${page}`;
  const width = tagNumbers(ifd, 256)?.[0];
  const height = tagNumbers(ifd, 257)?.[0];
  if (width === undefined || height === undefined || width < 1 || height < 1) {
    throw new FrameReadError(name, 'not-an-image', `${where} of the TIFF has no image size (ImageWidth/ImageLength tags)`);
  }
  const spp = tagNumbers(ifd, 277)?.[0] ?? 1;
  if (spp !== 1) {
    throw new FrameReadError(name, 'unsupported', `${where} has ${spp} samples per pixel (colour); a camera frame must be greyscale: save one channel per page`);
  }
  const bits = tagNumbers(ifd, 258)?.[0] ?? 1;
  const format = tagNumbers(ifd, 339)?.[0] ?? 1;
  const sampleType = sampleTypeOf(bits, format);
  if (sampleType === undefined) {
    throw new FrameReadError(name, 'unsupported', `${where} stores ${bits}-bit samples of SampleFormat ${format}; supported: 8/16/32-bit integers and 32/64-bit floats`);
  }
  const photometric = tagNumbers(ifd, 262)?.[0] ?? 1;
  if (photometric !== 1) {
    throw new FrameReadError(
      name,
      'unsupported',
      `${where} has PhotometricInterpretation ${photometric}; only 1 (BlackIsZero: stored value = counts) is read, so that counts are never silently inverted`,
    );
  }
  const orientation = tagNumbers(ifd, 274)?.[0] ?? 1;
  if (orientation !== 1) {
    throw new FrameReadError(name, 'unsupported', `${where} has Orientation ${orientation}; only 1 (row 0 at the top, column 0 at the left) is read: resave the frame without an orientation tag`);
  }
  const compression = tagNumbers(ifd, 259)?.[0] ?? 1;
  if (supportedCompression[compression] === undefined) {
    throw new FrameReadError(name, 'unsupported', `${where} uses TIFF compression ${compression}; resave uncompressed, LZW, Deflate or PackBits`);
  }
  const predictor = tagNumbers(ifd, 317)?.[0] ?? 1;
  if (predictor !== 1 && !(predictor === 2 && (bits === 8 || bits === 16))) {
    throw new FrameReadError(name, 'unsupported', `${where} uses TIFF predictor ${predictor} with ${bits}-bit samples; resave without a predictor`);
  }
  if (ifd['t322'] !== undefined) {
    throw new FrameReadError(name, 'unsupported', `${where} is stored in tiles; resave the frame in strips (the usual layout of camera software)`);
  }
  const offsets = tagNumbers(ifd, 273);
  const counts = tagNumbers(ifd, 279);
  if (offsets === undefined || counts === undefined || offsets.length !== counts.length) {
    throw new FrameReadError(name, 'damaged', `${where} has no consistent StripOffsets/StripByteCounts tags, so its pixels cannot be located`);
  }
  let stored = 0;
  for (let s = 0; s < offsets.length; s++) {
    if (offsets[s] + counts[s] > fileLength) {
      throw new FrameReadError(name, 'truncated', `${where}: strip ${s} ends at byte ${offsets[s] + counts[s]} but the file has ${fileLength} bytes (the file is cut short)`);
    }
    stored += counts[s];
  }
  const needed = width * height * (bits / 8);
  if (compression === 1 && stored < needed) {
    throw new FrameReadError(name, 'truncated', `${where} holds ${stored} bytes of pixels but ${width} x ${height} ${sampleType} samples need ${needed}`);
  }
  return { sampleType, bits };
}

function convertSamples(data: Uint8Array, sampleType: string, count: number, littleEndian: boolean): Float64Array {
  const view = new DataView(data.buffer, data.byteOffset, data.byteLength);
  const out = new Float64Array(count);
  switch (sampleType) {
    case 'uint8': for (let i = 0; i < count; i++) out[i] = data[i]; break;
    case 'int8': for (let i = 0; i < count; i++) out[i] = view.getInt8(i); break;
    // utif2 has already put 16-bit samples in little-endian order (see header).
    case 'uint16': for (let i = 0; i < count; i++) out[i] = view.getUint16(2 * i, true); break;
    case 'int16': for (let i = 0; i < count; i++) out[i] = view.getInt16(2 * i, true); break;
    case 'uint32': for (let i = 0; i < count; i++) out[i] = view.getUint32(4 * i, littleEndian); break;
    case 'int32': for (let i = 0; i < count; i++) out[i] = view.getInt32(4 * i, littleEndian); break;
    case 'float32': for (let i = 0; i < count; i++) out[i] = view.getFloat32(4 * i, littleEndian); break;
    case 'float64': for (let i = 0; i < count; i++) out[i] = view.getFloat64(8 * i, littleEndian); break;
  }
  return out;
}

/**
 * Decode every page of a TIFF file (its bytes) into frames. Metadata: `pages`, `bitsPerSample`,
 * `compression`, and when present `imageDescription`, `software`, `dateTime`, `xResolution`,
 * `yResolution`, `resolutionUnit` of the first page.
 */
export function readTiffFrames(bytes: Uint8Array, name: string): FrameStack {
  if (bytes.length < 8) throw new FrameReadError(name, 'truncated', `only ${bytes.length} bytes; a TIFF file has at least an 8-byte header`);
  const littleEndian = bytes[0] === 0x49 && bytes[1] === 0x49;
  const bigEndian = bytes[0] === 0x4d && bytes[1] === 0x4d;
  const magic = littleEndian ? bytes[2] | (bytes[3] << 8) : (bytes[2] << 8) | bytes[3];
  if (!(littleEndian || bigEndian) || (magic !== 42 && magic !== 43)) {
    throw new FrameReadError(name, 'unknown-format', 'is not a TIFF file (no II*/MM* header)');
  }
  if (magic === 43) throw new FrameReadError(name, 'unsupported', 'is a BigTIFF file, which is not read; save as classic TIFF (files below 4 GB)');
  // utif2 wants an ArrayBuffer holding exactly the file. A copy through the Uint8Array
  // constructor: Node's Buffer.slice would return a view into the shared pool instead.
  const owned = bytes.byteOffset === 0 && bytes.byteLength === bytes.buffer.byteLength && bytes.buffer instanceof ArrayBuffer
    ? bytes.buffer
    : new Uint8Array(bytes).buffer;
  let ifds: Ifd[];
  try {
    ifds = UTIF.decode(owned);
  } catch {
    throw new FrameReadError(name, 'damaged', 'the TIFF directory structure is damaged or cut short (its image file directories cannot be read)');
  }
  if (ifds.length === 0) throw new FrameReadError(name, 'not-an-image', 'the TIFF file holds no image directory');
  const frames: Float64Array[] = [];
  let width = 0;
  let height = 0;
  let sampleType = '';
  ifds.forEach((ifd, page) => {
    const info = checkPage(ifd, page, name, bytes.length);
    const w = tagNumbers(ifd, 256)![0];
    const h = tagNumbers(ifd, 257)![0];
    if (page === 0) {
      width = w;
      height = h;
      sampleType = info.sampleType;
    } else if (w !== width || h !== height || info.sampleType !== sampleType) {
      throw new FrameReadError(
        name,
        'inconsistent-frames',
        `page ${page} is ${w} x ${h} ${info.sampleType} but page 0 is ${width} x ${height} ${sampleType}; a stack needs frames of one size and type`,
      );
    }
    if ((tagNumbers(ifd, 277)?.[0] ?? 1) === 1) delete ifd['t284']; // PlanarConfiguration is moot for one sample; utif2 would log it
    try {
      UTIF.decodeImage(owned, ifd);
    } catch {
      throw new FrameReadError(name, 'damaged', `the pixel data of page ${page} cannot be decompressed (damaged or cut short)`);
    }
    const needed = w * h * (info.bits / 8);
    if (!(ifd.data instanceof Uint8Array) || ifd.data.length < needed) {
      throw new FrameReadError(name, 'truncated', `page ${page} decoded to ${ifd.data?.length ?? 0} bytes but ${w} x ${h} ${info.sampleType} samples need ${needed}`);
    }
    frames.push(convertSamples(ifd.data, info.sampleType, w * h, littleEndian));
  });
  const first = ifds[0];
  const metadata: Record<string, MetadataValue> = {
    pages: ifds.length,
    bitsPerSample: tagNumbers(first, 258)?.[0] ?? 1,
    compression: supportedCompression[tagNumbers(first, 259)?.[0] ?? 1],
    byteOrder: littleEndian ? 'little-endian' : 'big-endian',
  };
  const texts: [number, string][] = [[270, 'imageDescription'], [305, 'software'], [306, 'dateTime']];
  for (const [tag, key] of texts) {
    const t = tagText(first, tag);
    if (t !== undefined) metadata[key] = t.replace(/\0+$/, '');
  }
  const numbers: [number, string][] = [[282, 'xResolution'], [283, 'yResolution'], [296, 'resolutionUnit']];
  for (const [tag, key] of numbers) {
    const v = tagNumbers(first, tag);
    if (v !== undefined) metadata[key] = v.length === 1 ? v[0] : v;
  }
  return { frames, width, height, sourceFormat: 'tiff', sampleType, source: name, metadata };
}
