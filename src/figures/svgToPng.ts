// The one place where a figure becomes pixels: an SVG string rendered to PNG bytes by
// resvg (@resvg/resvg-js, a Rust SVG renderer with a prebuilt native binary), with the
// figure font shipped by the npm package dejavu-fonts-ttf and no system fonts, so that a
// PNG looks the same on every machine and its labels are the type the layout measured.
// resvg reads the font file itself; this module only resolves its path.

import { createRequire } from 'node:module';
import { Resvg } from '@resvg/resvg-js';
import { fontFamilyName } from './fontMetrics.js';

const fontFile = createRequire(import.meta.url).resolve('dejavu-fonts-ttf/ttf/DejaVuSans.ttf');

export interface PngOptions {
  /** Output pixels per SVG pixel (default 1); 2 gives a sharper picture for print or slides. */
  scale?: number;
}

/** Render an SVG document to PNG file bytes. */
export function svgToPng(svg: string, options: PngOptions = {}): Uint8Array {
  const scale = options.scale ?? 1;
  if (!(scale > 0) || scale > 8 || !Number.isFinite(scale)) throw new RangeError(`scale: expected a number in (0, 8], got ${scale}`);
  const renderer = new Resvg(svg, {
    font: { fontFiles: [fontFile], loadSystemFonts: false, defaultFontFamily: fontFamilyName },
    fitTo: scale === 1 ? { mode: 'original' } : { mode: 'zoom', value: scale },
    background: '#ffffff',
  });
  return renderer.render().asPng();
}

/** Path of the figure font file (for tests that measure rendered text). */
export function figureFontFile(): string {
  return fontFile;
}
