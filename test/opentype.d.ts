// The few parts of opentype.js (a devDependency without bundled types) that the font test
// and scripts/font-metrics.mjs read.
declare module 'opentype.js' {
  interface Glyph {
    advanceWidth: number;
    getBoundingBox(): { x1: number; y1: number; x2: number; y2: number };
  }
  interface Font {
    unitsPerEm: number;
    ascender: number;
    descender: number;
    tables: { cmap: { glyphIndexMap: Record<number, number | undefined> } };
    glyphs: { get(index: number): Glyph };
    charToGlyph(ch: string): Glyph;
  }
  const opentype: { parse(buffer: ArrayBuffer): Font };
  export default opentype;
}
