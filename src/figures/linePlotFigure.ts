// x-y line plots: several series with a legend, optional logarithmic y axis, optional
// error bars and markers. Used for Hubbard parameters against lattice depth, radial
// profiles and measured-versus-predicted comparisons.
//
// Axes: the x range is the data range (or the caller's), ticked at Heckbert's nice
// numbers inside it; the y range is widened to the enclosing nice ticks (Heckbert's
// "loose" labelling) or, on a log axis, to whole decades (niceTicks.ts). Non-finite
// points, and non-positive ones on a log axis, break the line instead of being drawn.
// The legend goes into the plot corner that covers the fewest data points and line samples.

import {
  drawFrame,
  drawTicks,
  lineHeightPx,
  maxLabelWidthPx,
  resolveStyle,
  thinTicks,
  tickBandPx,
  type FigureStyle,
} from './axes.js';
import { measureText } from './bitmapFont.js';
import { formatTicks, logTicks, looseTicks, niceTicks } from './niceTicks.js';
import { Raster, type PixelBox, type Rgb8, type RgbaImage } from './raster.js';

export type LineKind = 'solid' | 'dashed' | 'dotted' | 'none';
export type MarkerKind = 'none' | 'circle' | 'square';
export type LegendPlacement = 'auto' | 'none' | 'top-left' | 'top-right' | 'bottom-left' | 'bottom-right';

export interface PlotSeries {
  /** Legend text; series without a label stay out of the legend. */
  label?: string;
  x: ArrayLike<number>;
  y: ArrayLike<number>;
  /** Symmetric error bar half-lengths (e.g. one standard deviation), one per point. */
  yError?: ArrayLike<number>;
  /** Default: the next colour of seriesColors. */
  color?: Rgb8;
  /** Default 'solid'. */
  line?: LineKind;
  /** Line width in pixels (default 2). */
  widthPx?: number;
  /** Default 'none' (or 'circle' when line is 'none'). */
  marker?: MarkerKind;
}

export interface LinePlotOptions {
  title?: string;
  xLabel?: string;
  yLabel?: string;
  logY?: boolean;
  xRange?: { min: number; max: number };
  yRange?: { min: number; max: number };
  /** Size of the whole figure (default 720 x 480). */
  widthPx?: number;
  heightPx?: number;
  legend?: LegendPlacement;
  /** Light grid lines at the major ticks (default true). */
  grid?: boolean;
  style?: Partial<FigureStyle>;
}

export interface LinePlotLayout {
  /** The data area inside the frame. */
  plotBox: PixelBox;
  xMin: number;
  xMax: number;
  yMin: number;
  yMax: number;
  logY: boolean;
  legendBox: PixelBox | null;
}

export interface RenderedPlot extends RgbaImage {
  layout: LinePlotLayout;
}

/** Our series colours, in order of use: ink blue, brick, amber, teal, violet, graphite, olive. */
export const seriesColors: readonly Rgb8[] = [
  [38, 84, 166],
  [200, 68, 60],
  [220, 148, 28],
  [28, 138, 136],
  [122, 82, 172],
  [88, 88, 96],
  [130, 130, 40],
];

const dashes: Record<LineKind, readonly number[] | undefined> = {
  solid: undefined,
  dashed: [9, 5],
  dotted: [2, 4],
  none: undefined,
};

function checkRange(r: { min: number; max: number } | undefined, name: string, positive: boolean): void {
  if (!r) return;
  if (!Number.isFinite(r.min) || !Number.isFinite(r.max) || !(r.max > r.min)) {
    throw new Error(`${name}: expected finite min < max, got [${r.min}, ${r.max}]`);
  }
  if (positive && !(r.min > 0)) throw new Error(`${name}: a log axis needs min > 0, got ${r.min}`);
}

/** Render x-y series as a line plot. */
export function renderLinePlot(series: readonly PlotSeries[], options: LinePlotOptions = {}): RenderedPlot {
  const style = resolveStyle(options.style);
  const logY = options.logY ?? false;
  checkRange(options.xRange, 'xRange', false);
  checkRange(options.yRange, 'yRange', logY);
  series.forEach((s, i) => {
    if (s.x.length !== s.y.length) throw new Error(`series[${i}] (${s.label ?? 'unlabelled'}): x has ${s.x.length} points but y has ${s.y.length}`);
    if (s.yError && s.yError.length !== s.y.length) {
      throw new Error(`series[${i}] (${s.label ?? 'unlabelled'}): yError has ${s.yError.length} values but y has ${s.y.length}`);
    }
  });
  const widthPx = options.widthPx ?? 720;
  const heightPx = options.heightPx ?? 480;
  if (!Number.isInteger(widthPx) || !Number.isInteger(heightPx) || widthPx < 200 || heightPx < 150) {
    throw new Error(`line plot size: expected integers of at least 200 x 150 pixels, got ${widthPx} x ${heightPx}`);
  }

  // Data extents (finite points; with error bars; positive only on a log axis).
  let x0 = Infinity;
  let x1 = -Infinity;
  let y0 = Infinity;
  let y1 = -Infinity;
  for (const s of series) {
    for (let i = 0; i < s.x.length; i++) {
      const x = s.x[i];
      const y = s.y[i];
      if (!Number.isFinite(x) || !Number.isFinite(y)) continue;
      x0 = Math.min(x0, x);
      x1 = Math.max(x1, x);
      const e = s.yError && Number.isFinite(s.yError[i]) ? Math.abs(s.yError[i]) : 0;
      for (const v of [y - e, y + e]) {
        if (logY && !(v > 0)) continue;
        y0 = Math.min(y0, v);
        y1 = Math.max(y1, v);
      }
    }
  }
  if (!Number.isFinite(x0)) {
    x0 = 0;
    x1 = 1;
  }
  if (!Number.isFinite(y0)) {
    y0 = logY ? 1 : 0;
    y1 = logY ? 10 : 1;
  }
  if (x0 === x1) {
    const pad = x0 === 0 ? 1 : Math.abs(x0) * 0.05;
    x0 -= pad;
    x1 += pad;
  }
  // Markers at the very ends of an automatic x range would be cut in half by the frame.
  const hasMarkers = series.some((s) => (s.marker ?? (s.line === 'none' ? 'circle' : 'none')) !== 'none');
  const xPad = hasMarkers ? 0.02 * (x1 - x0) : 0;
  const xMin = options.xRange?.min ?? x0 - xPad;
  const xMax = options.xRange?.max ?? x1 + xPad;
  let yMin: number;
  let yMax: number;
  let yTickValues: { value: number; label: string }[];
  let yMinorValues: number[] = [];
  let yMultiplier = '';
  if (logY) {
    yMin = options.yRange?.min ?? 10 ** Math.floor(Math.log10(y0) + 1e-9);
    yMax = options.yRange?.max ?? 10 ** Math.ceil(Math.log10(y1) - 1e-9);
    if (yMax <= yMin) yMax = yMin * 10;
    const lt = logTicks(yMin, yMax);
    yTickValues = lt.major.map((v, i) => ({ value: v, label: lt.labels[i] }));
    yMinorValues = lt.minor;
  } else {
    let set;
    if (options.yRange) {
      yMin = options.yRange.min;
      yMax = options.yRange.max;
      set = niceTicks(yMin, yMax, 6);
    } else {
      set = looseTicks(y0, y1, 6);
      yMin = set.values[0];
      yMax = set.values[set.values.length - 1];
    }
    const labels = formatTicks(set);
    yMultiplier = labels.multiplierLabel;
    yTickValues = set.values.map((v, i) => ({ value: v, label: labels.labels[i] }));
  }
  const xSet = niceTicks(xMin, xMax, Math.max(2, Math.round(widthPx / 110)));
  const xLabels = formatTicks(xSet);

  // Layout.
  const pad = style.paddingPx;
  const lineH = lineHeightPx(style);
  const titleH = options.title ? lineHeightPx(style, style.titleScale) : 0;
  const left = pad + (options.yLabel ? lineH + style.labelGapPx * 2 : 0) + tickBandPx(yTickValues.map((t) => t.label), 'left', style) + 1;
  const top = pad + (titleH > 0 ? titleH + 10 : 0) + (yMultiplier ? lineH + 4 : Math.ceil(lineH / 2));
  const lastXLabel = xLabels.labels[xLabels.labels.length - 1] ?? '';
  const right = Math.max(pad, Math.ceil(measureText(lastXLabel, style.textScale).widthPx / 2) + 4);
  const bottom = 1 + tickBandPx([], 'bottom', style) + (options.xLabel || xLabels.multiplierLabel ? style.labelGapPx * 2 + lineH : 0) + pad;
  const plot: PixelBox = { x: left, y: top, width: widthPx - left - right - 1, height: heightPx - top - bottom - 1 };
  if (plot.width < 60 || plot.height < 40) {
    throw new Error(`line plot size: ${widthPx} x ${heightPx} pixels leave no room for the data; make the figure larger`);
  }

  const toPx = (x: number): number => plot.x + ((x - xMin) / (xMax - xMin)) * plot.width;
  const lyMin = logY ? Math.log10(yMin) : yMin;
  const lyMax = logY ? Math.log10(yMax) : yMax;
  const toPy = (y: number): number => {
    const v = logY ? (y > 0 ? Math.log10(y) : Number.NaN) : y;
    return plot.y + plot.height - ((v - lyMin) / (lyMax - lyMin)) * plot.height;
  };
  const clampPx = (p: number, lo: number, len: number): number => Math.min(lo + len - 1, Math.max(lo, p));

  const raster = new Raster(widthPx, heightPx, style.background);
  const xTicks = thinTicks(
    xSet.values.map((v, i) => ({ px: clampPx(toPx(v), plot.x, plot.width), label: xLabels.labels[i] })),
    'bottom',
    style,
  );
  const yTicksPx = thinTicks(
    yTickValues.map((t) => ({ px: clampPx(toPy(t.value), plot.y, plot.height), label: t.label })),
    'left',
    style,
  );
  const yMinorPx = yMinorValues.map((v) => clampPx(toPy(v), plot.y, plot.height));

  if (options.grid ?? true) {
    for (const t of xTicks) raster.fillRect(Math.floor(t.px), plot.y, 1, plot.height, style.gridColor);
    for (const t of yTicksPx) raster.fillRect(plot.x, Math.floor(t.px), plot.width, 1, style.gridColor);
  }

  // Data.
  raster.setClip(plot.x, plot.y, plot.width, plot.height);
  const resolved = series.map((s, i) => {
    const line = s.line ?? 'solid';
    return {
      s,
      color: s.color ?? seriesColors[i % seriesColors.length],
      line,
      widthPx: s.widthPx ?? 2,
      marker: s.marker ?? (line === 'none' ? 'circle' : 'none'),
    };
  });
  const dataPx: number[] = [];
  for (const r of resolved) {
    const n = r.s.x.length;
    const xs = new Float64Array(n);
    const ys = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const ok = Number.isFinite(r.s.x[i]) && Number.isFinite(r.s.y[i]);
      xs[i] = ok ? toPx(r.s.x[i]) : Number.NaN;
      ys[i] = ok ? toPy(r.s.y[i]) : Number.NaN;
      if (Number.isFinite(xs[i]) && Number.isFinite(ys[i])) dataPx.push(xs[i], ys[i]);
    }
    if (r.s.yError) {
      for (let i = 0; i < n; i++) {
        const e = Math.abs(r.s.yError[i]);
        if (!Number.isFinite(xs[i]) || !Number.isFinite(ys[i]) || !Number.isFinite(e)) continue;
        const yLow = toPy(r.s.y[i] - e);
        const low = Number.isFinite(yLow) ? yLow : plot.y + plot.height + 2; // log axis: bar reaches the bottom
        const high = toPy(r.s.y[i] + e);
        const barStyle = { color: r.color, widthPx: 1.2 };
        raster.line(xs[i], low, xs[i], high, barStyle);
        raster.line(xs[i] - 3.5, low, xs[i] + 3.5, low, barStyle);
        raster.line(xs[i] - 3.5, high, xs[i] + 3.5, high, barStyle);
      }
    }
    if (r.line !== 'none') {
      raster.polyline(xs, ys, { color: r.color, widthPx: r.widthPx, dashPx: dashes[r.line] });
      // Sample the drawn segments every few pixels, so the legend also avoids lines
      // that cross a corner between two distant data points.
      for (let i = 1; i < n; i++) {
        if (![xs[i - 1], ys[i - 1], xs[i], ys[i]].every(Number.isFinite)) continue;
        const steps = Math.min(1000, Math.ceil(Math.hypot(xs[i] - xs[i - 1], ys[i] - ys[i - 1]) / 4));
        for (let j = 1; j < steps; j++) {
          const t = j / steps;
          dataPx.push(xs[i - 1] + t * (xs[i] - xs[i - 1]), ys[i - 1] + t * (ys[i] - ys[i - 1]));
        }
      }
    }
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(xs[i]) || !Number.isFinite(ys[i])) continue;
      drawMarker(raster, r.marker, xs[i], ys[i], r.color, style.background);
    }
  }
  raster.resetClip();

  // Frame, ticks, labels, title.
  drawFrame(raster, plot.x, plot.y, plot.width, plot.height, style);
  drawTicks(raster, 'bottom', plot.y + plot.height, xTicks, [], style);
  drawTicks(raster, 'left', plot.x, yTicksPx, yMinorPx, style);
  const text = { color: style.ink, scale: style.textScale };
  const xLabelY = plot.y + plot.height + 1 + tickBandPx([], 'bottom', style) + style.labelGapPx * 2;
  if (options.xLabel) raster.text(options.xLabel, plot.x + plot.width / 2, xLabelY, { ...text, anchor: 'middle', baseline: 'top' });
  if (xLabels.multiplierLabel) {
    raster.text(xLabels.multiplierLabel, plot.x + plot.width, xLabelY, { ...text, color: style.mutedInk, anchor: 'end', baseline: 'top' });
  }
  if (options.yLabel) raster.text(options.yLabel, pad, plot.y + plot.height / 2, { ...text, rotation: 90, anchor: 'middle', baseline: 'top' });
  if (yMultiplier) raster.text(yMultiplier, plot.x - 1, plot.y - 5, { ...text, color: style.mutedInk, anchor: 'end', baseline: 'bottom' });
  if (options.title) {
    const titleW = measureText(options.title, style.titleScale).widthPx;
    const centre = Math.min(Math.max(plot.x + plot.width / 2, pad + titleW / 2), widthPx - pad - titleW / 2);
    raster.text(options.title, Math.round(centre), pad, { color: style.ink, scale: style.titleScale, anchor: 'middle', baseline: 'top' });
  }

  const legendBox = drawLegend(raster, resolved, plot, dataPx, options.legend ?? 'auto', style);
  return {
    width: raster.width,
    height: raster.height,
    data: raster.data,
    layout: { plotBox: plot, xMin, xMax, yMin, yMax, logY, legendBox },
  };
}

function drawMarker(r: Raster, marker: MarkerKind, x: number, y: number, color: Rgb8, background: Rgb8): void {
  if (marker === 'circle') {
    r.fillCircle(x, y, 4.2, background);
    r.fillCircle(x, y, 3.4, color);
  } else if (marker === 'square') {
    r.fillRect(Math.round(x) - 4, Math.round(y) - 4, 9, 9, background);
    r.fillRect(Math.round(x) - 3, Math.round(y) - 3, 7, 7, color);
  }
}

interface ResolvedSeries {
  s: PlotSeries;
  color: Rgb8;
  line: LineKind;
  widthPx: number;
  marker: MarkerKind;
}

function drawLegend(
  r: Raster,
  series: readonly ResolvedSeries[],
  plot: PixelBox,
  dataPx: readonly number[],
  placement: LegendPlacement,
  style: FigureStyle,
): PixelBox | null {
  const entries = series.filter((s) => s.s.label);
  if (placement === 'none' || entries.length === 0) return null;
  const lineH = lineHeightPx(style);
  const sampleW = 26;
  const inner = 8;
  const rowPitch = lineH + 5;
  const width = inner * 2 + sampleW + 8 + maxLabelWidthPx(entries.map((e) => e.s.label!), style.textScale);
  const height = inner * 2 + entries.length * rowPitch - 5;
  const margin = 10;
  const corners = {
    'top-right': { x: plot.x + plot.width - margin - width, y: plot.y + margin },
    'top-left': { x: plot.x + margin, y: plot.y + margin },
    'bottom-right': { x: plot.x + plot.width - margin - width, y: plot.y + plot.height - margin - height },
    'bottom-left': { x: plot.x + margin, y: plot.y + plot.height - margin - height },
  } as const;
  let corner: keyof typeof corners;
  if (placement === 'auto') {
    // The corner whose box covers the fewest data points (ties keep the first in this order).
    const order: (keyof typeof corners)[] = ['top-right', 'top-left', 'bottom-right', 'bottom-left'];
    let best = Infinity;
    corner = 'top-right';
    for (const c of order) {
      const b = corners[c];
      let count = 0;
      for (let i = 0; i < dataPx.length; i += 2) {
        if (dataPx[i] >= b.x - 4 && dataPx[i] <= b.x + width + 4 && dataPx[i + 1] >= b.y - 4 && dataPx[i + 1] <= b.y + height + 4) count++;
      }
      if (count < best) {
        best = count;
        corner = c;
      }
    }
  } else {
    corner = placement;
  }
  const box = { ...corners[corner], width, height };
  r.fillRect(box.x, box.y, width, height, style.background, 0.92);
  r.strokeRect(box.x, box.y, width, height, [196, 196, 204]);
  entries.forEach((e, i) => {
    const cy = box.y + inner + i * rowPitch + lineH / 2 - 1.5;
    const x0 = box.x + inner;
    if (e.line !== 'none') r.line(x0, cy, x0 + sampleW, cy, { color: e.color, widthPx: e.widthPx, dashPx: dashes[e.line] });
    drawMarker(r, e.marker, x0 + sampleW / 2, cy, e.color, style.background);
    r.text(e.s.label!, x0 + sampleW + 8, Math.round(cy), { color: style.ink, scale: style.textScale, baseline: 'middle' });
  });
  return box;
}
