// Inline SVG charts for the HTML report: line plots (with error bars, log axes, marker
// lines) and step histograms. Pure string output in SVG 1.1 (W3C Recommendation, 2011)
// that is also well-formed XML, so a chart can be cut out of the report and opened on
// its own. All caller text is escaped. Tick placement: see axisTicks.ts.
//
// Layout is computed without a browser: text widths are estimated from the character
// count (about 0.6 em per character for a sans-serif font), which only needs to be good
// enough to reserve margins. Coordinates are rounded to 0.01 px to keep files small.

import {
  linearTickLabels,
  logTickLabels,
  niceLinearTicks,
  niceLogTicks,
  scaleNote,
} from './axisTicks.js';
import { escapeMarkup } from '../report/escapeMarkup.js';
import { REPORT_COLORS, seriesColor } from './reportPalette.js';
import type { AxisSpec, HistogramSpec, LinePlotSpec, PlotMarker, SeriesStyle } from '../report/reportModel.js';

export interface SvgPlotOptions {
  /** Prefix for element ids (clip paths, titles); must be unique within one HTML page. */
  idPrefix?: string;
}

export const PLOT_FONT_FAMILY =
  "system-ui, -apple-system, 'Segoe UI', 'Noto Sans', 'DejaVu Sans', 'Liberation Sans', Arial, sans-serif";

const TICK_FONT_PX = 11.5;
const AXIS_FONT_PX = 12.5;
const TITLE_FONT_PX = 13.5;
const LEGEND_FONT_PX = 11.5;
const TICK_LENGTH_PX = 5;
const DEFAULT_WIDTH_PX = 640;
const DEFAULT_HEIGHT_PX = 360;

/** Estimated rendered width of a label: about 0.6 em per character. */
function textWidthPx(text: string, fontPx: number): number {
  return 0.6 * fontPx * [...text].length;
}

/** Coordinates rounded to 0.01 px, without trailing zeros. */
function px(value: number): string {
  const rounded = Math.round(value * 100) / 100;
  return String(rounded === 0 ? 0 : rounded);
}

function axisTitle(axis: AxisSpec): string {
  return axis.unit ? `${axis.label} (${axis.unit})` : axis.label;
}

function safeId(prefix: string | undefined): string {
  const cleaned = (prefix ?? 'plot').replace(/[^A-Za-z0-9_-]/g, '-');
  return /^[A-Za-z]/.test(cleaned) ? cleaned : `p-${cleaned}`;
}

function checkSize(value: number | undefined, fallback: number, name: string, least: number): number {
  if (value === undefined) return fallback;
  if (!Number.isFinite(value) || value < least || value > 4000) {
    throw new RangeError(`${name}: expected a number of pixels between ${least} and 4000, got ${value}`);
  }
  return value;
}

// ---------------------------------------------------------------------------------
// Axes

interface DataRange {
  min: number;
  max: number;
}

/** Running min/max of the values an axis must show (positive ones only for a log axis). */
class RangeAccumulator {
  min = Infinity;
  max = -Infinity;
  constructor(private readonly log: boolean) {}
  add(value: number): void {
    if (!Number.isFinite(value) || (this.log && value <= 0)) return;
    if (value < this.min) this.min = value;
    if (value > this.max) this.max = value;
  }
  range(): DataRange | null {
    return this.min <= this.max ? { min: this.min, max: this.max } : null;
  }
}

interface AxisLayout {
  log: boolean;
  /** Axis limits (data units). */
  min: number;
  max: number;
  major: number[];
  majorLabels: string[];
  minor: number[];
  /** Common power of ten taken out of linear tick labels. */
  scaleExponent: number;
}

/** Ticks and limits for one axis from its spec and the range of the data it shows. */
function layoutAxis(spec: AxisSpec, data: DataRange | null, targetCount: number, name: string): AxisLayout {
  const log = spec.log === true;
  for (const [key, value] of [['min', spec.min], ['max', spec.max]] as const) {
    if (value === undefined) continue;
    if (!Number.isFinite(value) || (log && value <= 0)) {
      throw new RangeError(`${name}.${key}: expected a finite${log ? ' positive' : ''} number, got ${value}`);
    }
  }
  let low = spec.min ?? data?.min ?? (log ? 1 : 0);
  let high = spec.max ?? data?.max ?? (log ? 10 : 1);
  if (spec.min !== undefined && spec.max === undefined && high <= low) high = log ? low * 10 : low + 1;
  if (spec.max !== undefined && spec.min === undefined && low >= high) low = log ? high / 10 : high - 1;
  const fixedMin = spec.min !== undefined;
  const fixedMax = spec.max !== undefined;
  if (low > high || (fixedMin && fixedMax && low === high)) {
    throw new RangeError(`${name}: min (${low}) must be below max (${high})`);
  }
  // Keep ticks that fall inside a fixed limit (with a little slack for rounding).
  const inside = (v: number, lo: number, hi: number): boolean => {
    const slack = log ? 1e-9 * v : 1e-9 * (hi - lo);
    return v >= lo - slack && v <= hi + slack;
  };
  if (log) {
    const ticks = niceLogTicks(low, high);
    const min = fixedMin ? low : ticks.min;
    const max = fixedMax ? high : ticks.max;
    const labels = logTickLabels(ticks);
    const major: number[] = [];
    const majorLabels: string[] = [];
    ticks.values.forEach((v, i) => {
      if (inside(v, min, max)) {
        major.push(v);
        majorLabels.push(labels[i]!);
      }
    });
    const minor = ticks.minorValues.filter((v) => inside(v, min, max));
    return { log, min, max: max > min ? max : min * 10, major, majorLabels, minor, scaleExponent: 0 };
  }
  const ticks = niceLinearTicks(low, high, targetCount);
  const min = fixedMin ? low : ticks.min;
  const max = fixedMax ? high : ticks.max;
  const labels = linearTickLabels(ticks);
  const major: number[] = [];
  const majorLabels: string[] = [];
  ticks.values.forEach((v, i) => {
    if (inside(v, min, max)) {
      major.push(v);
      majorLabels.push(labels.labels[i]!);
    }
  });
  return { log, min, max, major, majorLabels, minor: [], scaleExponent: labels.scaleExponent };
}

/** Pixel position of a data value; pxAtMin/pxAtMax are the ends of the axis on screen. */
function project(axis: AxisLayout, value: number, pxAtMin: number, pxAtMax: number): number {
  const t = axis.log
    ? (Math.log10(value) - Math.log10(axis.min)) / (Math.log10(axis.max) - Math.log10(axis.min))
    : (value - axis.min) / (axis.max - axis.min);
  return pxAtMin + t * (pxAtMax - pxAtMin);
}

/** Whether a value can be drawn on the axis at all (finite, and positive on a log axis). */
function drawable(axis: AxisLayout, value: number): boolean {
  return Number.isFinite(value) && (!axis.log || value > 0);
}

// ---------------------------------------------------------------------------------
// Frame: plot area, grid, ticks, labels, legend

interface LegendEntry {
  label: string;
  color: string;
  dash: string | null;
  marker: 'none' | 'circle' | 'square';
  swatch: 'line' | 'box';
}

interface FrameInput {
  width: number;
  height: number;
  title?: string;
  xSpec: AxisSpec;
  ySpec: AxisSpec;
  x: AxisLayout;
  y: AxisLayout;
  legend: LegendEntry[];
}

interface Frame {
  left: number;
  right: number;
  top: number;
  bottom: number;
  /** SVG for everything drawn beneath the data (background, grid). */
  under: string[];
  /** SVG for everything drawn above the data (axes, ticks, labels, legend). */
  over: string[];
}

function dashFor(line: SeriesStyle['line']): string | null {
  if (line === 'dashed') return '6 4';
  if (line === 'dotted') return '1.5 3';
  return null;
}

function markerSvg(shape: 'circle' | 'square', cx: number, cy: number, color: string): string {
  if (shape === 'circle') {
    return `<circle cx="${px(cx)}" cy="${px(cy)}" r="2.8" fill="${color}" stroke="#ffffff" stroke-width="0.8"/>`;
  }
  return `<rect x="${px(cx - 2.6)}" y="${px(cy - 2.6)}" width="5.2" height="5.2" fill="${color}" stroke="#ffffff" stroke-width="0.8"/>`;
}

/** Greedy row layout of legend entries within `available` pixels. */
function legendRows(entries: LegendEntry[], available: number): { entry: LegendEntry; dx: number; row: number }[] {
  const placed: { entry: LegendEntry; dx: number; row: number }[] = [];
  let row = 0;
  let dx = 0;
  for (const entry of entries) {
    const w = 26 + textWidthPx(entry.label, LEGEND_FONT_PX) + 18;
    if (dx > 0 && dx + w > available) {
      row += 1;
      dx = 0;
    }
    placed.push({ entry, dx, row });
    dx += w;
  }
  return placed;
}

function buildFrame(input: FrameInput): Frame {
  const { x, y, width, height } = input;
  const yLabelWidth = Math.max(0, ...input.y.majorLabels.map((l) => textWidthPx(l, TICK_FONT_PX)));
  const left = Math.ceil(10 + AXIS_FONT_PX + 8 + yLabelWidth + 6 + TICK_LENGTH_PX);
  const lastXLabel = x.majorLabels[x.majorLabels.length - 1] ?? '';
  const right = width - Math.ceil(Math.max(18, textWidthPx(lastXLabel, TICK_FONT_PX) / 2 + 6));
  const legendEntries = input.legend.filter((e) => e.label.length > 0);
  const legendPlaced = legendRows(legendEntries, right - left);
  const legendRowCount = legendPlaced.length > 0 ? legendPlaced[legendPlaced.length - 1]!.row + 1 : 0;
  const titleHeight = input.title ? 22 : 0;
  const legendTop = 8 + titleHeight;
  const top = legendTop + legendRowCount * 18 + 16;
  const bottom = height - (TICK_LENGTH_PX + 6 + TICK_FONT_PX + 10 + AXIS_FONT_PX + 6);
  if (right - left < 60 || bottom - top < 60) {
    throw new RangeError(
      `plot size ${width} x ${height} px leaves no room for the data; make widthPx/heightPx larger or labels shorter`,
    );
  }

  const under: string[] = [];
  const over: string[] = [];
  under.push(
    `<rect class="plot-area" x="${px(left)}" y="${px(top)}" width="${px(right - left)}" height="${px(bottom - top)}" fill="${REPORT_COLORS.plotBackground}"/>`,
  );
  // Grid at major ticks (and faintly at log minor ticks), beneath the data.
  const grid: string[] = [];
  for (const v of x.major) {
    const gx = project(x, v, left, right);
    grid.push(`M${px(gx)} ${px(top)}V${px(bottom)}`);
  }
  for (const v of y.major) {
    const gy = project(y, v, bottom, top);
    grid.push(`M${px(left)} ${px(gy)}H${px(right)}`);
  }
  if (grid.length > 0) {
    under.push(`<path class="grid" d="${grid.join('')}" fill="none" stroke="${REPORT_COLORS.grid}" stroke-width="1"/>`);
  }

  // Axis box.
  over.push(
    `<rect class="axes" x="${px(left)}" y="${px(top)}" width="${px(right - left)}" height="${px(bottom - top)}" fill="none" stroke="${REPORT_COLORS.mutedInk}" stroke-width="1"/>`,
  );
  // x ticks and labels.
  x.major.forEach((v, i) => {
    const tx = project(x, v, left, right);
    over.push(
      `<line class="tick" data-axis="x" data-value="${escapeMarkup(String(v))}" x1="${px(tx)}" y1="${px(bottom)}" x2="${px(tx)}" y2="${px(bottom + TICK_LENGTH_PX)}" stroke="${REPORT_COLORS.mutedInk}"/>`,
      `<text x="${px(tx)}" y="${px(bottom + TICK_LENGTH_PX + 4 + TICK_FONT_PX)}" text-anchor="middle" font-size="${TICK_FONT_PX}" fill="${REPORT_COLORS.ink}">${escapeMarkup(x.majorLabels[i]!)}</text>`,
    );
  });
  for (const v of x.minor) {
    const tx = project(x, v, left, right);
    over.push(
      `<line class="tick-minor" data-axis="x" x1="${px(tx)}" y1="${px(bottom)}" x2="${px(tx)}" y2="${px(bottom + 3)}" stroke="${REPORT_COLORS.mutedInk}"/>`,
    );
  }
  // y ticks and labels.
  y.major.forEach((v, i) => {
    const ty = project(y, v, bottom, top);
    over.push(
      `<line class="tick" data-axis="y" data-value="${escapeMarkup(String(v))}" x1="${px(left - TICK_LENGTH_PX)}" y1="${px(ty)}" x2="${px(left)}" y2="${px(ty)}" stroke="${REPORT_COLORS.mutedInk}"/>`,
      `<text x="${px(left - TICK_LENGTH_PX - 4)}" y="${px(ty + TICK_FONT_PX * 0.35)}" text-anchor="end" font-size="${TICK_FONT_PX}" fill="${REPORT_COLORS.ink}">${escapeMarkup(y.majorLabels[i]!)}</text>`,
    );
  });
  for (const v of y.minor) {
    const ty = project(y, v, bottom, top);
    over.push(
      `<line class="tick-minor" data-axis="y" x1="${px(left - 3)}" y1="${px(ty)}" x2="${px(left)}" y2="${px(ty)}" stroke="${REPORT_COLORS.mutedInk}"/>`,
    );
  }
  // Axis titles; a common power of ten goes at the far end of its axis.
  over.push(
    `<text class="axis-label" x="${px((left + right) / 2)}" y="${px(height - 8)}" text-anchor="middle" font-size="${AXIS_FONT_PX}" fill="${REPORT_COLORS.ink}">${escapeMarkup(axisTitle(input.xSpec))}</text>`,
    `<text class="axis-label" transform="translate(${px(10 + AXIS_FONT_PX)} ${px((top + bottom) / 2)}) rotate(-90)" text-anchor="middle" font-size="${AXIS_FONT_PX}" fill="${REPORT_COLORS.ink}">${escapeMarkup(axisTitle(input.ySpec))}</text>`,
  );
  if (x.scaleExponent !== 0) {
    over.push(
      `<text x="${px(right)}" y="${px(height - 8)}" text-anchor="end" font-size="${TICK_FONT_PX}" fill="${REPORT_COLORS.ink}">${escapeMarkup(scaleNote(x.scaleExponent))}</text>`,
    );
  }
  if (y.scaleExponent !== 0) {
    over.push(
      `<text x="${px(left)}" y="${px(top - 5)}" text-anchor="start" font-size="${TICK_FONT_PX}" fill="${REPORT_COLORS.ink}">${escapeMarkup(scaleNote(y.scaleExponent))}</text>`,
    );
  }
  if (input.title) {
    over.push(
      `<text class="plot-title" x="${px(left)}" y="${px(8 + TITLE_FONT_PX)}" font-size="${TITLE_FONT_PX}" font-weight="600" fill="${REPORT_COLORS.ink}">${escapeMarkup(input.title)}</text>`,
    );
  }
  // Legend above the plot area, in rows.
  for (const { entry, dx, row } of legendPlaced) {
    const lx = left + dx;
    const ly = legendTop + row * 18 + 9;
    const parts: string[] = [`<g class="legend-entry">`];
    if (entry.swatch === 'box') {
      parts.push(
        `<rect x="${px(lx + 2)}" y="${px(ly - 5)}" width="18" height="10" fill="${entry.color}" fill-opacity="0.25" stroke="${entry.color}" stroke-width="1.5"/>`,
      );
    } else {
      if (entry.dash !== 'none') {
        const dash = entry.dash ? ` stroke-dasharray="${entry.dash}"` : '';
        parts.push(
          `<line x1="${px(lx)}" y1="${px(ly)}" x2="${px(lx + 22)}" y2="${px(ly)}" stroke="${entry.color}" stroke-width="2"${dash}/>`,
        );
      }
      if (entry.marker !== 'none') parts.push(markerSvg(entry.marker, lx + 11, ly, entry.color));
    }
    parts.push(
      `<text x="${px(lx + 28)}" y="${px(ly + LEGEND_FONT_PX * 0.35)}" font-size="${LEGEND_FONT_PX}" fill="${REPORT_COLORS.ink}">${escapeMarkup(entry.label)}</text></g>`,
    );
    over.push(parts.join(''));
  }
  return { left, right, top, bottom, under, over };
}

/** Dashed reference lines (shell radii, tolerances) with their labels. */
function markerLines(
  frame: Frame,
  x: AxisLayout,
  y: AxisLayout,
  vertical: PlotMarker[] | undefined,
  horizontal: PlotMarker[] | undefined,
): string[] {
  const out: string[] = [];
  const { left, right, top, bottom } = frame;
  for (const m of vertical ?? []) {
    if (!drawable(x, m.at) || m.at < x.min || m.at > x.max) continue;
    const mx = project(x, m.at, left, right);
    out.push(
      `<line class="marker-line" x1="${px(mx)}" y1="${px(top)}" x2="${px(mx)}" y2="${px(bottom)}" stroke="${REPORT_COLORS.marker}" stroke-width="1" stroke-dasharray="4 3"/>`,
    );
    if (m.label) {
      // Written upwards along the left side of the line, so that close markers do not collide.
      out.push(
        `<text transform="translate(${px(mx - 4)} ${px(top + 6)}) rotate(-90)" text-anchor="end" font-size="${TICK_FONT_PX - 1}" fill="${REPORT_COLORS.mutedInk}">${escapeMarkup(m.label)}</text>`,
      );
    }
  }
  for (const m of horizontal ?? []) {
    if (!drawable(y, m.at) || m.at < y.min || m.at > y.max) continue;
    const my = project(y, m.at, bottom, top);
    out.push(
      `<line class="marker-line" x1="${px(left)}" y1="${px(my)}" x2="${px(right)}" y2="${px(my)}" stroke="${REPORT_COLORS.marker}" stroke-width="1" stroke-dasharray="4 3"/>`,
    );
    if (m.label) {
      out.push(
        `<text x="${px(right - 4)}" y="${px(my - 4)}" text-anchor="end" font-size="${TICK_FONT_PX - 1}" fill="${REPORT_COLORS.mutedInk}">${escapeMarkup(m.label)}</text>`,
      );
    }
  }
  return out;
}

function openSvg(id: string, width: number, height: number, title: string): string[] {
  return [
    `<svg xmlns="http://www.w3.org/2000/svg" class="tc-plot" id="${id}" viewBox="0 0 ${width} ${height}" width="${width}" height="${height}" role="img" aria-labelledby="${id}-title" font-family="${escapeMarkup(PLOT_FONT_FAMILY)}">`,
    `<title id="${id}-title">${escapeMarkup(title)}</title>`,
  ];
}

function clipDefs(id: string, frame: Frame): string {
  return `<defs><clipPath id="${id}-clip"><rect x="${px(frame.left)}" y="${px(frame.top)}" width="${px(frame.right - frame.left)}" height="${px(frame.bottom - frame.top)}"/></clipPath></defs>`;
}

function noteInPlot(frame: Frame, text: string): string {
  return `<text class="plot-note" x="${px(frame.right - 6)}" y="${px(frame.bottom - 6)}" text-anchor="end" font-size="${TICK_FONT_PX - 1}" fill="${REPORT_COLORS.mutedInk}">${escapeMarkup(text)}</text>`;
}

function describe(title: string | undefined, xSpec: AxisSpec, ySpec: AxisSpec): string {
  return title ?? `${axisTitle(ySpec)} against ${axisTitle(xSpec)}`;
}

// ---------------------------------------------------------------------------------
// Line plot

/** A line plot as one `<svg>` element. Throws RangeError naming the bad field. */
export function renderLinePlotSvg(spec: LinePlotSpec, options: SvgPlotOptions = {}): string {
  const id = safeId(options.idPrefix);
  const width = checkSize(spec.widthPx, DEFAULT_WIDTH_PX, 'widthPx', 200);
  const height = checkSize(spec.heightPx, DEFAULT_HEIGHT_PX, 'heightPx', 150);
  const xLog = spec.xAxis.log === true;
  const yLog = spec.yAxis.log === true;

  const xRange = new RangeAccumulator(xLog);
  const yRange = new RangeAccumulator(yLog);
  let hiddenOnLog = 0;
  spec.series.forEach((s, k) => {
    if (s.x.length !== s.y.length) {
      throw new RangeError(`series[${k}] '${s.label}': x has ${s.x.length} values but y has ${s.y.length}`);
    }
    if (s.yErr && s.yErr.length !== s.y.length) {
      throw new RangeError(`series[${k}] '${s.label}': yErr has ${s.yErr.length} values but y has ${s.y.length}`);
    }
    for (let i = 0; i < s.y.length; i++) {
      const xv = s.x[i]!;
      const yv = s.y[i]!;
      if (!Number.isFinite(xv) || !Number.isFinite(yv)) continue;
      if ((xLog && xv <= 0) || (yLog && yv <= 0)) {
        hiddenOnLog += 1;
        continue;
      }
      xRange.add(xv);
      yRange.add(yv);
      const err = s.yErr ? Math.abs(s.yErr[i]!) : 0;
      if (err > 0 && Number.isFinite(err)) {
        yRange.add(yv + err);
        yRange.add(yv - err);
      }
    }
  });
  for (const m of spec.verticalMarkers ?? []) xRange.add(m.at);
  for (const m of spec.horizontalMarkers ?? []) yRange.add(m.at);

  const x = layoutAxis(spec.xAxis, xRange.range(), 6, 'xAxis');
  const y = layoutAxis(spec.yAxis, yRange.range(), 5, 'yAxis');
  const styles = spec.series.map((s, k) => ({
    color: seriesColor(k, s.style?.color),
    line: s.style?.line ?? 'solid',
    marker: s.style?.marker ?? (s.yErr ? 'circle' : 'none'),
  }));
  const frame = buildFrame({
    width,
    height,
    ...(spec.title !== undefined ? { title: spec.title } : {}),
    xSpec: spec.xAxis,
    ySpec: spec.yAxis,
    x,
    y,
    legend: spec.series.map((s, k) => ({
      label: s.label,
      color: styles[k]!.color,
      dash: styles[k]!.line === 'none' ? 'none' : dashFor(styles[k]!.line),
      marker: styles[k]!.marker,
      swatch: 'line',
    })),
  });
  const { left, right, top, bottom } = frame;

  const data: string[] = [];
  spec.series.forEach((s, k) => {
    const style = styles[k]!;
    const segments: string[] = [];
    const errorBars: string[] = [];
    const markers: string[] = [];
    let penDown = false;
    for (let i = 0; i < s.y.length; i++) {
      const xv = s.x[i]!;
      const yv = s.y[i]!;
      if (!drawable(x, xv) || !drawable(y, yv)) {
        penDown = false; // a gap in the data is a gap in the line
        continue;
      }
      const sx = project(x, xv, left, right);
      const sy = project(y, yv, bottom, top);
      segments.push(`${penDown ? 'L' : 'M'}${px(sx)} ${px(sy)}`);
      penDown = true;
      if (s.yErr) {
        const err = Math.abs(s.yErr[i]!);
        if (err > 0 && Number.isFinite(err)) {
          const hi = project(y, yv + err, bottom, top);
          // On a log axis a bar reaching zero or below runs off the bottom of the plot.
          const lo = y.log && yv - err <= 0 ? bottom + 4 : project(y, yv - err, bottom, top);
          errorBars.push(
            `M${px(sx)} ${px(lo)}V${px(hi)}M${px(sx - 3)} ${px(hi)}H${px(sx + 3)}` +
              (y.log && yv - err <= 0 ? '' : `M${px(sx - 3)} ${px(lo)}H${px(sx + 3)}`),
          );
        }
      }
      if (style.marker !== 'none') markers.push(markerSvg(style.marker, sx, sy, style.color));
    }
    const parts: string[] = [`<g class="series-group" data-series="${k}">`];
    if (errorBars.length > 0) {
      parts.push(
        `<path class="error-bars" d="${errorBars.join('')}" fill="none" stroke="${style.color}" stroke-width="1"/>`,
      );
    }
    if (style.line !== 'none') {
      const dash = dashFor(style.line);
      parts.push(
        `<path class="series" data-series="${k}" d="${segments.join('') || `M${px(left)} ${px(bottom)}`}" fill="none" stroke="${style.color}" stroke-width="1.8" stroke-linejoin="round" stroke-linecap="round"${dash ? ` stroke-dasharray="${dash}"` : ''}/>`,
      );
    } else {
      // Markers only: keep an invisible path so every series still owns one path element.
      parts.push(`<path class="series" data-series="${k}" d="${segments.join('') || `M${px(left)} ${px(bottom)}`}" fill="none" stroke="none"/>`);
    }
    parts.push(...markers, '</g>');
    data.push(parts.join(''));
  });

  const out = openSvg(id, width, height, describe(spec.title, spec.xAxis, spec.yAxis));
  out.push(clipDefs(id, frame), ...frame.under);
  out.push(`<g clip-path="url(#${id}-clip)">`, ...markerLines(frame, x, y, spec.verticalMarkers, spec.horizontalMarkers), ...data, '</g>');
  if (xRange.range() === null || yRange.range() === null) {
    out.push(noteInPlot(frame, 'no finite data to show'));
  } else if (hiddenOnLog > 0) {
    out.push(noteInPlot(frame, `${hiddenOnLog} point${hiddenOnLog === 1 ? '' : 's'} \u2264 0 not shown on the log axis`));
  }
  out.push(...frame.over, '</svg>');
  return out.join('\n');
}

// ---------------------------------------------------------------------------------
// Histogram

/** Step histograms of one or more series over shared bin edges, as one `<svg>`. */
export function renderHistogramSvg(spec: HistogramSpec, options: SvgPlotOptions = {}): string {
  const id = safeId(options.idPrefix);
  const width = checkSize(spec.widthPx, DEFAULT_WIDTH_PX, 'widthPx', 200);
  const height = checkSize(spec.heightPx, DEFAULT_HEIGHT_PX, 'heightPx', 150);
  const edges = spec.binEdges;
  if (edges.length < 2) throw new RangeError(`binEdges: need at least 2 edges, got ${edges.length}`);
  for (let i = 0; i < edges.length; i++) {
    if (!Number.isFinite(edges[i]!)) throw new RangeError(`binEdges[${i}]: expected a finite number, got ${edges[i]}`);
    if (i > 0 && !(edges[i]! > edges[i - 1]!)) {
      throw new RangeError(`binEdges: must increase strictly, but binEdges[${i}] = ${edges[i]} follows ${edges[i - 1]}`);
    }
  }
  if (spec.xAxis.log === true && !(edges[0]! > 0)) {
    throw new RangeError(`xAxis.log: a log axis needs positive bin edges, but binEdges[0] = ${edges[0]}`);
  }
  const bins = edges.length - 1;
  const yLog = spec.yAxis.log === true;
  const yRange = new RangeAccumulator(yLog);
  if (!yLog) yRange.add(0); // bars stand on zero
  spec.series.forEach((s, k) => {
    if (s.counts.length !== bins) {
      throw new RangeError(`series[${k}] '${s.label}': ${s.counts.length} counts for ${bins} bins (binEdges has ${edges.length} entries)`);
    }
    for (let i = 0; i < bins; i++) yRange.add(s.counts[i]!);
  });
  // Headroom above the tallest bar, so that it does not merge into the frame.
  const tallest = yRange.range();
  if (tallest && tallest.max > 0 && spec.yAxis.max === undefined) yRange.add(tallest.max * (yLog ? 1.5 : 1.04));
  const x = layoutAxis(spec.xAxis, { min: edges[0]!, max: edges[bins]! }, 6, 'xAxis');
  const y = layoutAxis(spec.yAxis, yRange.range(), 5, 'yAxis');
  const colors = spec.series.map((s, k) => seriesColor(k, s.color));
  const frame = buildFrame({
    width,
    height,
    ...(spec.title !== undefined ? { title: spec.title } : {}),
    xSpec: spec.xAxis,
    ySpec: spec.yAxis,
    x,
    y,
    legend: spec.series.map((s, k) => ({ label: s.label, color: colors[k]!, dash: null, marker: 'none', swatch: 'box' })),
  });
  const { left, right, top, bottom } = frame;
  // Empty bins (or non-finite counts) drop to the bottom of the plot.
  const level = (count: number): number =>
    drawable(y, count) && count >= y.min ? project(y, count, bottom, top) : bottom;

  const data: string[] = [];
  spec.series.forEach((s, k) => {
    const color = colors[k]!;
    const x0 = project(x, edges[0]!, left, right);
    let outline = `M${px(x0)} ${px(bottom)}`;
    for (let i = 0; i < bins; i++) {
      const h = level(s.counts[i]!);
      outline += `V${px(h)}H${px(project(x, edges[i + 1]!, left, right))}`;
    }
    outline += `V${px(bottom)}`;
    data.push(
      `<g class="series-group" data-series="${k}">` +
        `<path class="series-fill" d="${outline}Z" fill="${color}" fill-opacity="0.16" stroke="none"/>` +
        `<path class="series" data-series="${k}" d="${outline}" fill="none" stroke="${color}" stroke-width="1.6" stroke-linejoin="miter"/>` +
        `</g>`,
    );
  });

  const out = openSvg(id, width, height, describe(spec.title, spec.xAxis, spec.yAxis));
  out.push(clipDefs(id, frame), ...frame.under, `<g clip-path="url(#${id}-clip)">`, ...data, '</g>');
  if (yRange.range() === null) out.push(noteInPlot(frame, 'no counts to show'));
  out.push(...frame.over, '</svg>');
  return out.join('\n');
}
