// Width and height of a line of figure text, from the advance widths of the font the PNG
// renderer draws with (DejaVu Sans, table in fontMetrics.ts). The width of a string is
// the sum of its characters' advances (OpenType "hmtx"); kerning, which resvg applies,
// only narrows DejaVu Sans pairs such as "AV", so the sum is a safe upper bound for
// layout. A character without a glyph counts as a full em. Browsers showing the inline SVG
// of the report fall back to another sans-serif face if DejaVu Sans is not installed;
// DejaVu Sans is among the widest of them, so labels laid out here still fit.

import { advanceWidthBlocks, ascender, capHeight, descender, fontFamilyName, unitsPerEm } from './fontMetrics.js';

/** The font-family attribute of every figure: the shipped font first, then look-alikes. */
export const FIGURE_FONT_FAMILY = `'${fontFamilyName}', 'Bitstream Vera Sans', Verdana, sans-serif`;

const advanceByCodePoint = new Map<number, number>();
for (const [first, widths] of advanceWidthBlocks) {
  widths.forEach((w, k) => {
    if (w >= 0) advanceByCodePoint.set(first + k, w);
  });
}

/** Advance width of one code point in em (1 for a character the font lacks). */
export function advanceEm(codePoint: number): number {
  const w = advanceByCodePoint.get(codePoint);
  return w === undefined ? 1 : w / unitsPerEm;
}

/** Whether the figure font has a glyph for every character of `text`. */
export function fontCovers(text: string): boolean {
  for (const ch of text) if (!advanceByCodePoint.has(ch.codePointAt(0)!)) return false;
  return true;
}

/** Width in pixels of `text` set in the figure font at `fontPx`. */
export function textWidthPx(text: string, fontPx: number): number {
  let em = 0;
  for (const ch of text) em += advanceEm(ch.codePointAt(0)!);
  return em * fontPx;
}

/** Height above the baseline reached by the tallest glyphs (the font's ascender), pixels. */
export function ascentPx(fontPx: number): number {
  return (ascender / unitsPerEm) * fontPx;
}

/** Depth below the baseline reached by descenders (positive), pixels. */
export function descentPx(fontPx: number): number {
  return (-descender / unitsPerEm) * fontPx;
}

/** Height of the digits and capitals above the baseline, pixels: used to centre labels on ticks. */
export function capHeightPx(fontPx: number): number {
  return (capHeight / unitsPerEm) * fontPx;
}
