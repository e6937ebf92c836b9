// Greyscale PNG frames (W3C PNG 2nd edition) through pngjs, via the project's decoder
// (src/imaging/pngCodec.ts): 8- or 16-bit grey (colour types 0 and 4; alpha ignored), grey
// levels taken as counts. Rows are stored from the top (PNG section 4.1.1), so stored row r
// is our row y = r and column c is x = c: the frame reads the way a viewer shows it, and
// tiercake's own 16-bit pictures (pictureFiles.ts, the same layout) read back unchanged.

import { decodePng, pngSignature } from '../../formats/pngCodec.js';
import { FrameReadError } from './frameReadError.js';
import type { FrameStack } from './frameStack.js';

/** Read one greyscale PNG into a one-frame stack. Metadata: bitDepth, colorType. */
export function readPngFrame(bytes: Uint8Array, name: string): FrameStack {
  if (bytes.length < 8 || pngSignature.some((b, i) => bytes[i] !== b)) {
    throw new FrameReadError(name, 'unknown-format', 'is not a PNG file (the 8-byte PNG signature is missing)');
  }
  let png;
  try {
    png = decodePng(bytes);
  } catch {
    throw new FrameReadError(name, 'damaged', 'the PNG file is damaged or cut short (its image data cannot be decoded)');
  }
  if (png.channelCount !== 1 && png.channelCount !== 2) {
    throw new FrameReadError(name, 'unsupported', `is a colour PNG (colour type ${png.colorType}); a camera frame must be greyscale: export it as 16-bit greyscale PNG`);
  }
  const frame = Float64Array.from(png.gray);
  return {
    frames: [frame],
    width: png.width,
    height: png.height,
    sourceFormat: 'png',
    sampleType: png.bitDepth === 16 ? 'uint16' : 'uint8',
    source: name,
    metadata: { bitDepth: png.bitDepth, colorType: png.colorType },
  };
}
