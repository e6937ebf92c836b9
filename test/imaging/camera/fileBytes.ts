// Hand-made FITS and .npy files for the reader tests, written from the format documents and
// not from the readers under test:
// - FITS: Definition of the FITS Standard 4.0 (2016): 80-character cards in 2880-byte blocks
//   (sections 3.1, 4.1), mandatory keywords in order (4.4.1.1), big-endian data (5.2).
// - .npy: NEP 1, version 1.0 header: magic, 1, 0, u16 LE length, dict literal padded with
//   spaces and ending in '\n' so that the data start on a multiple of 64 bytes.

export type FitsBitpix = 8 | 16 | 32 | -32 | -64;

export interface FitsOptions {
  bitpix: FitsBitpix;
  /** NAXIS1.. (columns, rows[, frames]). */
  axes: number[];
  /** Stored values in FITS order (NAXIS1 fastest). */
  stored: ArrayLike<number>;
  /** Extra cards after the mandatory ones: [keyword, value text]. */
  cards?: [string, string][];
  /** Leave the final data block unpadded. */
  noPadding?: boolean;
}

function card(keyword: string, value?: string): string {
  const text = value === undefined ? keyword.padEnd(80) : `${keyword.padEnd(8)}= ${value.padStart(20)}`.padEnd(80);
  if (text.length !== 80) throw new Error(`card too long: ${text}`);
  return text;
}

export function buildFits(options: FitsOptions): Uint8Array {
  const cards = [card('SIMPLE', 'T'), card('BITPIX', String(options.bitpix)), card('NAXIS', String(options.axes.length))];
  options.axes.forEach((n, i) => cards.push(card(`NAXIS${i + 1}`, String(n))));
  for (const [k, v] of options.cards ?? []) cards.push(card(k, v));
  cards.push(card('END'));
  const headerText = cards.join('');
  const headerBytes = Math.ceil(headerText.length / 2880) * 2880;
  const size = Math.abs(options.bitpix) / 8;
  const dataBytes = options.stored.length * size;
  const total = headerBytes + (options.noPadding ? dataBytes : Math.ceil(dataBytes / 2880) * 2880);
  const out = new Uint8Array(total);
  for (let i = 0; i < headerBytes; i++) out[i] = i < headerText.length ? headerText.charCodeAt(i) : 0x20;
  const view = new DataView(out.buffer, headerBytes);
  for (let i = 0; i < options.stored.length; i++) {
    const v = options.stored[i];
    switch (options.bitpix) {
      case 8: view.setUint8(i, v); break;
      case 16: view.setInt16(2 * i, v, false); break;
      case 32: view.setInt32(4 * i, v, false); break;
      case -32: view.setFloat32(4 * i, v, false); break;
      case -64: view.setFloat64(8 * i, v, false); break;
    }
  }
  return out;
}

export function buildNpy(descr: string, shape: number[], values: ArrayLike<number>, options: { fortranOrder?: boolean; headerText?: string } = {}): Uint8Array {
  const shapeText = shape.length === 1 ? `(${shape[0]},)` : `(${shape.join(', ')})`;
  let header = options.headerText ?? `{'descr': '${descr}', 'fortran_order': ${options.fortranOrder ? 'True' : 'False'}, 'shape': ${shapeText}, }`;
  const unpadded = 10 + header.length + 1;
  header += ' '.repeat((64 - (unpadded % 64)) % 64) + '\n';
  const little = descr[0] !== '>';
  const kind = descr.slice(1);
  const size = Number(kind.slice(1));
  const out = new Uint8Array(10 + header.length + values.length * size);
  out.set([0x93, 0x4e, 0x55, 0x4d, 0x50, 0x59, 1, 0], 0);
  out[8] = header.length & 0xff;
  out[9] = header.length >> 8;
  for (let i = 0; i < header.length; i++) out[10 + i] = header.charCodeAt(i);
  const view = new DataView(out.buffer, 10 + header.length);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    switch (kind) {
      case 'f8': view.setFloat64(8 * i, v, little); break;
      case 'f4': view.setFloat32(4 * i, v, little); break;
      case 'u1': view.setUint8(i, v); break;
      case 'u2': view.setUint16(2 * i, v, little); break;
      case 'i2': view.setInt16(2 * i, v, little); break;
      case 'u4': view.setUint32(4 * i, v, little); break;
      case 'i4': view.setInt32(4 * i, v, little); break;
      default: throw new Error(`buildNpy: no writer for ${descr}`);
    }
  }
  return out;
}
