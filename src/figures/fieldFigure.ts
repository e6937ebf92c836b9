// Figures of 2D site fields: a colour-mapped image of the lattice with axes, a colour bar
// (or, for phase maps, a legend), optional overlay curves and a scale bar.
//
// Data layout: a flat array of nx * ny values in C order with the first axis x, i.e.
// value(x, y) = field[x * ny + y] (the project's grid convention). The image shows x to
// the right and y upwards, so site (x, y) lands in image row ny - 1 - y. Each site becomes
// a square of `pixelsPerSite` pixels (nearest-neighbour upscaling keeps sites sharp);
// by default the factor is the smallest integer that makes the longer side at least
// `minImagePx` pixels. Axis coordinates: site i sits at origin + i * step (in the units
// of the axis label, e.g. sites or micrometres), and covers [-step/2, +step/2] around it.
// Ticks use Heckbert's nice numbers (niceTicks.ts). Missing values (NaN, +-Infinity) are
// drawn in a neutral grey. The renderer is pure: it returns RGBA pixels and layout boxes.

import {
  drawFrame,
  drawTicks,
  strokePx,
  lineHeightPx,
  maxLabelWidthPx,
  resolveStyle,
  thinTicks,
  tickBandPx,
  type AxisTick,
  type FigureStyle,
} from './axes.js';
import { measureText } from './bitmapFont.js';
import { buildColorTable, colorMapNames, isDivergingColorMap, missingValueRgb, type ColorMapName } from './colorMaps.js';
import { formatTicks, niceTicks } from './niceTicks.js';
import { isPhaseCode, mottShadeCount, phaseColor, phaseLabel, PhaseCode } from './phasePalette.js';
import { Raster, type PixelBox, type Rgb8, type RgbaImage } from './raster.js';

/** How lattice sites map to the coordinate printed on one axis. */
export interface GridAxis {
  /** Axis title with its unit, e.g. 'x (sites)' or 'x (µm)'. */
  label?: string;
  /** Coordinate of the centre of site 0 (default 0). */
  origin?: number;
  /** Coordinate units per site, > 0 (default 1). */
  step?: number;
}

/** A curve drawn over the image, in axis coordinates (e.g. a Mott shell boundary). */
export interface OverlayLine {
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Default white, drawn over a darker casing so it reads on any colour. */
  color?: Rgb8;
  widthPx?: number;
  dashPx?: readonly number[];
  /** Draw a translucent dark casing under the line (default true). */
  casing?: boolean;
}

/** A length marker inside the image, e.g. { length: 10, label: '10 µm' } on a µm axis. */
export interface ScaleBar {
  /** Length in x-axis units. */
  length: number;
  label: string;
  corner?: 'bottom-right' | 'bottom-left';
}

export interface GridFigureOptions {
  title?: string;
  xAxis?: GridAxis;
  yAxis?: GridAxis;
  /** Integer upscaling of sites to pixels; default from `minImagePx`. */
  pixelsPerSite?: number;
  /** Smallest length of the image's longer side when `pixelsPerSite` is not given (default 420). */
  minImagePx?: number;
  overlays?: readonly OverlayLine[];
  scaleBar?: ScaleBar;
  style?: Partial<FigureStyle>;
}

export interface FieldFigureOptions extends GridFigureOptions {
  /** Colour map name (default 'ember'; see colorMapNames). */
  colorMap?: string;
  /** Fixed value range of the colour scale; values outside are drawn at the ends. */
  valueRange?: { min: number; max: number };
  /** Automatic range symmetric about zero (default: true for diverging maps). */
  symmetricRange?: boolean;
  /** Title of the colour bar, with unit. */
  colorBarLabel?: string;
}

export interface PhaseMapOptions extends GridFigureOptions {
  /** Title above the legend (default 'phase'). */
  legendTitle?: string;
}

export interface GridFigureLayout {
  /** Where the lattice image sits in the figure. */
  imageBox: PixelBox;
  pixelsPerSite: number;
  /** The colour bar (field figures only). */
  colorBarBox: PixelBox | null;
  /** The legend (phase maps only). */
  legendBox: PixelBox | null;
  /** Value range of the colour scale (field figures only). */
  valueMin: number;
  valueMax: number;
}

/** An RGBA figure ready for encoding, with the boxes of its parts. */
export interface RenderedFigure extends RgbaImage {
  layout: GridFigureLayout;
}

const colorBarGapPx = 18;
const colorBarWidthPx = 16;
const minColorBarPx = 160;
const legendGapPx = 18;

interface AxisSetup {
  label: string;
  origin: number;
  step: number;
  extentMin: number;
  extentMax: number;
}

function axisSetup(axis: GridAxis | undefined, sites: number, fallbackLabel: string, name: string): AxisSetup {
  const origin = axis?.origin ?? 0;
  const step = axis?.step ?? 1;
  if (!Number.isFinite(origin)) throw new Error(`${name}.origin: expected a finite number, got ${origin}`);
  if (!(step > 0) || !Number.isFinite(step)) throw new Error(`${name}.step: expected a positive number of units per site, got ${step}`);
  return {
    label: axis?.label ?? fallbackLabel,
    origin,
    step,
    extentMin: origin - step / 2,
    extentMax: origin + (sites - 0.5) * step,
  };
}

function checkGrid(length: number, nx: number, ny: number, what: string): void {
  if (!Number.isInteger(nx) || !Number.isInteger(ny) || nx < 1 || ny < 1) {
    throw new Error(`${what}: lattice shape must be positive integers, got nx = ${nx}, ny = ${ny}`);
  }
  if (length !== nx * ny) throw new Error(`${what}: expected nx * ny = ${nx * ny} values, got ${length}`);
}

interface AxisTicksResult {
  ticks: AxisTick[];
  multiplier: string;
}

function gridAxisTicks(
  axis: AxisSetup,
  startPx: number,
  lengthPx: number,
  upward: boolean,
  pxPerTick: number,
  style: FigureStyle,
): AxisTicksResult {
  const set = niceTicks(axis.extentMin, axis.extentMax, Math.max(2, Math.round(lengthPx / pxPerTick)));
  const { labels, multiplierLabel } = formatTicks(set);
  const span = axis.extentMax - axis.extentMin;
  const ticks = set.values.map((v, i) => {
    const f = (v - axis.extentMin) / span;
    // Ticks at the far edge would sit on the frame line just outside the image; keep them inside.
    const px = upward ? startPx + lengthPx - f * lengthPx : startPx + f * lengthPx;
    return { px: Math.min(startPx + lengthPx - 1, Math.max(startPx, px)), label: labels[i] };
  });
  return { ticks: thinTicks(ticks, upward ? 'left' : 'bottom', style), multiplier: multiplierLabel };
}

interface FrameGeometry {
  raster: Raster;
  style: FigureStyle;
  image: PixelBox;
  k: number;
  xAxis: AxisSetup;
  yAxis: AxisSetup;
  /** Left edge of the right panel. */
  panelX: number;
  /** Top of the space below the x-axis title. */
  panelBelowY: number;
}

/** Room that the colour bar or legend needs beside (right) or below the image. */
interface PanelSpace {
  rightWidth: number;
  /** Height of the right panel; the figure grows if it is taller than the image. */
  rightHeight: number;
  /** Height of a panel below the x-axis title (a horizontal colour bar). */
  bottomHeight: number;
  /** Whether the right panel prints a note ('×10ⁿ') above its top. */
  topNote: boolean;
}

/**
 * Lay out and draw everything but the image content and the panels (colour bar or
 * legend): title, frame, ticks, axis titles.
 */
function drawGridFrame(
  nx: number,
  ny: number,
  options: GridFigureOptions,
  panel: PanelSpace,
): FrameGeometry {
  const style = resolveStyle(options.style);
  const xAxis = axisSetup(options.xAxis, nx, 'x (sites)', 'xAxis');
  const yAxis = axisSetup(options.yAxis, ny, 'y (sites)', 'yAxis');
  const minImagePx = options.minImagePx ?? 420;
  const k = options.pixelsPerSite ?? Math.max(1, Math.ceil(minImagePx / Math.max(nx, ny)));
  if (!Number.isInteger(k) || k < 1) throw new Error(`pixelsPerSite: expected an integer >= 1, got ${k}`);
  const imgW = nx * k;
  const imgH = ny * k;
  const lineH = lineHeightPx(style);
  const titleH = options.title ? lineHeightPx(style, style.titleScale) : 0;

  // Ticks depend only on the image size, so they can be laid out before the margins. Both
  // axes ask for one tick per ~75 px, so a square lattice gets the same spacing on both.
  const xt = gridAxisTicks(xAxis, 0, imgW, false, 75, style);
  const yt = gridAxisTicks(yAxis, 0, imgH, true, 75, style);
  const leftBand = tickBandPx(yt.ticks.map((t) => t.label), 'left', style);
  const bottomBand = tickBandPx([], 'bottom', style);
  const hasNoteRow = yt.multiplier !== '' || panel.topNote;

  const pad = style.paddingPx;
  const left = pad + (yAxis.label ? lineH + style.labelGapPx * 2 : 0) + leftBand + 1;
  const top = pad + (titleH > 0 ? titleH + 10 : 0) + (hasNoteRow ? lineH + 4 : Math.ceil(lineH / 2));
  const panelW = panel.rightWidth;
  let width = left + imgW + strokePx(style) + panelW + pad;
  const axisTitleH = xAxis.label || xt.multiplier ? style.labelGapPx * 2 + lineH : 0;
  const bottomH = 1 + bottomBand + axisTitleH + panel.bottomHeight + pad;
  const height = top + Math.max(imgH, panel.rightHeight) + bottomH;
  const titleW = options.title ? measureText(options.title, style.titleScale).widthPx : 0;
  width = Math.max(width, titleW + 2 * pad);

  const raster = new Raster(width, height, style.background);
  const image: PixelBox = { x: left, y: top, width: imgW, height: imgH };

  if (options.title) {
    const centre = Math.min(Math.max(left + imgW / 2, pad + titleW / 2), width - pad - titleW / 2);
    raster.text(options.title, Math.round(centre), pad, { color: style.ink, scale: style.titleScale, anchor: 'middle', baseline: 'top' });
  }
  drawFrame(raster, image.x, image.y, imgW, imgH, style);
  const shift = (ticks: AxisTick[], by: number): AxisTick[] => ticks.map((t) => ({ px: t.px + by, label: t.label }));
  drawTicks(raster, 'bottom', image.y + imgH, shift(xt.ticks, image.x), [], style);
  drawTicks(raster, 'left', image.x, shift(yt.ticks, image.y), [], style);

  const text = { color: style.ink, scale: style.textScale };
  const xLabelY = image.y + imgH + 1 + bottomBand + style.labelGapPx * 2;
  if (xAxis.label) raster.text(xAxis.label, image.x + imgW / 2, xLabelY, { ...text, anchor: 'middle', baseline: 'top' });
  if (xt.multiplier) {
    raster.text(xt.multiplier, image.x + imgW, xLabelY, { ...text, color: style.mutedInk, anchor: 'end', baseline: 'top' });
  }
  if (yAxis.label) {
    raster.text(yAxis.label, pad, image.y + imgH / 2, { ...text, rotation: 90, anchor: 'middle', baseline: 'top' });
  }
  if (yt.multiplier) {
    raster.text(yt.multiplier, image.x - 1, image.y - 5, { ...text, color: style.mutedInk, anchor: 'end', baseline: 'bottom' });
  }
  return {
    raster,
    style,
    image,
    k,
    xAxis,
    yAxis,
    panelX: image.x + imgW + strokePx(style),
    panelBelowY: image.y + imgH + 1 + bottomBand + axisTitleH,
  };
}

function drawOverlaysAndScaleBar(g: FrameGeometry, options: GridFigureOptions): void {
  const { raster, image, xAxis, yAxis } = g;
  const toPx = (v: number): number => image.x + ((v - xAxis.extentMin) / (xAxis.extentMax - xAxis.extentMin)) * image.width;
  const toPy = (v: number): number =>
    image.y + image.height - ((v - yAxis.extentMin) / (yAxis.extentMax - yAxis.extentMin)) * image.height;
  raster.setClip(image.x, image.y, image.width, image.height);
  for (const [i, line] of (options.overlays ?? []).entries()) {
    if (line.x.length !== line.y.length) {
      throw new Error(`overlays[${i}]: x has ${line.x.length} points but y has ${line.y.length}`);
    }
    const xs = Float64Array.from(line.x, toPx);
    const ys = Float64Array.from(line.y, toPy);
    const widthPx = line.widthPx ?? 2;
    if (line.casing ?? true) raster.polyline(xs, ys, { color: [20, 20, 28], widthPx: widthPx + 2, alpha: 0.55, dashPx: line.dashPx });
    raster.polyline(xs, ys, { color: line.color ?? [255, 255, 255], widthPx, dashPx: line.dashPx });
  }
  raster.resetClip();

  const bar = options.scaleBar;
  if (bar) {
    if (!(bar.length > 0)) throw new Error(`scaleBar.length: expected a positive length in x-axis units, got ${bar.length}`);
    const lengthPx = Math.round((bar.length / (xAxis.extentMax - xAxis.extentMin)) * image.width);
    if (lengthPx > image.width - 24) {
      throw new Error(`scaleBar.length: ${bar.length} is too long for an image ${xAxis.extentMax - xAxis.extentMin} units wide; choose a shorter bar`);
    }
    const margin = 12;
    const thickness = 4;
    const x0 = bar.corner === 'bottom-left' ? image.x + margin : image.x + image.width - margin - lengthPx;
    const y0 = image.y + image.height - margin - thickness;
    const labelH = lineHeightPx(g.style);
    // Pick light or dark marks from the mean lightness of what lies under the bar and label.
    const sample = meanLuma(raster, x0, y0 - labelH - 4, lengthPx, labelH + 4 + thickness);
    const fg: Rgb8 = sample < 140 ? [255, 255, 255] : [16, 16, 20];
    const bg: Rgb8 = sample < 140 ? [16, 16, 20] : [255, 255, 255];
    raster.setClip(image.x, image.y, image.width, image.height);
    raster.fillRect(x0 - 1, y0 - 1, lengthPx + 2, thickness + 2, bg);
    raster.fillRect(x0, y0, lengthPx, thickness, fg);
    raster.text(bar.label, x0 + lengthPx / 2, y0 - 4, { color: fg, halo: bg, scale: g.style.textScale, anchor: 'middle', baseline: 'alphabetic' });
    raster.resetClip();
  }
}

function meanLuma(r: Raster, x: number, y: number, w: number, h: number): number {
  let sum = 0;
  let count = 0;
  for (let j = Math.max(0, y); j < Math.min(r.height, y + h); j++) {
    for (let i = Math.max(0, x); i < Math.min(r.width, x + w); i++) {
      const p = (j * r.width + i) * 4;
      sum += 0.2126 * r.data[p] + 0.7152 * r.data[p + 1] + 0.0722 * r.data[p + 2];
      count++;
    }
  }
  return count > 0 ? sum / count : 255;
}

function autoRange(field: Float64Array, symmetric: boolean): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < field.length; i++) {
    const v = field[i];
    if (v < min) min = v;
    if (v > max) max = v;
  }
  if (!Number.isFinite(min) || !Number.isFinite(max)) {
    // No finite values at all (NaN compares false above; infinities are missing too).
    let lo = Infinity;
    let hi = -Infinity;
    for (let i = 0; i < field.length; i++) {
      const v = field[i];
      if (Number.isFinite(v)) {
        lo = Math.min(lo, v);
        hi = Math.max(hi, v);
      }
    }
    if (!Number.isFinite(lo)) return { min: 0, max: 1 };
    min = lo;
    max = hi;
  }
  if (symmetric) {
    const m = Math.max(Math.abs(min), Math.abs(max));
    return m > 0 ? { min: -m, max: m } : { min: -1, max: 1 };
  }
  if (min === max) {
    const pad = min === 0 ? 1 : Math.abs(min) * 0.05;
    return { min: min - pad, max: max + pad };
  }
  return { min, max };
}

function colorOfRow(table: Uint8Array, f: number): Rgb8 {
  const t = Math.round(f * 255);
  return [table[3 * t], table[3 * t + 1], table[3 * t + 2]];
}

/** Vertical colour bar right of the image: row j shows the value at its centre, top = max. */
function drawVerticalColorBar(
  g: FrameGeometry,
  table: Uint8Array,
  range: { min: number; max: number },
  values: readonly number[],
  labels: readonly string[],
  multiplier: string,
  lengthPx: number,
  title: string,
): PixelBox {
  const { raster, style, image } = g;
  const cb: PixelBox = { x: g.panelX + colorBarGapPx, y: image.y, width: colorBarWidthPx * style.textScale, height: lengthPx };
  for (let j = 0; j < cb.height; j++) raster.fillRect(cb.x, cb.y + j, cb.width, 1, colorOfRow(table, 1 - (j + 0.5) / cb.height));
  drawFrame(raster, cb.x, cb.y, cb.width, cb.height, style);
  const span = range.max - range.min;
  const ticks = values.map((v, i) => ({
    px: Math.min(cb.y + cb.height - 1, Math.max(cb.y, cb.y + (1 - (v - range.min) / span) * cb.height)),
    label: labels[i],
  }));
  drawTicks(raster, 'right', cb.x + cb.width, thinTicks(ticks, 'left', style), [], style);
  const text = { color: style.ink, scale: style.textScale };
  if (multiplier) raster.text(multiplier, cb.x, cb.y - 5, { ...text, color: style.mutedInk, anchor: 'start', baseline: 'bottom' });
  if (title) {
    const x = cb.x + cb.width + tickBandPx(labels, 'right', style) + style.labelGapPx * 3;
    raster.text(title, x, cb.y + cb.height / 2, { ...text, rotation: 90, anchor: 'middle', baseline: 'top' });
  }
  return cb;
}

/** Horizontal colour bar centred below the x-axis title: column i shows the value at its centre, right = max. */
function drawHorizontalColorBar(
  g: FrameGeometry,
  table: Uint8Array,
  range: { min: number; max: number },
  values: readonly number[],
  labels: readonly string[],
  multiplier: string,
  lengthPx: number,
  title: string,
): PixelBox {
  const { raster, style, image } = g;
  const cb: PixelBox = {
    x: Math.round(image.x + (image.width - lengthPx) / 2),
    y: g.panelBelowY + style.labelGapPx * 4,
    width: lengthPx,
    height: colorBarWidthPx * style.textScale,
  };
  for (let i = 0; i < cb.width; i++) raster.fillRect(cb.x + i, cb.y, 1, cb.height, colorOfRow(table, (i + 0.5) / cb.width));
  drawFrame(raster, cb.x, cb.y, cb.width, cb.height, style);
  const span = range.max - range.min;
  const ticks = values.map((v, i) => ({
    px: Math.min(cb.x + cb.width - 1, Math.max(cb.x, cb.x + ((v - range.min) / span) * cb.width)),
    label: labels[i],
  }));
  drawTicks(raster, 'bottom', cb.y + cb.height, thinTicks(ticks, 'bottom', style), [], style);
  const text = { color: style.ink, scale: style.textScale };
  const y = cb.y + cb.height + tickBandPx([], 'bottom', style) + style.labelGapPx * 2;
  if (title) raster.text(title, cb.x + cb.width / 2, y, { ...text, anchor: 'middle', baseline: 'top' });
  if (multiplier) raster.text(multiplier, cb.x + cb.width, y, { ...text, color: style.mutedInk, anchor: 'end', baseline: 'top' });
  return cb;
}

/** Render a scalar field on an nx x ny lattice with a colour bar. */
export function renderFieldFigure(field: Float64Array, nx: number, ny: number, options: FieldFigureOptions = {}): RenderedFigure {
  checkGrid(field.length, nx, ny, 'field figure');
  const mapName = options.colorMap ?? 'ember';
  if (!colorMapNames.includes(mapName as ColorMapName)) {
    throw new Error(`colorMap: '${mapName}' is unknown; choose one of: ${colorMapNames.join(', ')}`);
  }
  const table = buildColorTable(mapName);
  let range: { min: number; max: number };
  if (options.valueRange) {
    const { min, max } = options.valueRange;
    if (!Number.isFinite(min) || !Number.isFinite(max) || !(max > min)) {
      throw new Error(`valueRange: expected finite min < max, got [${min}, ${max}]`);
    }
    range = { min, max };
  } else {
    range = autoRange(field, options.symmetricRange ?? isDivergingColorMap(mapName as ColorMapName));
  }

  // Colour-bar ticks are fixed before layout: their labels set the panel size. A flat
  // image (a strip of a few sites) gets a horizontal bar below it instead of a stubby one.
  const cbLabel = options.colorBarLabel ?? '';
  const k0 = options.pixelsPerSite ?? Math.max(1, Math.ceil((options.minImagePx ?? 420) / Math.max(nx, ny)));
  const horizontal = ny * k0 < minColorBarPx && nx * k0 >= 2 * minColorBarPx;
  const cbLength = horizontal ? Math.min(nx * k0, 360) : Math.max(ny * k0, minColorBarPx);
  const cbSet = niceTicks(range.min, range.max, Math.max(2, Math.round(cbLength / (horizontal ? 80 : 60))));
  const cbLabels = formatTicks(cbSet);
  const style0 = resolveStyle(options.style);
  const cbThickness = colorBarWidthPx * style0.textScale;
  const hasLabelRow = cbLabel !== '' || (horizontal && cbLabels.multiplierLabel !== '');
  const labelRow = (style: FigureStyle): number => (hasLabelRow ? style.labelGapPx * 3 + lineHeightPx(style) : 0);
  const panel: PanelSpace = horizontal
    ? {
        rightWidth: 0,
        rightHeight: 0,
        bottomHeight: style0.labelGapPx * 4 + cbThickness + tickBandPx([], 'bottom', style0) + labelRow(style0),
        topNote: false,
      }
    : {
        rightWidth: colorBarGapPx + cbThickness + tickBandPx(cbLabels.labels, 'right', style0) + labelRow(style0),
        rightHeight: cbLength,
        bottomHeight: 0,
        topNote: cbLabels.multiplierLabel !== '',
      };
  const g = drawGridFrame(nx, ny, options, panel);
  const { raster, image, k } = g;

  // The lattice image: one pixel per site, then upscaled.
  const small = new Raster(nx, ny);
  const span = range.max - range.min;
  const missing: Rgb8 = [Math.round(255 * missingValueRgb[0]), Math.round(255 * missingValueRgb[1]), Math.round(255 * missingValueRgb[2])];
  for (let x = 0; x < nx; x++) {
    for (let y = 0; y < ny; y++) {
      const v = field[x * ny + y];
      const p = ((ny - 1 - y) * nx + x) * 4;
      if (Number.isFinite(v)) {
        let t = Math.round(((v - range.min) / span) * 255);
        t = t < 0 ? 0 : t > 255 ? 255 : t;
        small.data[p] = table[3 * t];
        small.data[p + 1] = table[3 * t + 1];
        small.data[p + 2] = table[3 * t + 2];
      } else {
        small.data[p] = missing[0];
        small.data[p + 1] = missing[1];
        small.data[p + 2] = missing[2];
      }
    }
  }
  raster.blitScaled(small, image.x, image.y, k);
  drawOverlaysAndScaleBar(g, options);

  const cb = horizontal
    ? drawHorizontalColorBar(g, table, range, cbSet.values, cbLabels.labels, cbLabels.multiplierLabel, cbLength, cbLabel)
    : drawVerticalColorBar(g, table, range, cbSet.values, cbLabels.labels, cbLabels.multiplierLabel, cbLength, cbLabel);

  return {
    width: raster.width,
    height: raster.height,
    data: raster.data,
    layout: { imageBox: image, pixelsPerSite: k, colorBarBox: cb, legendBox: null, valueMin: range.min, valueMax: range.max },
  };
}

interface LegendEntry {
  color: Rgb8;
  label: string;
}

/**
 * Render a phase map: `phase` holds a PhaseCode per site, `filling` the Mott filling
 * (read only at Mott sites). A legend lists the phases present.
 */
export function renderPhaseMapFigure(
  phase: ArrayLike<number>,
  filling: ArrayLike<number>,
  nx: number,
  ny: number,
  options: PhaseMapOptions = {},
): RenderedFigure {
  checkGrid(phase.length, nx, ny, 'phase map');
  if (filling.length !== phase.length) {
    throw new Error(`phase map: filling has ${filling.length} values but phase has ${phase.length}; pass one filling per site`);
  }
  const small = new Raster(nx, ny);
  // Which legend entries occur: one flag per phase code, Mott shells by (capped) filling.
  const seenPhase = new Uint8Array(5);
  const seenFilling = new Uint8Array(mottShadeCount + 1);
  for (let x = 0; x < nx; x++) {
    for (let y = 0; y < ny; y++) {
      const i = x * ny + y;
      const code = phase[i];
      if (!isPhaseCode(code)) throw new Error(`phase map: site (x = ${x}, y = ${y}) has unknown phase code ${code}; expected 0..4`);
      let n = 0;
      if (code === PhaseCode.mott) {
        n = filling[i];
        if (!Number.isInteger(n) || n < 1) {
          throw new Error(`phase map: Mott site (x = ${x}, y = ${y}) has filling ${n}; expected an integer >= 1`);
        }
        n = Math.min(n, mottShadeCount);
      }
      const color = phaseColor(code, n);
      const p = ((ny - 1 - y) * nx + x) * 4;
      small.data[p] = color[0];
      small.data[p + 1] = color[1];
      small.data[p + 2] = color[2];
      if (code === PhaseCode.mott) seenFilling[n] = 1;
      else seenPhase[code] = 1;
    }
  }
  // Legend order: superfluid, Mott shells by filling, Bose glass, normal fluid, vacuum.
  const entries: LegendEntry[] = [];
  const addEntry = (code: PhaseCode, n: number): void => {
    entries.push({ color: phaseColor(code, n), label: phaseLabel(code, n) });
  };
  if (seenPhase[PhaseCode.superfluid]) addEntry(PhaseCode.superfluid, 0);
  for (let n = 1; n <= mottShadeCount; n++) if (seenFilling[n]) addEntry(PhaseCode.mott, n);
  for (const code of [PhaseCode.boseGlass, PhaseCode.normalFluid, PhaseCode.empty]) if (seenPhase[code]) addEntry(code, 0);
  const legendTitle = options.legendTitle ?? 'phase';

  const style0 = resolveStyle(options.style);
  const lineH = lineHeightPx(style0);
  const swatch = lineH;
  const rowPitch = lineH + 6;
  const legendH = (legendTitle ? rowPitch + 2 : 0) + entries.length * rowPitch;
  const labelsW = maxLabelWidthPx(entries.map((e) => e.label), style0.textScale);
  const panelWidth = legendGapPx + Math.max(swatch + 6 + labelsW, maxLabelWidthPx([legendTitle], style0.textScale));
  const g = drawGridFrame(nx, ny, options, { rightWidth: panelWidth, rightHeight: legendH, bottomHeight: 0, topNote: false });
  const { raster, style, image, k } = g;
  raster.blitScaled(small, image.x, image.y, k);
  drawOverlaysAndScaleBar(g, options);

  const lx = g.panelX + legendGapPx;
  let ly = image.y;
  const text = { color: style.ink, scale: style.textScale };
  if (legendTitle) {
    raster.text(legendTitle, lx, ly, { ...text, baseline: 'top' });
    ly += rowPitch + 2;
  }
  for (const e of entries) {
    raster.fillRect(lx, ly, swatch, swatch, e.color);
    raster.strokeRect(lx, ly, swatch, swatch, [120, 120, 128]);
    raster.text(e.label, lx + swatch + 6, ly + swatch / 2, { ...text, baseline: 'middle' });
    ly += rowPitch;
  }
  const legendBox: PixelBox = { x: lx, y: image.y, width: raster.width - style.paddingPx - lx, height: ly - image.y };
  return {
    width: raster.width,
    height: raster.height,
    data: raster.data,
    layout: { imageBox: image, pixelsPerSite: k, colorBarBox: null, legendBox, valueMin: Number.NaN, valueMax: Number.NaN },
  };
}
