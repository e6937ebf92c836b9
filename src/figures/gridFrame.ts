// The frame of a figure of a 2D grid (lattice sites, camera pixels, a parameter plane):
// title, the pixel image placed as an SVG <image>, axes in the caller's units, overlay
// curves clipped to the image, a scale bar, and the room a panel (colour bar or legend)
// needs to the right of or below the image.
//
// Axis coordinates: site i sits at origin + i * step and covers [-step/2, +step/2]
// around it, so the axis runs over the extent [origin - step/2, origin + (n - 1/2) step].
// Each site becomes a square of `pixelsPerSite` pixels (an integer, so that all sites are
// the same size in the PNG); by default the smallest factor that makes the longer side at
// least `minImagePx` pixels.

import { createScale, type AxisTicks, type Scale } from './scales.js';
import { axisBandPx, axisMarkup, bottomLabelOverhang, fittingTicks } from './svgAxis.js';
import { ascentPx, capHeightPx, descentPx, textWidthPx } from './textMeasure.js';
import { FIGURE_SIZES, FIGURE_TEXT } from './figureStyle.js';
import { FIGURE_COLORS, hexColor, type Rgb8 } from './figurePalette.js';
import { fitText } from './textFit.js';
import { ID, clipRect, px, svgText } from './svgMarkup.js';
import { meanLuma, pngDataUri } from './fieldPixels.js';
import { escapeMarkup } from './escapeMarkup.js';

/** How grid cells map to the coordinate printed on one axis. */
export interface GridAxis {
  /** Axis title with its unit, e.g. 'x (sites)' or 'x (µm)'. */
  label?: string;
  /** Coordinate of the centre of cell 0 (default 0). */
  origin?: number;
  /** Coordinate units per cell, > 0 (default 1). */
  step?: number;
}

/** A curve drawn over the image, in axis coordinates (e.g. a lobe boundary). NaN breaks it. */
export interface OverlayLine {
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Default white, over a darker casing so it reads on any colour. */
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

export interface GridFigureSpec {
  nx: number;
  ny: number;
  title?: string;
  xAxis?: GridAxis;
  yAxis?: GridAxis;
  /** Integer upscaling of cells to pixels; default from `minImagePx`. */
  pixelsPerSite?: number;
  /** Smallest length of the image's longer side when `pixelsPerSite` is not given (default 420). */
  minImagePx?: number;
  /** Largest length of the image's longer side when `pixelsPerSite` is not given (wins over minImagePx; at least one pixel per cell). */
  maxImagePx?: number;
  overlays?: readonly OverlayLine[];
  scaleBar?: ScaleBar;
}

/** Room a panel needs beside (right) or below the image. */
export interface PanelSpace {
  rightWidth: number;
  /** Height of the right panel; the figure grows if it is taller than the image. */
  rightHeight: number;
  /** Height of a panel below the x-axis title. */
  bottomHeight: number;
  /** Width of a panel below the x-axis title (centred under the image). */
  bottomWidth: number;
  /** The right panel prints a note ('×10ⁿ') above its top. */
  topNote: boolean;
}

export interface Box {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface GridFrame {
  width: number;
  height: number;
  image: Box;
  pixelsPerSite: number;
  x: Scale;
  y: Scale;
  xTicks: AxisTicks;
  yTicks: AxisTicks;
  /** Left edge of the right panel. */
  panelX: number;
  /** Top of the space below the x-axis title. */
  panelBelowY: number;
  markup: string[];
}

interface AxisExtent {
  label: string;
  min: number;
  max: number;
}

function axisExtent(axis: GridAxis | undefined, cells: number, fallback: string, name: string): AxisExtent {
  const origin = axis?.origin ?? 0;
  const step = axis?.step ?? 1;
  if (!Number.isFinite(origin)) throw new Error(`${name}.origin: expected a finite number, got ${origin}`);
  if (!(step > 0) || !Number.isFinite(step)) throw new Error(`${name}.step: expected a positive number of units per cell, got ${step}`);
  return { label: axis?.label ?? fallback, min: origin - step / 2, max: origin + (cells - 0.5) * step };
}

/** The check every grid figure makes of its data. */
export function checkGrid(length: number, nx: number, ny: number, what: string): void {
  if (!Number.isInteger(nx) || !Number.isInteger(ny) || nx < 1 || ny < 1) {
    throw new Error(`${what}: grid shape must be positive integers, got nx = ${nx}, ny = ${ny}`);
  }
  if (length !== nx * ny) throw new Error(`${what}: expected nx * ny = ${nx * ny} values, got ${length}`);
}

/** The integer upscaling factor of a spec. */
export function pixelsPerSiteOf(spec: GridFigureSpec): number {
  const longer = Math.max(spec.nx, spec.ny);
  let k = spec.pixelsPerSite ?? Math.max(1, Math.ceil((spec.minImagePx ?? 420) / longer));
  if (spec.pixelsPerSite === undefined && spec.maxImagePx !== undefined) k = Math.max(1, Math.min(k, Math.floor(spec.maxImagePx / longer)));
  if (!Number.isInteger(k) || k < 1) throw new Error(`pixelsPerSite: expected an integer >= 1, got ${k}`);
  return k;
}

/**
 * Lay out the figure and draw everything but the panel: title, image (from RGBA pixels,
 * rows from the top), frame, ticks, axis titles, overlays and scale bar.
 */
export function buildGridFrame(spec: GridFigureSpec, rgba: Uint8Array, panel: PanelSpace): GridFrame {
  const { nx, ny } = spec;
  const k = pixelsPerSiteOf(spec);
  const xe = axisExtent(spec.xAxis, nx, 'x (sites)', 'xAxis');
  const ye = axisExtent(spec.yAxis, ny, 'y (sites)', 'yAxis');
  const imgW = nx * k;
  const imgH = ny * k;
  const pad = FIGURE_SIZES.paddingPx;
  const tickPx = FIGURE_TEXT.tickPx;
  const axisPx = FIGURE_TEXT.axisPx;

  // Ticks depend only on the image size; lay them out first, the margins follow from them.
  const xTicks = fittingTicks(createScale('linear', [xe.min, xe.max], [0, imgW]), 'bottom', 90);
  const yTicks = fittingTicks(createScale('linear', [ye.min, ye.max], [imgH, 0]), 'left', 75);
  const titlePx = FIGURE_TEXT.titlePx;
  const titleH = spec.title ? ascentPx(titlePx) + descentPx(titlePx) + FIGURE_SIZES.titleBelowPx : 0;
  const noteRow = yTicks.note !== '' || panel.topNote;
  const top = Math.ceil(pad + titleH + (noteRow ? ascentPx(tickPx) + descentPx(tickPx) + 4 : capHeightPx(tickPx) / 2 + 2));
  const bottomBand = axisBandPx(xTicks, 'bottom');
  const xTitleH = xe.label || xTicks.note ? FIGURE_SIZES.titleGapPx + ascentPx(axisPx) + descentPx(axisPx) : 0;
  const height = Math.ceil(top + Math.max(imgH, panel.rightHeight) + bottomBand + xTitleH + panel.bottomHeight + pad);
  // The rotated y title may run past a flat image, within the figure's height.
  const yTitle = fitText(ye.label, height - 2 * pad, axisPx);
  const yTitlePx = ye.label ? yTitle.fontPx : 0;
  const yTitleLength = ye.label ? textWidthPx(yTitle.text, yTitlePx) : 0;
  const xOverhang = bottomLabelOverhang(createScale('linear', [xe.min, xe.max], [0, imgW]), xTicks);
  const left = Math.ceil(
    Math.max(pad + (ye.label ? ascentPx(yTitlePx) + descentPx(yTitlePx) + FIGURE_SIZES.titleGapPx : 0) + axisBandPx(yTicks, 'left'), pad + xOverhang.left),
  );
  const rightNeed = Math.max(panel.rightWidth, xOverhang.right);
  let width = Math.ceil(left + imgW + rightNeed + pad);
  width = Math.max(width, Math.ceil(left + imgW / 2 + panel.bottomWidth / 2 + pad));
  const titleW = spec.title ? textWidthPx(spec.title, titlePx) : 0;
  width = Math.max(width, Math.ceil(titleW + 2 * pad));
  const xTitle = fitText(xe.label, width - 2 * pad, axisPx);

  const image: Box = { x: left, y: top, width: imgW, height: imgH };
  const x = createScale('linear', [xe.min, xe.max], [left, left + imgW]);
  const y = createScale('linear', [ye.min, ye.max], [top + imgH, top]);
  const markup: string[] = [`<defs>${clipRect('image-clip', left, top, imgW, imgH)}</defs>`];
  if (spec.title) {
    const centre = Math.min(Math.max(left + imgW / 2, pad + titleW / 2), width - pad - titleW / 2);
    markup.push(svgText(spec.title, centre, pad + ascentPx(titlePx), { sizePx: titlePx, anchor: 'middle', className: 'plot-title' }));
  }
  markup.push(
    `<image class="pixels" x="${px(left)}" y="${px(top)}" width="${px(imgW)}" height="${px(imgH)}" preserveAspectRatio="none" image-rendering="optimizeSpeed" href="${pngDataUri(nx, ny, rgba)}"/>`,
    `<rect class="axes" x="${px(left - 0.5)}" y="${px(top - 0.5)}" width="${px(imgW + 1)}" height="${px(imgH + 1)}" fill="none" stroke="${FIGURE_COLORS.ink}" stroke-width="1"/>`,
    ...axisMarkup({ scale: x, ticks: xTicks, side: 'bottom', edgePx: top + imgH + 0.5, name: 'x' }),
    ...axisMarkup({ scale: y, ticks: yTicks, side: 'left', edgePx: left - 0.5, name: 'y' }),
  );
  const xTitleBaseline = top + imgH + bottomBand + FIGURE_SIZES.titleGapPx + ascentPx(axisPx);
  const xTitleCentre = Math.min(Math.max(left + imgW / 2, pad + textWidthPx(xTitle.text, xTitle.fontPx) / 2), width - pad - textWidthPx(xTitle.text, xTitle.fontPx) / 2);
  if (xe.label) markup.push(svgText(xTitle.text, xTitleCentre, xTitleBaseline, { sizePx: xTitle.fontPx, anchor: 'middle', className: 'axis-label' }));
  if (xTicks.note) markup.push(svgText(xTicks.note, left + imgW, xTitleBaseline, { sizePx: tickPx, anchor: 'end', color: FIGURE_COLORS.mutedInk, className: 'axis-note' }));
  const yTitleCentre = Math.min(Math.max(top + imgH / 2, pad + yTitleLength / 2), height - pad - yTitleLength / 2);
  if (ye.label) markup.push(svgText(yTitle.text, pad + ascentPx(yTitlePx), yTitleCentre, { sizePx: yTitlePx, anchor: 'middle', rotateDeg: -90, className: 'axis-label' }));
  if (yTicks.note) markup.push(svgText(yTicks.note, left, top - descentPx(tickPx) - 3, { sizePx: tickPx, anchor: 'end', color: FIGURE_COLORS.mutedInk, className: 'axis-note' }));
  markup.push(...overlayMarkup(spec.overlays ?? [], x, y));
  if (spec.scaleBar) markup.push(...scaleBarMarkup(spec.scaleBar, image, xe, rgba, nx, ny));
  return {
    width,
    height,
    image,
    pixelsPerSite: k,
    x,
    y,
    xTicks,
    yTicks,
    panelX: left + imgW + 1,
    panelBelowY: top + imgH + bottomBand + xTitleH,
    markup,
  };
}

function overlayMarkup(overlays: readonly OverlayLine[], x: Scale, y: Scale): string[] {
  if (overlays.length === 0) return [];
  const out: string[] = [`<g class="overlays" clip-path="url(#${ID}-image-clip)" fill="none" stroke-linejoin="round" stroke-linecap="round">`];
  overlays.forEach((line, i) => {
    if (line.x.length !== line.y.length) throw new Error(`overlays[${i}]: x has ${line.x.length} points but y has ${line.y.length}`);
    let d = '';
    let penDown = false;
    for (let j = 0; j < line.x.length; j++) {
      const sx = x.map(line.x[j]!);
      const sy = y.map(line.y[j]!);
      if (!Number.isFinite(sx) || !Number.isFinite(sy)) {
        penDown = false;
        continue;
      }
      d += `${penDown ? 'L' : 'M'}${px(sx)} ${px(sy)}`;
      penDown = true;
    }
    if (d === '') return;
    const w = line.widthPx ?? 2;
    const dash = line.dashPx && line.dashPx.length > 0 ? ` stroke-dasharray="${line.dashPx.join(' ')}"` : '';
    if (line.casing ?? true) out.push(`<path class="overlay-casing" d="${d}" stroke="#14141c" stroke-opacity="0.55" stroke-width="${px(w + 2)}"${dash}/>`);
    out.push(`<path class="overlay" d="${d}" stroke="${hexColor(line.color ?? [255, 255, 255])}" stroke-width="${px(w)}"${dash}/>`);
  });
  out.push('</g>');
  return out;
}

function scaleBarMarkup(bar: ScaleBar, image: Box, xe: AxisExtent, rgba: Uint8Array, nx: number, ny: number): string[] {
  if (!(bar.length > 0)) throw new Error(`scaleBar.length: expected a positive length in x-axis units, got ${bar.length}`);
  const span = xe.max - xe.min;
  const lengthPx = (bar.length / span) * image.width;
  if (lengthPx > image.width - 24) {
    throw new Error(`scaleBar.length: ${bar.length} is too long for an image ${span} units wide; choose a shorter bar`);
  }
  const fontPx = FIGURE_TEXT.tickPx;
  const margin = 12;
  const thickness = 4;
  // An image too flat for the bar and its label (a chain seen from above) goes without:
  // its axis ticks already carry the length scale.
  if (image.height < 2 * margin + thickness + 4 + ascentPx(fontPx)) return [];
  const x0 = bar.corner === 'bottom-left' ? image.x + margin : image.x + image.width - margin - lengthPx;
  const y0 = image.y + image.height - margin - thickness;
  const labelW = textWidthPx(bar.label, fontPx);
  const labelBase = y0 - 4;
  // Light or dark marks, from the mean lightness of the image under the bar and its label.
  const toCol = (sx: number): number => ((sx - image.x) / image.width) * nx;
  const toRow = (sy: number): number => ((sy - image.y) / image.height) * ny;
  const cx = x0 + lengthPx / 2;
  const luma = meanLuma(
    rgba,
    nx,
    ny,
    toCol(Math.min(x0, cx - labelW / 2)),
    toRow(labelBase - ascentPx(fontPx)),
    toCol(Math.max(x0 + lengthPx, cx + labelW / 2)),
    toRow(y0 + thickness),
  );
  const fg = luma < 140 ? '#ffffff' : '#101014';
  const bg = luma < 140 ? '#101014' : '#ffffff';
  return [
    `<g class="scale-bar" data-length="${escapeMarkup(String(bar.length))}">`,
    `<rect x="${px(x0 - 1)}" y="${px(y0 - 1)}" width="${px(lengthPx + 2)}" height="${thickness + 2}" fill="${bg}"/>`,
    `<rect x="${px(x0)}" y="${px(y0)}" width="${px(lengthPx)}" height="${thickness}" fill="${fg}"/>`,
    svgText(bar.label, cx, labelBase, {
      sizePx: fontPx,
      anchor: 'middle',
      color: fg,
      attributes: `stroke="${bg}" stroke-width="3" stroke-linejoin="round" paint-order="stroke"`,
    }),
    '</g>',
  ];
}
