// Baseline TIFF files built byte by byte for the reader tests (TIFF Revision 6.0, Adobe 1992:
// section 2 "TIFF Structure" for the header and IFDs, section 8 for BitsPerSample /
// StripOffsets, and section 19 for SampleFormat, tag 339). Uncompressed, one strip per page,
// greyscale (PhotometricInterpretation 1 = BlackIsZero). Independent of the reader under
// test, so a round trip checks utif2 and our interpretation of its output together.

export type TiffSampleType = 'uint8' | 'uint16' | 'int16' | 'uint32' | 'float32' | 'float64';

export interface TiffPage {
  width: number;
  height: number;
  /** Pixel values, row y from the top: values[y * width + x]. */
  values: ArrayLike<number>;
  description?: string;
}

const sampleInfo: Record<TiffSampleType, { bits: number; format: number }> = {
  uint8: { bits: 8, format: 1 },
  uint16: { bits: 16, format: 1 },
  int16: { bits: 16, format: 2 },
  uint32: { bits: 32, format: 1 },
  float32: { bits: 32, format: 3 },
  float64: { bits: 64, format: 3 },
};

/** A multi-page TIFF with the given sample type and byte order. */
export function buildTiff(pages: readonly TiffPage[], sampleType: TiffSampleType, bigEndian = false): Uint8Array {
  const { bits, format } = sampleInfo[sampleType];
  const bytesPerSample = bits / 8;
  const little = !bigEndian;
  // Layout: header (8) | per page: pixel data, description text, IFD.
  const chunks: { offset: number; bytes: Uint8Array }[] = [];
  let cursor = 8;
  const ifdOffsets: number[] = [];
  const pageParts = pages.map((page) => {
    const data = new Uint8Array(page.width * page.height * bytesPerSample);
    const view = new DataView(data.buffer);
    for (let i = 0; i < page.width * page.height; i++) {
      const v = page.values[i];
      const p = i * bytesPerSample;
      switch (sampleType) {
        case 'uint8': view.setUint8(p, v); break;
        case 'uint16': view.setUint16(p, v, little); break;
        case 'int16': view.setInt16(p, v, little); break;
        case 'uint32': view.setUint32(p, v, little); break;
        case 'float32': view.setFloat32(p, v, little); break;
        case 'float64': view.setFloat64(p, v, little); break;
      }
    }
    const dataOffset = cursor;
    chunks.push({ offset: dataOffset, bytes: data });
    cursor += data.length + (data.length % 2);
    let descOffset = 0;
    let descLength = 0;
    if (page.description !== undefined) {
      const text = new TextEncoder().encode(page.description + '\0');
      descOffset = cursor;
      descLength = text.length;
      chunks.push({ offset: descOffset, bytes: text });
      cursor += text.length + (text.length % 2);
    }
    return { page, dataOffset, dataLength: data.length, descOffset, descLength };
  });
  const ifdBlocks: { offset: number; entries: [number, number, number, number][] }[] = [];
  for (const part of pageParts) {
    // [tag, type, count, value] ; type 3 SHORT, 4 LONG, 2 ASCII
    const entries: [number, number, number, number][] = [
      [256, 4, 1, part.page.width],
      [257, 4, 1, part.page.height],
      [258, 3, 1, bits],
      [259, 3, 1, 1],
      [262, 3, 1, 1],
    ];
    if (part.page.description !== undefined) entries.push([270, 2, part.descLength, part.descOffset]);
    entries.push([273, 4, 1, part.dataOffset], [277, 3, 1, 1], [278, 4, 1, part.page.height], [279, 4, 1, part.dataLength], [339, 3, 1, format]);
    ifdOffsets.push(cursor);
    ifdBlocks.push({ offset: cursor, entries });
    cursor += 2 + entries.length * 12 + 4;
  }
  const out = new Uint8Array(cursor);
  const view = new DataView(out.buffer);
  out[0] = out[1] = bigEndian ? 0x4d : 0x49;
  view.setUint16(2, 42, little);
  view.setUint32(4, ifdOffsets[0], little);
  for (const c of chunks) out.set(c.bytes, c.offset);
  ifdBlocks.forEach((block, k) => {
    let p = block.offset;
    view.setUint16(p, block.entries.length, little);
    p += 2;
    for (const [tag, type, count, value] of block.entries) {
      view.setUint16(p, tag, little);
      view.setUint16(p + 2, type, little);
      view.setUint32(p + 4, count, little);
      if (type === 3 && count === 1) view.setUint16(p + 8, value, little);
      else view.setUint32(p + 8, value, little);
      p += 12;
    }
    view.setUint32(p, k + 1 < ifdOffsets.length ? ifdOffsets[k + 1] : 0, little);
  });
  return out;
}
