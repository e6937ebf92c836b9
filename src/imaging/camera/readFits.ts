// FITS primary images (Definition of the Flexible Image Transport System, version 4.0,
// IAU FITS Working Group 2016; https://fits.gsfc.nasa.gov/fits_standard.html), written
// here because the npm registry has no maintained FITS reader (fitsjs 0.6.6 is browser-
// oriented and unmaintained; fits-reader-js 1.0.0 is a single unreviewed release).
//
// What is read, strictly:
// - The header: 2880-byte blocks of 36 cards of 80 ASCII characters (section 3.1, 4.1);
//   the first cards must be SIMPLE = T, BITPIX, NAXIS, NAXIS1..NAXISn in this order
//   (section 4.4.1.1); the header ends at the END card. Values: logical T/F, integers,
//   reals (also with D exponents), quoted strings with '' for a quote (section 4.2).
// - The primary data array: BITPIX 8 (unsigned), 16, 32, 64 (two's complement), -32, -64
//   (IEEE), big-endian (section 5.2), physical value = BZERO + BSCALE * stored (section
//   4.4.2.5; BZERO = 32768 is the usual way to store unsigned 16-bit counts); an integer
//   equal to BLANK becomes NaN.
// - NAXIS1 varies fastest (section 5.1): NAXIS1 = columns (x), NAXIS2 = rows (y), NAXIS3 =
//   frames. Row j of the stored array is our row y = j, the way numpy-based readers index
//   it (data[j, i]). Note that FITS viewers conventionally draw stored row 0 at the bottom,
//   so they show the frame upside down relative to this convention: flip it if needed.
// Extensions (XTENSION HDUs) are not read: a file whose primary HDU has NAXIS = 0 is refused
// with a message saying so.

import { FrameReadError } from './frameReadError.js';
import type { FrameStack, MetadataValue } from './frameStack.js';

const blockBytes = 2880;
const cardBytes = 80;

type CardValue = string | number | boolean;

interface Card {
  keyword: string;
  value?: CardValue;
}

function parseValue(text: string, keyword: string, name: string): CardValue | undefined {
  const t = text.trimStart();
  if (t.length === 0 || t[0] === '/') return undefined; // undefined value
  if (t[0] === "'") {
    let out = '';
    let i = 1;
    for (;;) {
      if (i >= t.length) throw new FrameReadError(name, 'damaged', `header card ${keyword}: the string value has no closing quote`);
      if (t[i] === "'") {
        if (t[i + 1] === "'") {
          out += "'";
          i += 2;
          continue;
        }
        break;
      }
      out += t[i++];
    }
    return out.replace(/ +$/, ''); // trailing blanks are not significant (section 4.2.1.1)
  }
  const token = t.split('/')[0].trim();
  if (token === 'T') return true;
  if (token === 'F') return false;
  if (/^[+-]?\d+$/.test(token)) return Number(token);
  if (/^[+-]?(\d+\.?\d*|\.\d+)([EeDd][+-]?\d+)?$/.test(token)) return Number(token.replace(/[Dd]/, 'E'));
  // Complex values "(re, im)" and anything else: keep the text.
  return token;
}

function parseCard(card: string, name: string): Card {
  const keyword = card.slice(0, 8).trimEnd();
  if (card.slice(8, 10) === '= ' && keyword !== 'COMMENT' && keyword !== 'HISTORY' && keyword !== '') {
    const value = parseValue(card.slice(10), keyword, name);
    return value === undefined ? { keyword } : { keyword, value };
  }
  return { keyword };
}

function requireInteger(cards: Card[], index: number, keyword: string, name: string): number {
  const card = cards[index];
  if (card === undefined || card.keyword !== keyword) {
    throw new FrameReadError(name, 'damaged', `header card ${index + 1} must be ${keyword} (FITS 4.0 section 4.4.1.1), found ${card ? `'${card.keyword}'` : 'the end of the header'}`);
  }
  if (typeof card.value !== 'number' || !Number.isInteger(card.value)) {
    throw new FrameReadError(name, 'damaged', `${keyword} must be an integer, got ${String(card.value)}`);
  }
  return card.value;
}

/** Read the primary image of a FITS file (its bytes). Metadata: every valued header card (keyword -> value), plus `blankPixels`. */
export function readFitsFrames(bytes: Uint8Array, name: string): FrameStack {
  if (bytes.length < blockBytes) {
    throw new FrameReadError(name, bytes.length >= 9 && new TextDecoder('latin1').decode(bytes.subarray(0, 9)) === 'SIMPLE  =' ? 'truncated' : 'unknown-format',
      `only ${bytes.length} bytes; a FITS file starts with a 2880-byte header block`);
  }
  const text = new TextDecoder('latin1');
  const cards: Card[] = [];
  let headerEnd = -1;
  for (let offset = 0; offset + cardBytes <= bytes.length; offset += cardBytes) {
    const raw = text.decode(bytes.subarray(offset, offset + cardBytes));
    for (let i = 0; i < raw.length; i++) {
      const c = raw.charCodeAt(i);
      if (c < 0x20 || c > 0x7e) {
        if (offset >= blockBytes) {
          throw new FrameReadError(name, 'damaged', `the FITS header has no END card before binary data (card ${offset / cardBytes + 1})`);
        }
        throw new FrameReadError(name, offset === 0 ? 'unknown-format' : 'damaged', `header card ${offset / cardBytes + 1} holds a non-ASCII byte (FITS headers are printable ASCII)`);
      }
    }
    const card = parseCard(raw, name);
    if (cards.length === 0 && !(card.keyword === 'SIMPLE' && card.value === true)) {
      throw new FrameReadError(name, 'unknown-format', "is not a FITS file (its first card is not SIMPLE = T)");
    }
    if (card.keyword === 'END') {
      headerEnd = Math.ceil((offset + cardBytes) / blockBytes) * blockBytes;
      break;
    }
    cards.push(card);
  }
  if (headerEnd < 0) throw new FrameReadError(name, 'truncated', 'the FITS header has no END card (the file is cut short or is not FITS)');
  const bitpix = requireInteger(cards, 1, 'BITPIX', name);
  const naxis = requireInteger(cards, 2, 'NAXIS', name);
  if (![8, 16, 32, 64, -32, -64].includes(bitpix)) throw new FrameReadError(name, 'damaged', `BITPIX = ${bitpix} is not one of 8, 16, 32, 64, -32, -64`);
  if (naxis === 0) {
    throw new FrameReadError(name, 'unsupported', 'the primary HDU holds no data (NAXIS = 0); images in FITS extensions are not read: save the frame in the primary HDU');
  }
  if (naxis < 0 || naxis > 999) throw new FrameReadError(name, 'damaged', `NAXIS = ${naxis} is outside 0..999`);
  const axes: number[] = [];
  for (let k = 1; k <= naxis; k++) {
    const n = requireInteger(cards, 2 + k, `NAXIS${k}`, name);
    if (n < 0) throw new FrameReadError(name, 'damaged', `NAXIS${k} = ${n} is negative`);
    axes.push(n);
  }
  const extra = axes.slice(3).filter((n) => n !== 1);
  if (naxis < 2 || extra.length > 0) {
    throw new FrameReadError(name, 'not-an-image', `the primary array has shape NAXISn = (${axes.join(', ')}); expected a 2D frame (NAXIS1 = columns, NAXIS2 = rows) or a 3D stack (NAXIS3 = frames)`);
  }
  const width = axes[0];
  const height = axes[1];
  const frameCount = axes[2] ?? 1;
  if (width < 1 || height < 1 || frameCount < 1) throw new FrameReadError(name, 'not-an-image', `the primary array is empty (NAXISn = ${axes.join(', ')})`);
  const metadata: Record<string, MetadataValue> = {};
  for (const card of cards) if (card.value !== undefined && !(card.keyword in metadata)) metadata[card.keyword] = card.value;
  const numberCard = (key: string, fallback: number): number => {
    const v = metadata[key];
    if (v === undefined) return fallback;
    if (typeof v !== 'number' || !Number.isFinite(v)) throw new FrameReadError(name, 'damaged', `${key} must be a number, got ${String(v)}`);
    return v;
  };
  const bzero = numberCard('BZERO', 0);
  const bscale = numberCard('BSCALE', 1);
  const blankValue = bitpix > 0 && metadata.BLANK !== undefined ? numberCard('BLANK', 0) : undefined;
  const bytesPerSample = Math.abs(bitpix) / 8;
  const perFrame = width * height;
  const needed = perFrame * frameCount * bytesPerSample;
  if (headerEnd + needed > bytes.length) {
    throw new FrameReadError(name, 'truncated', `the data array needs ${needed} bytes after the ${headerEnd}-byte header but the file has only ${bytes.length - headerEnd}`);
  }
  const view = new DataView(bytes.buffer, bytes.byteOffset + headerEnd, needed);
  const frames: Float64Array[] = [];
  let blankPixels = 0;
  for (let f = 0; f < frameCount; f++) {
    const out = new Float64Array(perFrame);
    const base = f * perFrame;
    for (let i = 0; i < perFrame; i++) {
      const p = (base + i) * bytesPerSample;
      let stored: number;
      switch (bitpix) {
        case 8: stored = view.getUint8(p); break;
        case 16: stored = view.getInt16(p, false); break;
        case 32: stored = view.getInt32(p, false); break;
        case 64: stored = Number(view.getBigInt64(p, false)); break;
        case -32: stored = view.getFloat32(p, false); break;
        default: stored = view.getFloat64(p, false); break;
      }
      if (blankValue !== undefined && stored === blankValue) {
        out[i] = NaN;
        blankPixels++;
      } else {
        out[i] = bzero + bscale * stored;
      }
    }
    frames.push(out);
  }
  metadata.blankPixels = blankPixels;
  const storedType = { 8: 'uint8', 16: 'int16', 32: 'int32', 64: 'int64', [-32]: 'float32', [-64]: 'float64' }[bitpix]!;
  const sampleType = bitpix === 16 && bzero === 32768 && bscale === 1 ? 'uint16' : storedType;
  return { frames, width, height, sourceFormat: 'fits', sampleType, source: name, metadata };
}
