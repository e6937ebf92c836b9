// Line plots as SVG: series with optional markers, symmetric error bars and shaded bands
// (y +- band, drawn under the line in the series colour at 20 % opacity), linear or log
// axes, dashed reference lines with labels. Non-finite points, and non-positive ones on a
// log axis, break the line instead of being drawn (a note counts the hidden ones).
// Axis limits: the data range rounded to d3's nice values. A quantity whose values are all
// >= 0 keeps its axis at zero or above even when error bars reach below: a density axis
// running to -0.5 reads as if negative densities occurred (the bars are cut at the frame).

import { buildFrame, clippedGroup, markerSvg, noteInPlot, type DataRange, type Frame } from './plotFrame.js';
import { FIGURE_COLORS, seriesColor } from './figurePalette.js';
import { FIGURE_TEXT } from './figureStyle.js';
import { openSvg, px, resolveIds, svgText } from './svgMarkup.js';
import { axisTitle, type AxisSpec, type LinePlotSpec, type PlotMarker, type SeriesStyle, type SvgFigureOptions } from './plotSpec.js';
import type { Scale } from './scales.js';

const DEFAULT_WIDTH_PX = 640;
const DEFAULT_HEIGHT_PX = 380;

export function checkSize(value: number | undefined, fallback: number, name: string, least: number): number {
  if (value === undefined) return fallback;
  if (!Number.isFinite(value) || value < least || value > 4000) {
    throw new RangeError(`${name}: expected a number of pixels between ${least} and 4000, got ${value}`);
  }
  return value;
}

/** Running min/max of the values an axis must show (positive ones only for a log axis). */
export class RangeAccumulator {
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

export function dashFor(line: SeriesStyle['line']): string | null {
  if (line === 'dashed') return '6 4';
  if (line === 'dotted') return '1.5 3';
  return null;
}

export function describe(title: string | undefined, xSpec: AxisSpec, ySpec: AxisSpec): string {
  return title ?? `${axisTitle(ySpec)} against ${axisTitle(xSpec)}`;
}

function inDomain(scale: Scale, v: number): boolean {
  return Number.isFinite(scale.map(v)) && v >= scale.domain[0] && v <= scale.domain[1];
}

/** Dashed reference lines (shell radii, tolerances) with their labels. */
function markerLines(frame: Frame, vertical: PlotMarker[] | undefined, horizontal: PlotMarker[] | undefined): string[] {
  const out: string[] = [];
  const { left, right, top, bottom, x, y } = frame;
  const line = `stroke="${FIGURE_COLORS.marker}" stroke-width="1" stroke-dasharray="4 3"`;
  for (const m of vertical ?? []) {
    if (!inDomain(x, m.at)) continue;
    const mx = x.map(m.at);
    out.push(`<line class="marker-line" x1="${px(mx)}" y1="${px(top)}" x2="${px(mx)}" y2="${px(bottom)}" ${line}/>`);
    // Written upwards along the left side of the line, so that close markers do not collide.
    if (m.label) out.push(svgText(m.label, mx - 4, top + 6, { sizePx: FIGURE_TEXT.notePx, anchor: 'end', rotateDeg: -90, color: FIGURE_COLORS.mutedInk }));
  }
  for (const m of horizontal ?? []) {
    if (!inDomain(y, m.at)) continue;
    const my = y.map(m.at);
    out.push(`<line class="marker-line" x1="${px(left)}" y1="${px(my)}" x2="${px(right)}" y2="${px(my)}" ${line}/>`);
    if (m.label) out.push(svgText(m.label, right - 4, my - 4, { sizePx: FIGURE_TEXT.notePx, anchor: 'end', color: FIGURE_COLORS.mutedInk }));
  }
  return out;
}

/** A line plot as one `<svg>` element. Throws RangeError naming the bad field. */
export function renderLinePlotSvg(spec: LinePlotSpec, options: SvgFigureOptions = {}): string {
  const width = checkSize(spec.widthPx, DEFAULT_WIDTH_PX, 'widthPx', 200);
  const height = checkSize(spec.heightPx, DEFAULT_HEIGHT_PX, 'heightPx', 150);
  const xLog = spec.xAxis.log === true;
  const yLog = spec.yAxis.log === true;

  const xRange = new RangeAccumulator(xLog);
  const yRange = new RangeAccumulator(yLog);
  const yValues = new RangeAccumulator(yLog);
  let hiddenOnLog = 0;
  spec.series.forEach((s, k) => {
    if (s.x.length !== s.y.length) throw new RangeError(`series[${k}] '${s.label}': x has ${s.x.length} values but y has ${s.y.length}`);
    if (s.yErr && s.yErr.length !== s.y.length) throw new RangeError(`series[${k}] '${s.label}': yErr has ${s.yErr.length} values but y has ${s.y.length}`);
    if (s.band && s.band.length !== s.y.length) throw new RangeError(`series[${k}] '${s.label}': band has ${s.band.length} values but y has ${s.y.length}`);
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
      yValues.add(yv);
      const err = Math.max(s.yErr ? Math.abs(s.yErr[i]!) : 0, s.band ? Math.abs(s.band[i]!) : 0);
      if (err > 0 && Number.isFinite(err)) {
        yRange.add(yv + err);
        yRange.add(yv - err);
      }
    }
  });
  for (const m of spec.verticalMarkers ?? []) xRange.add(m.at);
  for (const m of spec.horizontalMarkers ?? []) {
    yRange.add(m.at);
    yValues.add(m.at);
  }
  let yData = yRange.range();
  const values = yValues.range();
  if (!yLog && yData && values && values.min >= 0 && yData.min < 0) yData = { min: 0, max: yData.max };

  const styles = spec.series.map((s, k) => ({
    color: seriesColor(k, s.style?.color),
    line: s.style?.line ?? 'solid',
    marker: s.style?.marker ?? (s.yErr ? 'circle' : 'none'),
  }));
  // Markers at the very ends of the x range would be cut in half by the frame.
  let xData = xRange.range();
  if (xData && !xLog && styles.some((st) => st.marker !== 'none') && xData.max > xData.min) {
    const margin = 0.02 * (xData.max - xData.min);
    xData = { min: xData.min - margin, max: xData.max + margin };
  }
  const frame = buildFrame({
    width,
    height,
    spec,
    xData,
    yData,
    legend: spec.series.map((s, k) => ({
      label: s.label,
      color: styles[k]!.color,
      dash: styles[k]!.line === 'none' ? 'none' : dashFor(styles[k]!.line),
      marker: styles[k]!.marker,
      swatch: 'line',
    })),
  });
  const { left, bottom, x, y } = frame;

  const data: string[] = [];
  spec.series.forEach((s, k) => {
    const style = styles[k]!;
    const segments: string[] = [];
    const errorBars: string[] = [];
    const markers: string[] = [];
    let penDown = false;
    for (let i = 0; i < s.y.length; i++) {
      const sx = x.map(s.x[i]!);
      const sy = y.map(s.y[i]!);
      if (!Number.isFinite(sx) || !Number.isFinite(sy)) {
        penDown = false; // a gap in the data is a gap in the line
        continue;
      }
      segments.push(`${penDown ? 'L' : 'M'}${px(sx)} ${px(sy)}`);
      penDown = true;
      if (s.yErr) {
        const err = Math.abs(s.yErr[i]!);
        const yv = s.y[i]!;
        if (err > 0 && Number.isFinite(err)) {
          const hi = y.map(yv + err);
          // On a log axis a bar reaching zero or below runs off the bottom of the plot.
          const runsOff = y.kind === 'log' && yv - err <= 0;
          const lo = runsOff ? bottom + 4 : y.map(yv - err);
          errorBars.push(`M${px(sx)} ${px(lo)}V${px(hi)}M${px(sx - 3)} ${px(hi)}H${px(sx + 3)}` + (runsOff ? '' : `M${px(sx - 3)} ${px(lo)}H${px(sx + 3)}`));
        }
      }
      if (style.marker !== 'none') markers.push(markerSvg(style.marker, sx, sy, style.color));
    }
    const d = segments.join('') || `M${px(left)} ${px(bottom)}`;
    const parts: string[] = [`<g class="series-group" data-series="${k}">`];
    if (s.band) {
      // One closed polygon per run of points with a finite line and band: upper edge out, lower edge back.
      const polygons: string[] = [];
      let run: Array<[number, number, number]> = [];
      const flush = () => {
        if (run.length >= 2) {
          const upper = run.map(([sx, hi], i) => `${i === 0 ? 'M' : 'L'}${px(sx)} ${px(hi)}`).join('');
          const lower = run.slice().reverse().map(([sx, , lo]) => `L${px(sx)} ${px(lo)}`).join('');
          polygons.push(`${upper}${lower}Z`);
        }
        run = [];
      };
      for (let i = 0; i < s.y.length; i++) {
        const yv = s.y[i]!;
        const half = Math.abs(s.band[i]!);
        const sx = x.map(s.x[i]!);
        const hi = y.map(yv + half);
        const lo = y.kind === 'log' && yv - half <= 0 ? bottom + 4 : y.map(yv - half);
        if (!Number.isFinite(sx) || !Number.isFinite(hi) || !Number.isFinite(lo)) flush();
        else run.push([sx, hi, lo]);
      }
      flush();
      if (polygons.length > 0) parts.push(`<path class="band" d="${polygons.join('')}" fill="${style.color}" fill-opacity="0.2" stroke="none"/>`);
    }
    if (errorBars.length > 0) parts.push(`<path class="error-bars" d="${errorBars.join('')}" fill="none" stroke="${style.color}" stroke-width="1"/>`);
    if (style.line !== 'none') {
      const dash = dashFor(style.line);
      parts.push(
        `<path class="series" data-series="${k}" d="${d}" fill="none" stroke="${style.color}" stroke-width="1.8" stroke-linejoin="round" stroke-linecap="round"${dash ? ` stroke-dasharray="${dash}"` : ''}/>`,
      );
    } else {
      // Markers only: keep an invisible path so every series still owns one path element.
      parts.push(`<path class="series" data-series="${k}" d="${d}" fill="none" stroke="none"/>`);
    }
    parts.push(...markers, '</g>');
    data.push(parts.join(''));
  });

  const out = openSvg({ width, height, title: describe(spec.title, spec.xAxis, spec.yAxis) });
  out.push(...frame.under, ...clippedGroup([...markerLines(frame, spec.verticalMarkers, spec.horizontalMarkers), ...data]));
  if (xRange.range() === null || yRange.range() === null) out.push(noteInPlot(frame, 'no finite data to show'));
  else if (hiddenOnLog > 0) out.push(noteInPlot(frame, `${hiddenOnLog} point${hiddenOnLog === 1 ? '' : 's'} \u2264 0 not shown on the log axis`));
  out.push(...frame.over, '</svg>');
  return resolveIds(out.join('\n'), options.idPrefix);
}

