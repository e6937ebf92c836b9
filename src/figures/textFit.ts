// Fitting a line of text into the room the layout has for it: first set it smaller, down
// to a size still readable on screen (9 px), then shorten it with an ellipsis. A label is
// never allowed to run out of its figure.

import { textWidthPx } from './textMeasure.js';

export const MIN_FONT_PX = 9;

export interface FittedText {
  text: string;
  fontPx: number;
}

/** `text` at the preferred size, or smaller, or shortened, so that it is at most `availablePx` wide. */
export function fitText(text: string, availablePx: number, preferredPx: number): FittedText {
  const w = textWidthPx(text, preferredPx);
  if (w <= availablePx || w === 0) return { text, fontPx: preferredPx };
  const fontPx = Math.max(MIN_FONT_PX, Math.floor(((preferredPx * availablePx) / w) * 10) / 10);
  if (textWidthPx(text, fontPx) <= availablePx) return { text, fontPx };
  const chars = [...text];
  while (chars.length > 1 && textWidthPx(`${chars.join('').trimEnd()}\u2026`, fontPx) > availablePx) chars.pop();
  return { text: `${chars.join('').trimEnd()}\u2026`, fontPx };
}
