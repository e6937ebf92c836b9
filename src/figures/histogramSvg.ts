// Step histograms as SVG: one or more series over shared bin edges, each a translucent
// fill under its outline. Bars stand on zero (linear axis); empty bins drop to the bottom
// of a log axis.

import { buildFrame, clippedGroup, noteInPlot } from './plotFrame.js';
import { seriesColor } from './figurePalette.js';
import { openSvg, px, resolveIds } from './svgMarkup.js';
import { checkSize, describe, RangeAccumulator } from './linePlotSvg.js';
import type { HistogramSpec, SvgFigureOptions } from './plotSpec.js';

/** Step histograms of one or more series over shared bin edges, as one `<svg>`. */
export function renderHistogramSvg(spec: HistogramSpec, options: SvgFigureOptions = {}): string {
  const width = checkSize(spec.widthPx, 640, 'widthPx', 200);
  const height = checkSize(spec.heightPx, 380, 'heightPx', 150);
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
  if (!yLog) yRange.add(0);
  spec.series.forEach((s, k) => {
    if (s.counts.length !== bins) {
      throw new RangeError(`series[${k}] '${s.label}': ${s.counts.length} counts for ${bins} bins (binEdges has ${edges.length} entries)`);
    }
    for (let i = 0; i < bins; i++) yRange.add(s.counts[i]!);
  });
  // Headroom above the tallest bar, so that it does not merge into the frame.
  const tallest = yRange.range();
  if (tallest && tallest.max > 0 && spec.yAxis.max === undefined) yRange.add(tallest.max * (yLog ? 1.5 : 1.04));
  const colors = spec.series.map((s, k) => seriesColor(k, s.color));
  const frame = buildFrame({
    width,
    height,
    spec,
    xData: { min: edges[0]!, max: edges[bins]! },
    yData: yRange.range(),
    legend: spec.series.map((s, k) => ({ label: s.label, color: colors[k]!, dash: null, marker: 'none', swatch: 'box' })),
  });
  const { left, right, bottom, x, y } = frame;
  // Empty bins (or non-finite counts) drop to the bottom of the plot.
  const level = (count: number): number => {
    const p = y.map(count);
    return Number.isFinite(p) && count >= y.domain[0] ? p : bottom;
  };
  const xAt = (v: number): number => Math.min(right, Math.max(left, x.map(v)));

  const data: string[] = [];
  spec.series.forEach((s, k) => {
    const color = colors[k]!;
    let outline = `M${px(xAt(edges[0]!))} ${px(bottom)}`;
    for (let i = 0; i < bins; i++) outline += `V${px(level(s.counts[i]!))}H${px(xAt(edges[i + 1]!))}`;
    outline += `V${px(bottom)}`;
    data.push(
      `<g class="series-group" data-series="${k}">` +
        `<path class="series-fill" d="${outline}Z" fill="${color}" fill-opacity="0.16" stroke="none"/>` +
        `<path class="series" data-series="${k}" d="${outline}" fill="none" stroke="${color}" stroke-width="1.6" stroke-linejoin="miter"/>` +
        `</g>`,
    );
  });

  const out = openSvg({ width, height, title: describe(spec.title, spec.xAxis, spec.yAxis) });
  out.push(...frame.under, ...clippedGroup(data));
  if (yRange.range() === null) out.push(noteInPlot(frame, 'no counts to show'));
  out.push(...frame.over, '</svg>');
  return resolveIds(out.join('\n'), options.idPrefix);
}
