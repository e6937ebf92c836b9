// The pixels of a heat map: one RGBA pixel per lattice site (or camera pixel), coloured
// through a colour map, embedded in the SVG as a PNG data URI (RFC 2397) that the
// renderer upscales without smoothing. Big lattices stay cheap: the SVG carries nx * ny
// pixels, never one element per site.
//
// Layout: value(x, y) = field[x * ny + y] (the project's grid convention); the image shows
// x to the right and y upwards, so site (x, y) is image row ny - 1 - y.
// Colour lookup uses a 4096-entry table: with 256 entries a faint smooth background that
// spans a few per cent of the scale (the diffuse part of a time-of-flight picture under a
// bright central peak) falls into 2-6 table entries and shows false contour rings where
// the entry changes; 4096 entries keep the steps below one 8-bit level of the map.

import { encodeRgba8 } from '../formats/pngCodec.js';
import { buildColorTable, missingValueRgb } from './colorMaps.js';
import type { Rgb8 } from './figurePalette.js';

export const COLOR_TABLE_ENTRIES = 4096;

// Tables are pure functions of the map name; build each once per process.
const tables = new Map<string, Uint8Array>();
function colorTable(mapName: string): Uint8Array {
  let t = tables.get(mapName);
  if (!t) {
    t = buildColorTable(mapName, COLOR_TABLE_ENTRIES);
    tables.set(mapName, t);
  }
  return t;
}

export type ColorScaleKind = 'linear' | 'log';

export interface ColorScale {
  kind: ColorScaleKind;
  min: number;
  max: number;
}

/** Position in [0, 1] of `value` on the colour scale (clamped; NaN for a missing value). */
export function colorFraction(value: number, scale: ColorScale): number {
  if (!Number.isFinite(value)) return Number.NaN;
  let t: number;
  if (scale.kind === 'log') {
    if (!(value > 0)) return 0;
    t = Math.log(value / scale.min) / Math.log(scale.max / scale.min);
  } else {
    t = (value - scale.min) / (scale.max - scale.min);
  }
  return t < 0 ? 0 : t > 1 ? 1 : t;
}

const missing: Rgb8 = [Math.round(255 * missingValueRgb[0]), Math.round(255 * missingValueRgb[1]), Math.round(255 * missingValueRgb[2])];

/** RGBA pixels (rows from the top) of an nx x ny field through colour map `mapName`. */
export function fieldRgba(field: ArrayLike<number>, nx: number, ny: number, mapName: string, scale: ColorScale): Uint8Array {
  const table = colorTable(mapName);
  const top = COLOR_TABLE_ENTRIES - 1;
  const rgba = new Uint8Array(nx * ny * 4);
  for (let x = 0; x < nx; x++) {
    for (let y = 0; y < ny; y++) {
      const t = colorFraction(field[x * ny + y]!, scale);
      const p = ((ny - 1 - y) * nx + x) * 4;
      if (Number.isNaN(t)) {
        rgba[p] = missing[0];
        rgba[p + 1] = missing[1];
        rgba[p + 2] = missing[2];
      } else {
        const k = 3 * Math.round(t * top);
        rgba[p] = table[k]!;
        rgba[p + 1] = table[k + 1]!;
        rgba[p + 2] = table[k + 2]!;
      }
      rgba[p + 3] = 255;
    }
  }
  return rgba;
}

/** A colour bar strip: `length` pixels of the map from its top end (first pixel) to its bottom end. */
export function colorStripRgba(mapName: string, length: number, horizontal: boolean): { width: number; height: number; rgba: Uint8Array } {
  const table = colorTable(mapName);
  const top = COLOR_TABLE_ENTRIES - 1;
  const rgba = new Uint8Array(length * 4);
  for (let j = 0; j < length; j++) {
    // Vertical bars run from the high end at the top; horizontal ones from low on the left.
    const t = length === 1 ? 1 : horizontal ? j / (length - 1) : 1 - j / (length - 1);
    const k = 3 * Math.round(t * top);
    rgba.set([table[k]!, table[k + 1]!, table[k + 2]!, 255], 4 * j);
  }
  return horizontal ? { width: length, height: 1, rgba } : { width: 1, height: length, rgba };
}

/** RGBA pixels of an nx x ny grid with one given colour per site. */
export function siteColorsRgba(nx: number, ny: number, colorOf: (x: number, y: number) => Rgb8): Uint8Array {
  const rgba = new Uint8Array(nx * ny * 4);
  for (let x = 0; x < nx; x++) {
    for (let y = 0; y < ny; y++) {
      const c = colorOf(x, y);
      rgba.set([c[0], c[1], c[2], 255], ((ny - 1 - y) * nx + x) * 4);
    }
  }
  return rgba;
}

/** Mean Rec. 709 luma (0..255) of the image pixels in columns [x0, x1) and rows [y0, y1). */
export function meanLuma(rgba: Uint8Array, width: number, height: number, x0: number, y0: number, x1: number, y1: number): number {
  let sum = 0;
  let count = 0;
  for (let j = Math.max(0, Math.floor(y0)); j < Math.min(height, Math.ceil(y1)); j++) {
    for (let i = Math.max(0, Math.floor(x0)); i < Math.min(width, Math.ceil(x1)); i++) {
      const p = (j * width + i) * 4;
      sum += 0.2126 * rgba[p]! + 0.7152 * rgba[p + 1]! + 0.0722 * rgba[p + 2]!;
      count++;
    }
  }
  return count > 0 ? sum / count : 255;
}

/** The pixels as a PNG data URI. */
export function pngDataUri(width: number, height: number, rgba: Uint8Array): string {
  const png = encodeRgba8(width, height, rgba);
  return `data:image/png;base64,${Buffer.from(png.buffer, png.byteOffset, png.byteLength).toString('base64')}`;
}
