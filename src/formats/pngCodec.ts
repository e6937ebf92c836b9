// PNG encoding and decoding (W3C PNG Specification, 2nd edition = ISO/IEC 15948:2004)
// through pngjs. We write two kinds of file: 8-bit RGBA (colour type 6, bit depth 8) for
// figures, and 16-bit greyscale (colour type 0, bit depth 16) for quantitative images
// such as simulated camera frames, whose counts must survive exactly. Reading accepts any
// PNG and returns one grey value per pixel at the file's own bit depth.
//
// pngjs details handled here: for 16-bit output it reads the pixel buffer as a
// Uint16Array over the whole underlying ArrayBuffer (ignoring byteOffset), so we hand it
// a copy that owns its buffer; when reading 16-bit files with skipRescale it returns a
// Uint16Array of RGBA samples (grey in R), although its typings say Buffer. A greyscale
// or RGB file with a tRNS colour key reads 0 in every channel at the keyed pixels
// (pngjs blanks them); our own files never carry tRNS.

import { PNG } from 'pngjs';

/** The first eight bytes of every PNG file (PNG specification, section 5.2). */
export const pngSignature = Uint8Array.of(137, 80, 78, 71, 13, 10, 26, 10);

/** PNG colour types (PNG specification, section 11.2.2, IHDR). */
export const PngColorType = { gray: 0, rgb: 2, palette: 3, grayAlpha: 4, rgba: 6 } as const;

export interface DecodedPng {
  width: number;
  height: number;
  /** Bits per sample in the file (1, 2, 4, 8 or 16); grey values run from 0 to 2^bitDepth - 1 (palette files: 0..255). */
  bitDepth: number;
  /** Colour type byte of the file's IHDR. */
  colorType: number;
  /** Channels per pixel in `channels`: 1 grey, 2 grey + alpha, 3 RGB, 4 RGBA (palette files: 4, RGBA). */
  channelCount: number;
  /**
   * All samples, pixel by pixel and channel by channel (e.g. R, G, B, A, R, ...), at the
   * file's own depth: exactly the stored values (palette files: the palette entries).
   */
  channels: Float64Array;
  /**
   * One grey value per pixel, row by row from the top. Greyscale files give the stored
   * sample unchanged; colour files give the Rec. 709 luma 0.2126 R + 0.7152 G + 0.0722 B
   * of the stored (gamma-encoded) samples. Alpha is ignored.
   */
  gray: Float64Array;
}

function checkSize(width: number, height: number, what: string): void {
  if (!Number.isInteger(width) || !Number.isInteger(height) || width < 1 || height < 1) {
    throw new Error(`${what}: width and height must be positive integers, got ${width} x ${height}`);
  }
}

function asBytes(buffer: Buffer): Uint8Array {
  return new Uint8Array(buffer.buffer, buffer.byteOffset, buffer.byteLength);
}

/** Encode width x height RGBA8 pixels (4 bytes per pixel, rows from the top) as PNG. */
export function encodeRgba8(width: number, height: number, rgba: Uint8Array): Uint8Array {
  checkSize(width, height, 'encodeRgba8');
  if (rgba.length !== width * height * 4) {
    throw new Error(`encodeRgba8: expected ${width * height * 4} bytes (width * height * 4), got ${rgba.length}`);
  }
  const png = new PNG({ width, height });
  png.data = Buffer.from(rgba.buffer, rgba.byteOffset, rgba.byteLength);
  return asBytes(PNG.sync.write(png));
}

/** Encode width x height 16-bit grey samples (rows from the top) as a 16-bit greyscale PNG. */
export function encodeGray16(width: number, height: number, gray: Uint16Array): Uint8Array {
  checkSize(width, height, 'encodeGray16');
  if (gray.length !== width * height) {
    throw new Error(`encodeGray16: expected ${width * height} samples (width * height), got ${gray.length}`);
  }
  const options = { width, height, bitDepth: 16, colorType: 0, inputColorType: 0, inputHasAlpha: false } as const;
  const png = new PNG(options);
  const owned = gray.slice(); // a fresh buffer: see the note on byteOffset above
  png.data = Buffer.from(owned.buffer, 0, owned.byteLength);
  return asBytes(PNG.sync.write(png, options));
}

/** Read the IHDR fields we need directly from the file (section 11.2.2). */
function readHeader(bytes: Uint8Array): { width: number; height: number; bitDepth: number; colorType: number } {
  if (bytes.length < 33 || pngSignature.some((b, i) => bytes[i] !== b)) {
    throw new Error('decodePng: not a PNG file (the 8-byte PNG signature is missing)');
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset, bytes.byteLength);
  const chunkType = String.fromCharCode(bytes[12], bytes[13], bytes[14], bytes[15]);
  if (chunkType !== 'IHDR') throw new Error(`decodePng: the first chunk must be IHDR, found '${chunkType}'`);
  return { width: view.getUint32(16), height: view.getUint32(20), bitDepth: bytes[24], colorType: bytes[25] };
}

/** Decode a PNG file into grey values at its own bit depth (see DecodedPng). */
export function decodePng(bytes: Uint8Array): DecodedPng {
  const header = readHeader(bytes);
  let png: PNG;
  try {
    png = PNG.sync.read(Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength), { skipRescale: true });
  } catch (err) {
    throw new Error(`decodePng: the file is damaged or unsupported (${(err as Error).message})`);
  }
  const { width, height } = png;
  // With skipRescale, pngjs leaves samples at the file's depth, expanded to RGBA.
  const samples = png.data as unknown as ArrayLike<number>;
  const count = width * height;
  const gray = new Float64Array(count);
  const isGray = header.colorType === PngColorType.gray || header.colorType === PngColorType.grayAlpha;
  const channelCount = { 0: 1, 2: 3, 3: 4, 4: 2, 6: 4 }[header.colorType] ?? 4;
  // Where each output channel sits in pngjs's RGBA expansion (grey is in R, its alpha in A).
  const sourceChannel = channelCount === 1 ? [0] : channelCount === 2 ? [0, 3] : channelCount === 3 ? [0, 1, 2] : [0, 1, 2, 3];
  const channels = new Float64Array(count * channelCount);
  for (let i = 0; i < count; i++) {
    const r = samples[4 * i];
    gray[i] = isGray ? r : 0.2126 * r + 0.7152 * samples[4 * i + 1] + 0.0722 * samples[4 * i + 2];
    for (let c = 0; c < channelCount; c++) channels[i * channelCount + c] = samples[4 * i + sourceChannel[c]];
  }
  return { width, height, bitDepth: header.bitDepth, colorType: header.colorType, channelCount, channels, gray };
}
