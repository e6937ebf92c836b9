// PNG codec checks against the PNG specification (W3C Portable Network Graphics
// Specification, 2nd edition = ISO/IEC 15948:2004). The test carries its own reading of
// the format, written from the specification and independent of pngjs:
//   - signature 137 80 78 71 13 10 26 10 (section 5.2);
//   - chunks: 4-byte big-endian length, 4-byte type, data, CRC-32 over type + data
//     (section 5.3), CRC polynomial 0xEDB88320 reflected (Annex D);
//   - IHDR: width, height (u32 BE), bit depth, colour type, compression 0, filter 0,
//     interlace 0 (section 11.2.2); colour type 0 = greyscale, 6 = RGBA;
//   - IDAT: zlib stream of scanlines, each led by a filter-type byte 0..4 (sections 9.2,
//     10), 16-bit samples big-endian (section 7.1).
// Decoding of the scanlines uses node:zlib (a general-purpose inflater).

import { deflateSync, inflateSync } from 'node:zlib';
import { describe, expect, it } from 'vitest';
import { decodePng, encodeGray16, encodeRgba8, pngSignature } from '../../src/formats/pngCodec.js';

// CRC-32 as in Annex D of the PNG specification.
const crcTable = (() => {
  const t = new Uint32Array(256);
  for (let n = 0; n < 256; n++) {
    let c = n;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
    t[n] = c >>> 0;
  }
  return t;
})();
function crc32(bytes: Uint8Array): number {
  let c = 0xffffffff;
  for (const b of bytes) c = crcTable[(c ^ b) & 0xff] ^ (c >>> 8);
  return (c ^ 0xffffffff) >>> 0;
}

interface Chunk {
  type: string;
  data: Uint8Array;
  crcOk: boolean;
}

function readChunks(file: Uint8Array): Chunk[] {
  const view = new DataView(file.buffer, file.byteOffset, file.byteLength);
  const chunks: Chunk[] = [];
  let p = 8;
  while (p < file.length) {
    const length = view.getUint32(p);
    const type = String.fromCharCode(...file.subarray(p + 4, p + 8));
    const data = file.subarray(p + 8, p + 8 + length);
    const crc = view.getUint32(p + 8 + length);
    chunks.push({ type, data, crcOk: crc === crc32(file.subarray(p + 4, p + 8 + length)) });
    p += 12 + length;
  }
  return chunks;
}

function chunk(type: string, data: Uint8Array): Uint8Array {
  const out = new Uint8Array(12 + data.length);
  const view = new DataView(out.buffer);
  view.setUint32(0, data.length);
  for (let i = 0; i < 4; i++) out[4 + i] = type.charCodeAt(i);
  out.set(data, 8);
  view.setUint32(8 + data.length, crc32(out.subarray(4, 8 + data.length)));
  return out;
}

function concat(parts: Uint8Array[]): Uint8Array {
  const out = new Uint8Array(parts.reduce((n, p) => n + p.length, 0));
  let o = 0;
  for (const p of parts) {
    out.set(p, o);
    o += p.length;
  }
  return out;
}

// Reverse the scanline filters of section 9.2 (None, Sub, Up, Average, Paeth).
function unfilter(raw: Uint8Array, width: number, height: number, bytesPerPixel: number): Uint8Array {
  const stride = width * bytesPerPixel;
  const out = new Uint8Array(stride * height);
  for (let y = 0; y < height; y++) {
    const type = raw[y * (stride + 1)];
    const line = raw.subarray(y * (stride + 1) + 1, (y + 1) * (stride + 1));
    for (let i = 0; i < stride; i++) {
      const a = i >= bytesPerPixel ? out[y * stride + i - bytesPerPixel] : 0;
      const b = y > 0 ? out[(y - 1) * stride + i] : 0;
      const c = y > 0 && i >= bytesPerPixel ? out[(y - 1) * stride + i - bytesPerPixel] : 0;
      let predictor = 0;
      if (type === 1) predictor = a;
      else if (type === 2) predictor = b;
      else if (type === 3) predictor = Math.floor((a + b) / 2);
      else if (type === 4) {
        const p = a + b - c;
        const pa = Math.abs(p - a);
        const pb = Math.abs(p - b);
        const pc = Math.abs(p - c);
        predictor = pa <= pb && pa <= pc ? a : pb <= pc ? b : c;
      } else if (type !== 0) throw new Error(`bad filter type ${type}`);
      out[y * stride + i] = (line[i] + predictor) & 0xff;
    }
  }
  return out;
}

function ihdrFields(data: Uint8Array) {
  const v = new DataView(data.buffer, data.byteOffset, data.byteLength);
  return {
    width: v.getUint32(0),
    height: v.getUint32(4),
    bitDepth: data[8],
    colorType: data[9],
    compression: data[10],
    filter: data[11],
    interlace: data[12],
  };
}

describe('encodeRgba8', () => {
  const width = 7;
  const height = 5;
  const rgba = new Uint8Array(width * height * 4);
  for (let i = 0; i < rgba.length; i++) rgba[i] = (i * 37 + (i >> 3) * 11) & 0xff;
  rgba[0] = 0;
  rgba[1] = 255;
  const file = encodeRgba8(width, height, rgba);

  it('starts with the PNG signature of section 5.2', () => {
    expect([...file.subarray(0, 8)]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
    expect([...pngSignature]).toEqual([137, 80, 78, 71, 13, 10, 26, 10]);
  });

  it('has an IHDR with bit depth 8, colour type 6 (RGBA) and valid CRCs, and ends with IEND', () => {
    const chunks = readChunks(file);
    expect(chunks[0].type).toBe('IHDR');
    expect(chunks[0].data.length).toBe(13);
    expect(ihdrFields(chunks[0].data)).toEqual({ width, height, bitDepth: 8, colorType: 6, compression: 0, filter: 0, interlace: 0 });
    expect(chunks.every((c) => c.crcOk)).toBe(true);
    expect(chunks[chunks.length - 1].type).toBe('IEND');
    expect(chunks[chunks.length - 1].data.length).toBe(0);
  });

  it('stores exactly the given bytes (scanlines read by the test itself)', () => {
    const idat = concat(readChunks(file).filter((c) => c.type === 'IDAT').map((c) => c.data));
    expect([...unfilter(inflateSync(idat), width, height, 4)]).toEqual([...rgba]);
  });

  it('round-trips through decodePng exactly', () => {
    const decoded = decodePng(file);
    expect(decoded.width).toBe(width);
    expect(decoded.height).toBe(height);
    expect(decoded.bitDepth).toBe(8);
    expect(decoded.channelCount).toBe(4);
    expect([...decoded.channels]).toEqual([...rgba]);
  });

  it('accepts a view into a larger buffer', () => {
    const big = new Uint8Array(rgba.length + 8);
    big.set(rgba, 8);
    expect([...decodePng(encodeRgba8(width, height, big.subarray(8))).channels]).toEqual([...rgba]);
  });

  it('names the expected size when the data length is wrong', () => {
    expect(() => encodeRgba8(3, 2, new Uint8Array(23))).toThrow(/expected 24 bytes/);
    expect(() => encodeRgba8(0, 2, new Uint8Array(0))).toThrow(/positive integers/);
  });
});

describe('encodeGray16', () => {
  const width = 4;
  const height = 3;
  // Values chosen to expose byte order and truncation: 1 and 256 swap under the wrong
  // endianness, 65535 and 65534 differ only in the low byte, 4095 is a 12-bit camera maximum.
  const gray = Uint16Array.of(0, 1, 255, 256, 4095, 32768, 65534, 65535, 258, 513, 1000, 60000);
  const file = encodeGray16(width, height, gray);

  it('has an IHDR with bit depth 16 and colour type 0 (greyscale)', () => {
    const chunks = readChunks(file);
    expect(ihdrFields(chunks[0].data)).toEqual({ width, height, bitDepth: 16, colorType: 0, compression: 0, filter: 0, interlace: 0 });
    expect(chunks.every((c) => c.crcOk)).toBe(true);
  });

  it('stores the samples big-endian as section 7.1 requires', () => {
    const idat = concat(readChunks(file).filter((c) => c.type === 'IDAT').map((c) => c.data));
    const bytes = unfilter(inflateSync(idat), width, height, 2);
    const values = Array.from({ length: width * height }, (_, i) => (bytes[2 * i] << 8) | bytes[2 * i + 1]);
    expect(values).toEqual([...gray]);
  });

  it('round-trips through decodePng exactly, at 16 bits', () => {
    const decoded = decodePng(file);
    expect(decoded.bitDepth).toBe(16);
    expect(decoded.colorType).toBe(0);
    expect(decoded.channelCount).toBe(1);
    expect([...decoded.gray]).toEqual([...gray]);
    expect([...decoded.channels]).toEqual([...gray]);
  });

  it('encodes a subarray view correctly (pngjs ignores byteOffset unless we copy)', () => {
    const big = new Uint16Array(gray.length + 5).fill(7);
    big.set(gray, 5);
    expect([...decodePng(encodeGray16(width, height, big.subarray(5))).gray]).toEqual([...gray]);
  });

  it('names the expected sample count when the data length is wrong', () => {
    expect(() => encodeGray16(4, 3, new Uint16Array(11))).toThrow(/expected 12 samples/);
  });
});

describe('decodePng on files built by hand from the specification', () => {
  function buildFile(width: number, height: number, bitDepth: number, colorType: number, scanlines: Uint8Array): Uint8Array {
    const ihdr = new Uint8Array(13);
    const v = new DataView(ihdr.buffer);
    v.setUint32(0, width);
    v.setUint32(4, height);
    ihdr[8] = bitDepth;
    ihdr[9] = colorType;
    return concat([pngSignature, chunk('IHDR', ihdr), chunk('IDAT', deflateSync(scanlines)), chunk('IEND', new Uint8Array(0))]);
  }

  it('reads 16-bit grey samples (filter None and Sub rows) exactly', () => {
    // 3 x 2 pixels: row 0 unfiltered [1, 256, 65535]; row 1 with the Sub filter (type 1),
    // whose bytes are differences to the byte two to the left: values [4095, 4096, 0].
    const row1 = [0x0f, 0xff, 0x10, 0x00, 0x00, 0x00];
    const sub = row1.map((b, i) => (i >= 2 ? (b - row1[i - 2]) & 0xff : b));
    const scanlines = Uint8Array.from([0, 0x00, 0x01, 0x01, 0x00, 0xff, 0xff, 1, ...sub]);
    const decoded = decodePng(buildFile(3, 2, 16, 0, scanlines));
    expect(decoded.bitDepth).toBe(16);
    expect([...decoded.gray]).toEqual([1, 256, 65535, 4095, 4096, 0]);
  });

  it('reads 8-bit RGB as luma 0.2126 R + 0.7152 G + 0.0722 B (Rec. 709 weights) and keeps the channels', () => {
    const scanlines = Uint8Array.from([0, 255, 0, 0, 0, 255, 0, 100, 100, 100]);
    const decoded = decodePng(buildFile(3, 1, 8, 2, scanlines));
    expect(decoded.channelCount).toBe(3);
    expect([...decoded.channels]).toEqual([255, 0, 0, 0, 255, 0, 100, 100, 100]);
    expect(decoded.gray[0]).toBeCloseTo(0.2126 * 255, 10);
    expect(decoded.gray[1]).toBeCloseTo(0.7152 * 255, 10);
    expect(decoded.gray[2]).toBeCloseTo(100, 10);
  });

  it('refuses bytes without the PNG signature, saying so', () => {
    expect(() => decodePng(Uint8Array.from({ length: 40 }, (_, i) => i))).toThrow(/PNG signature/);
  });
});
