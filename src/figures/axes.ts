// Shared look and axis drawing of tiercake's figures: a plot frame, outward tick marks
// with labels, and axis titles. Line widths and tick lengths grow with the text scale. Positions are in raster pixels; the figure modules
// convert data values to pixels and hand over {px, label} pairs, so this file knows
// nothing about data or scales.

import { measureText } from './bitmapFont.js';
import type { Raster, Rgb8 } from './raster.js';

export interface FigureStyle {
  /** Integer scale of tick labels, axis titles and legends. */
  textScale: number;
  /** Integer scale of the figure title. */
  titleScale: number;
  /** Text, frame and tick colour. */
  ink: Rgb8;
  /** Colour of secondary text (the multiplier '×10ⁿ', notes). */
  mutedInk: Rgb8;
  /** Colour of grid lines inside a plot. */
  gridColor: Rgb8;
  background: Rgb8;
  /** Empty border around the whole figure. */
  paddingPx: number;
  majorTickPx: number;
  minorTickPx: number;
  /** Gap between a tick mark and its label, and between labels and an axis title. */
  labelGapPx: number;
}

export const defaultFigureStyle: FigureStyle = {
  textScale: 1,
  titleScale: 2,
  ink: [34, 34, 40],
  mutedInk: [96, 96, 104],
  gridColor: [226, 226, 230],
  background: [255, 255, 255],
  paddingPx: 14,
  majorTickPx: 5,
  minorTickPx: 3,
  labelGapPx: 4,
};

/** Merge caller overrides into the default style, checking the integer text scales. */
export function resolveStyle(overrides: Partial<FigureStyle> | undefined): FigureStyle {
  const style = { ...defaultFigureStyle, ...overrides };
  for (const key of ['textScale', 'titleScale'] as const) {
    if (!Number.isInteger(style[key]) || style[key] < 1) {
      throw new Error(`figure style ${key}: expected an integer >= 1, got ${style[key]}`);
    }
  }
  return style;
}

export interface AxisTick {
  /** Pixel coordinate along the axis (x for a horizontal axis, y for a vertical one). */
  px: number;
  label: string;
}

export type AxisSide = 'bottom' | 'left' | 'right';

/** Height of one line of text at the style's text scale. */
export function lineHeightPx(style: FigureStyle, scale = style.textScale): number {
  return measureText('', scale).heightPx;
}

/** Widest label in pixels. */
export function maxLabelWidthPx(labels: readonly string[], scale: number): number {
  return labels.reduce((w, s) => Math.max(w, measureText(s, scale).widthPx), 0);
}

/** Width of frame lines and tick marks: it grows with the text scale, so large-text figures stay balanced. */
export function strokePx(style: FigureStyle): number {
  return style.textScale;
}

/**
 * Thickness of the band that ticks and labels need outside the frame on one side: frame,
 * tick, gap and label (its height below a horizontal axis, its width beside a vertical one).
 */
export function tickBandPx(labels: readonly string[], side: AxisSide, style: FigureStyle): number {
  const labelSize = side === 'bottom' ? lineHeightPx(style) : maxLabelWidthPx(labels, style.textScale);
  const t = strokePx(style);
  return t + (style.majorTickPx + style.labelGapPx) * t + labelSize;
}

/**
 * Draw the frame just outside the plot rectangle [x, x + width) x [y, y + height).
 */
export function drawFrame(r: Raster, x: number, y: number, width: number, height: number, style: FigureStyle): void {
  const t = strokePx(style);
  r.strokeRect(x - t, y - t, width + 2 * t, height + 2 * t, style.ink, t);
}

/**
 * Outward ticks and labels on one side of a plot rectangle. `edgePx` is the plot's
 * edge on that side: its bottom (y + height) for 'bottom', its left x for 'left', and
 * its right (x + width) for 'right'. Ticks start one pixel out, past the frame.
 */
export function drawTicks(
  r: Raster,
  side: AxisSide,
  edgePx: number,
  ticks: readonly AxisTick[],
  minorPx: readonly number[],
  style: FigureStyle,
): void {
  const t = strokePx(style);
  const major = style.majorTickPx * t;
  const minor = style.minorTickPx * t;
  const gap = style.labelGapPx * t;
  // A tick of width t is centred on its pixel (for even t, on the pixel's upper/left edge).
  const at = (px: number): number => Math.floor(px) - ((t - 1) >> 1);
  const text = { color: style.ink, scale: style.textScale };
  if (side === 'bottom') {
    const y0 = edgePx + t;
    for (const px of minorPx) r.fillRect(at(px), y0, t, minor, style.ink);
    for (const tick of ticks) {
      r.fillRect(at(tick.px), y0, t, major, style.ink);
      r.text(tick.label, Math.floor(tick.px) + 0.5, y0 + major + gap, { ...text, anchor: 'middle', baseline: 'top' });
    }
  } else if (side === 'left') {
    const x0 = edgePx - t;
    for (const py of minorPx) r.fillRect(x0 - minor, at(py), minor, t, style.ink);
    for (const tick of ticks) {
      r.fillRect(x0 - major, at(tick.px), major, t, style.ink);
      r.text(tick.label, x0 - major - gap, Math.floor(tick.px) + 0.5, { ...text, anchor: 'end', baseline: 'middle' });
    }
  } else {
    const x0 = edgePx + t;
    for (const py of minorPx) r.fillRect(x0, at(py), minor, t, style.ink);
    for (const tick of ticks) {
      r.fillRect(x0, at(tick.px), major, t, style.ink);
      r.text(tick.label, x0 + major + gap, Math.floor(tick.px) + 0.5, { ...text, anchor: 'start', baseline: 'middle' });
    }
  }
}

/** Keep ticks whose labels would not overlap their left/lower neighbour (drops every other one if needed). */
export function thinTicks(ticks: readonly AxisTick[], side: AxisSide, style: FigureStyle): AxisTick[] {
  const size = (t: AxisTick): number =>
    side === 'bottom' ? measureText(t.label, style.textScale).widthPx : lineHeightPx(style);
  for (let every = 1; every <= ticks.length; every++) {
    const kept = ticks.filter((_, i) => i % every === 0);
    let ok = true;
    for (let i = 1; i < kept.length && ok; i++) {
      const gap = Math.abs(kept[i].px - kept[i - 1].px);
      ok = gap >= (size(kept[i]) + size(kept[i - 1])) / 2 + 6;
    }
    if (ok) return kept;
  }
  return ticks.slice(0, 1);
}
