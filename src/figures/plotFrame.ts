// The frame of an x-y figure: title, legend rows above the plot, the plot area, the two
// axes with ticks, labels, titles and their "×10ⁿ" notes, and grid lines. Margins are
// computed from the measured widths of the labels (textMeasure.ts), so nothing is cut at
// the edge of the figure; text that cannot fit its side at the preferred size is set
// smaller (down to 8 px) rather than clipped.

import { createScale, niceDomain, type AxisTicks, type Scale, type ScaleKind } from './scales.js';
import { axisBandPx, axisMarkup, bottomLabelOverhang, fittingTicks } from './svgAxis.js';
import { ascentPx, capHeightPx, descentPx, textWidthPx } from './textMeasure.js';
import { FIGURE_SIZES, FIGURE_TEXT } from './figureStyle.js';
import { FIGURE_COLORS } from './figurePalette.js';
import { ID, clipRect, px, svgText } from './svgMarkup.js';
import { axisTitle, type AxisSpec } from './plotSpec.js';
import { fitText, type FittedText } from './textFit.js';

export interface LegendEntry {
  label: string;
  color: string;
  /** Dash pattern, null for solid, 'none' for no line. */
  dash: string | null | 'none';
  marker: 'none' | 'circle' | 'square';
  swatch: 'line' | 'box';
}

export interface DataRange {
  min: number;
  max: number;
}

export interface FrameInput {
  width: number;
  height: number;
  /** Title and axes of the figure (a LinePlotSpec or HistogramSpec). */
  spec: { title?: string; xAxis: AxisSpec; yAxis: AxisSpec };
  /** What the axes must show (null: no finite data). */
  xData: DataRange | null;
  yData: DataRange | null;
  legend: LegendEntry[];
}

export interface Frame {
  left: number;
  right: number;
  top: number;
  bottom: number;
  x: Scale;
  y: Scale;
  xTicks: AxisTicks;
  yTicks: AxisTicks;
  /** Drawn beneath the data: plot background, grid, clip path. */
  under: string[];
  /** Drawn above the data: frame, ticks, labels, titles, legend. */
  over: string[];
}

const LEGEND_ROW_PX = 18;

function axisDomain(spec: AxisSpec, data: DataRange | null, count: number, name: string, nice: boolean): [number, number] {
  const kind: ScaleKind = spec.log === true ? 'log' : 'linear';
  for (const [key, value] of [['min', spec.min], ['max', spec.max]] as const) {
    if (value === undefined) continue;
    if (!Number.isFinite(value) || (kind === 'log' && value <= 0)) {
      throw new RangeError(`${name}.${key}: expected a finite${kind === 'log' ? ' positive' : ''} number, got ${value}`);
    }
  }
  let low = spec.min ?? data?.min ?? (kind === 'log' ? 1 : 0);
  let high = spec.max ?? data?.max ?? (kind === 'log' ? 10 : 1);
  if (spec.min !== undefined && spec.max === undefined && high <= low) high = kind === 'log' ? low * 10 : low + 1;
  if (spec.max !== undefined && spec.min === undefined && low >= high) low = kind === 'log' ? high / 10 : high - 1;
  if (low > high || (spec.min !== undefined && spec.max !== undefined && low === high)) {
    throw new RangeError(`${name}: min (${low}) must be below max (${high})`);
  }
  if (!nice) {
    // The data range itself (an x axis: no empty stretch before the first point).
    return niceDomain(kind, low, high, count, { min: true, max: true }, name);
  }
  return niceDomain(kind, low, high, count, { min: spec.min !== undefined, max: spec.max !== undefined }, name);
}

/** Legend entries placed in rows of at most `available` pixels. */
interface PlacedEntry {
  entry: LegendEntry;
  dx: number;
  row: number;
  /** A label longer than a whole row is set smaller (or shortened). */
  label: FittedText;
}

function legendRows(entries: LegendEntry[], available: number): PlacedEntry[] {
  const placed: PlacedEntry[] = [];
  let row = 0;
  let dx = 0;
  for (const entry of entries) {
    const label = fitText(entry.label, available - 28, FIGURE_TEXT.legendPx);
    const w = 28 + textWidthPx(label.text, label.fontPx) + 16;
    if (dx > 0 && dx + w > available) {
      row += 1;
      dx = 0;
    }
    placed.push({ entry, dx, row, label });
    dx += w;
  }
  return placed;
}

/** A data marker (circle or square) with a white rim. */
export function markerSvg(shape: 'circle' | 'square', cx: number, cy: number, color: string): string {
  if (shape === 'circle') {
    return `<circle cx="${px(cx)}" cy="${px(cy)}" r="2.8" fill="${color}" stroke="#ffffff" stroke-width="0.8"/>`;
  }
  return `<rect x="${px(cx - 2.6)}" y="${px(cy - 2.6)}" width="5.2" height="5.2" fill="${color}" stroke="#ffffff" stroke-width="0.8"/>`;
}

/** Lay out and draw the frame of an x-y figure. Throws RangeError when the size leaves no room. */
export function buildFrame(input: FrameInput): Frame {
  const { width, height } = input;
  const pad = FIGURE_SIZES.paddingPx;
  const xKind: ScaleKind = input.spec.xAxis.log === true ? 'log' : 'linear';
  const yKind: ScaleKind = input.spec.yAxis.log === true ? 'log' : 'linear';
  // x runs over the data (ticks inside it); y is widened to nice values, so the highest
  // and lowest points sit on or inside labelled ticks.
  const xDomain = axisDomain(input.spec.xAxis, input.xData, Math.max(2, Math.round(width / 100)), 'xAxis', false);
  const yDomain = axisDomain(input.spec.yAxis, input.yData, Math.max(2, Math.round(height / 70)), 'yAxis', true);

  const title = input.spec.title ? fitText(input.spec.title, width - 2 * pad, FIGURE_TEXT.titlePx) : null;
  const titlePx = title ? title.fontPx : 0;
  const xTitleText = axisTitle(input.spec.xAxis);
  const yTitleText = axisTitle(input.spec.yAxis);
  const axisPx = FIGURE_TEXT.axisPx;
  const tickPx = FIGURE_TEXT.tickPx;
  const entries = input.legend.filter((e) => e.label.length > 0);

  // Iterate: the legend's rows depend on the left margin, which depends on the y labels,
  // which depend on the height left by the legend. Two or three passes settle it.
  let left = pad + 60;
  let right = width - pad - 20;
  let placed = legendRows(entries, width - pad - left);
  let layout: { top: number; bottom: number; y: Scale; yTicks: AxisTicks; x: Scale; xTicks: AxisTicks; yTitle: FittedText; xTitle: FittedText } | null = null;
  for (let pass = 0; pass < 4; pass++) {
    const rows = placed.length > 0 ? placed[placed.length - 1]!.row + 1 : 0;
    const legendTop = pad + (titlePx > 0 ? ascentPx(titlePx) + descentPx(titlePx) + FIGURE_SIZES.titleBelowPx : 0);
    const legendBottom = legendTop + rows * LEGEND_ROW_PX + (rows > 0 ? 4 : 0);
    const xTitleH = ascentPx(axisPx) + descentPx(axisPx);
    const bottomBand = FIGURE_SIZES.tickPx + FIGURE_SIZES.tickGapPx + capHeightPx(tickPx) + descentPx(tickPx);
    const bottom = height - pad - xTitleH - FIGURE_SIZES.titleGapPx - bottomBand;
    // Room above the top tick label (half a label) or for the "×10ⁿ" note.
    let top = legendBottom + capHeightPx(tickPx) / 2 + 2;
    let y = createScale(yKind, yDomain, [bottom, top], 'yAxis');
    let yTicks = fittingTicks(y, 'left', 45);
    if (yTicks.note) {
      top = legendBottom + ascentPx(tickPx) + descentPx(tickPx) + 4;
      y = createScale(yKind, yDomain, [bottom, top], 'yAxis');
      yTicks = fittingTicks(y, 'left', 45);
    }
    // The rotated y title may run past the plot area, within the figure's height.
    const yTitle = fitText(yTitleText, height - pad - legendTop, axisPx);
    left = Math.ceil(pad + ascentPx(yTitle.fontPx) + descentPx(yTitle.fontPx) + FIGURE_SIZES.titleGapPx + axisBandPx(yTicks, 'left'));
    let x = createScale(xKind, xDomain, [left, right], 'xAxis');
    let xTicks = fittingTicks(x, 'bottom', 90);
    const overhang = bottomLabelOverhang(x, xTicks);
    right = Math.floor(width - pad - Math.max(4, overhang.right));
    left = Math.max(left, Math.ceil(pad + overhang.left));
    x = createScale(xKind, xDomain, [left, right], 'xAxis');
    xTicks = fittingTicks(x, 'bottom', 90);
    const noteW = xTicks.note ? textWidthPx(xTicks.note, tickPx) + 10 : 0;
    const xTitle = fitText(xTitleText, right - left - 2 * noteW, axisPx);
    layout = { top, bottom, y, yTicks, x, xTicks, yTitle, xTitle };
    const again = legendRows(entries, width - pad - left);
    const same = again.length === placed.length && again.every((p, i) => p.row === placed[i]!.row);
    placed = again;
    if (same) break;
  }
  const { top, bottom, x, y, xTicks, yTicks, yTitle, xTitle } = layout!;
  if (right - left < 60 || bottom - top < 40) {
    throw new RangeError(`plot size ${width} x ${height} px leaves no room for the data; make widthPx/heightPx larger or labels shorter`);
  }

  const under: string[] = [
    `<defs>${clipRect('clip', left, top, right - left, bottom - top)}</defs>`,
    `<rect class="plot-area" x="${px(left)}" y="${px(top)}" width="${px(right - left)}" height="${px(bottom - top)}" fill="${FIGURE_COLORS.plotBackground}"/>`,
  ];
  const grid: string[] = [];
  for (const v of xTicks.major) grid.push(`M${px(x.map(v))} ${px(top)}V${px(bottom)}`);
  for (const v of yTicks.major) grid.push(`M${px(left)} ${px(y.map(v))}H${px(right)}`);
  if (grid.length > 0) under.push(`<path class="grid" d="${grid.join('')}" fill="none" stroke="${FIGURE_COLORS.grid}" stroke-width="1"/>`);

  const over: string[] = [
    `<rect class="axes" x="${px(left)}" y="${px(top)}" width="${px(right - left)}" height="${px(bottom - top)}" fill="none" stroke="${FIGURE_COLORS.mutedInk}" stroke-width="1"/>`,
    ...axisMarkup({ scale: x, ticks: xTicks, side: 'bottom', edgePx: bottom, name: 'x' }),
    ...axisMarkup({ scale: y, ticks: yTicks, side: 'left', edgePx: left, name: 'y' }),
  ];
  const xTitleBaseline = height - pad - descentPx(axisPx);
  const yTitleLength = textWidthPx(yTitle.text, yTitle.fontPx);
  const belowTitle = pad + (titlePx > 0 ? ascentPx(titlePx) + descentPx(titlePx) + FIGURE_SIZES.titleBelowPx : 0);
  const yTitleCentre = Math.min(Math.max((top + bottom) / 2, belowTitle + yTitleLength / 2), height - pad - yTitleLength / 2);
  const noteW = xTicks.note ? textWidthPx(xTicks.note, tickPx) + 10 : 0;
  over.push(
    svgText(xTitle.text, (left + right) / 2, xTitleBaseline, { sizePx: xTitle.fontPx, anchor: 'middle', className: 'axis-label' }),
    svgText(yTitle.text, pad + ascentPx(yTitle.fontPx), yTitleCentre, { sizePx: yTitle.fontPx, anchor: 'middle', rotateDeg: -90, className: 'axis-label' }),
  );
  if (noteW > 0) over.push(svgText(xTicks.note, right, xTitleBaseline, { sizePx: tickPx, anchor: 'end', className: 'axis-note' }));
  if (yTicks.note) over.push(svgText(yTicks.note, left, top - descentPx(tickPx) - 3, { sizePx: tickPx, className: 'axis-note' }));
  if (title) over.push(svgText(title.text, pad, pad + ascentPx(titlePx), { sizePx: titlePx, className: 'plot-title' }));
  const legendTop = pad + (titlePx > 0 ? ascentPx(titlePx) + descentPx(titlePx) + FIGURE_SIZES.titleBelowPx : 0);
  for (const { entry, dx, row, label } of placed) {
    const lx = left + dx;
    const ly = legendTop + row * LEGEND_ROW_PX + LEGEND_ROW_PX / 2;
    const parts: string[] = ['<g class="legend-entry">'];
    if (entry.swatch === 'box') {
      parts.push(`<rect x="${px(lx + 2)}" y="${px(ly - 5)}" width="18" height="10" fill="${entry.color}" fill-opacity="0.25" stroke="${entry.color}" stroke-width="1.5"/>`);
    } else {
      if (entry.dash !== 'none') {
        const dash = entry.dash ? ` stroke-dasharray="${entry.dash}"` : '';
        parts.push(`<line x1="${px(lx)}" y1="${px(ly)}" x2="${px(lx + 22)}" y2="${px(ly)}" stroke="${entry.color}" stroke-width="2"${dash}/>`);
      }
      if (entry.marker !== 'none') parts.push(markerSvg(entry.marker, lx + 11, ly, entry.color));
    }
    parts.push(svgText(label.text, lx + 28, ly + capHeightPx(label.fontPx) / 2, { sizePx: label.fontPx }), '</g>');
    over.push(parts.join(''));
  }
  return { left, right, top, bottom, x, y, xTicks, yTicks, under, over };
}

/** A short note in the lower right corner of the plot area. */
export function noteInPlot(frame: Frame, text: string): string {
  return svgText(text, frame.right - 6, frame.bottom - 6, { sizePx: FIGURE_TEXT.notePx, anchor: 'end', color: FIGURE_COLORS.mutedInk, className: 'plot-note' });
}

/** `<g>` that clips its content to the plot area. */
export function clippedGroup(content: string[]): string[] {
  return [`<g clip-path="url(#${ID}-clip)">`, ...content, '</g>'];
}
