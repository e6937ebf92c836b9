// tiercake's bitmap font: metrics and pixel layout of a line of text.
//
// The glyphs are drawn by hand in bitmapFontGlyphs.ts on a 12-row cell (cap height 9
// rows, x-height 6, descender 3), with proportional widths and one blank column between
// glyphs. Text is scaled by an integer factor: every glyph pixel becomes a square of
// `scale` x `scale` output pixels, which keeps the strokes crisp in a PNG. Covers printable
// ASCII (32..126) and the symbols physics labels need: micro sign, superscript digits and
// minus (for powers of ten), degree, plus-minus, times, minus sign, <=, >=, ~=, Angstrom,
// Delta, epsilon, kappa, lambda, pi, rho, sigma, phi, omega, h-bar, right arrow, middle dot. Anything else is drawn as an
// empty box so that a missing glyph is visible rather than silently dropped.

import { glyphAliases, glyphSource } from './bitmapFontGlyphs.js';

/** Rows of one glyph cell; rows 0..8 stand above the baseline, 9..11 below it. */
export const fontCellRows = 12;
/** Rows above the baseline (the cap height). */
export const fontAscentRows = 9;
/** Rows below the baseline. */
export const fontDescentRows = 3;
/** Blank columns between neighbouring glyphs. */
export const fontGlyphGap = 1;

export interface Glyph {
  /** Width in font pixels. */
  width: number;
  /** Row-major on/off pixels, fontCellRows rows of `width` entries. */
  bits: Uint8Array;
}

export interface TextMetrics {
  /** Width of the inked line of text in output pixels. */
  widthPx: number;
  /** Height of the full cell (ascent + descent) in output pixels. */
  heightPx: number;
  /** Distance from the top of the cell to the baseline in output pixels. */
  ascentPx: number;
  /** Distance from the baseline to the bottom of the cell in output pixels. */
  descentPx: number;
}

function parseGlyphs(source: string): Map<number, Glyph> {
  const glyphs = new Map<number, Glyph>();
  let name: string | null = null;
  let rows: string[] = [];
  const flush = (): void => {
    if (name === null) return;
    const char = name === 'space' ? ' ' : name;
    const width = rows[0]?.length ?? 0;
    if (width === 0 || rows.length > fontCellRows || rows.some((r) => r.length !== width)) {
      throw new Error(`bitmap font: glyph '${char}' has ragged or too many rows`);
    }
    const bits = new Uint8Array(width * fontCellRows);
    rows.forEach((row, y) => {
      for (let x = 0; x < width; x++) bits[y * width + x] = row[x] === '#' ? 1 : 0;
    });
    glyphs.set(char.codePointAt(0)!, { width, bits });
  };
  for (const line of source.split('\n')) {
    if (line.startsWith('= ')) {
      flush();
      name = line.slice(2);
      rows = [];
    } else if (line.length > 0) {
      if (!/^[.#]+$/.test(line)) throw new Error(`bitmap font: bad glyph row '${line}' in '${name}'`);
      rows.push(line);
    }
  }
  flush();
  return glyphs;
}

const glyphs = parseGlyphs(glyphSource);
const replacementGlyph = glyphs.get(0xfffd)!;

/** The glyph drawn for a character (a box for characters the font lacks). */
export function glyphFor(char: string): Glyph {
  const key = glyphAliases[char] ?? char;
  return glyphs.get(key.codePointAt(0)!) ?? replacementGlyph;
}

/** Whether the font has a glyph of its own for `char` (or an alias of one). */
export function fontHasGlyph(char: string): boolean {
  const key = glyphAliases[char] ?? char;
  return glyphs.has(key.codePointAt(0)!);
}

function checkScale(scale: number): void {
  if (!Number.isInteger(scale) || scale < 1) throw new Error(`text scale: expected an integer >= 1, got ${scale}`);
}

/** Size of a line of text drawn at an integer `scale`. */
export function measureText(text: string, scale = 1): TextMetrics {
  checkScale(scale);
  let width = 0;
  let count = 0;
  for (const char of text) {
    width += glyphFor(char).width;
    count++;
  }
  if (count > 1) width += fontGlyphGap * (count - 1);
  return {
    widthPx: width * scale,
    heightPx: fontCellRows * scale,
    ascentPx: fontAscentRows * scale,
    descentPx: fontDescentRows * scale,
  };
}

/**
 * Call `visit(x, y)` for every inked font pixel of `text`, in font-pixel units with the
 * origin at the top-left of the first glyph cell (x grows along the text, y downwards).
 * The caller scales and rotates; this keeps the layout in one place.
 */
export function forEachInkedPixel(text: string, visit: (x: number, y: number) => void): void {
  let penX = 0;
  for (const char of text) {
    const glyph = glyphFor(char);
    const { width, bits } = glyph;
    for (let y = 0; y < fontCellRows; y++) {
      for (let x = 0; x < width; x++) if (bits[y * width + x] === 1) visit(penX + x, y);
    }
    penX += width + fontGlyphGap;
  }
}
