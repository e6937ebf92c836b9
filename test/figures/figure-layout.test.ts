// Layout of every figure kind on awkward input (long titles and labels, many legend
// entries, very large and very small values, a flat strip, a big parameter grid): every
// piece of text lies inside the figure, and no two pieces of text overlap. Text boxes are
// measured two ways: by resvg drawing each <text> element with the figure font (the ink,
// an independent measurement), and from the layout's own metrics (advance widths,
// ascender and descender), which must be at least as large.

import { describe, expect, it } from 'vitest';
import { renderFieldMapSvg } from '../../src/figures/fieldMapSvg.js';
import { renderPhaseMapSvg } from '../../src/figures/phaseMapSvg.js';
import { renderLinePlotSvg } from '../../src/figures/linePlotSvg.js';
import { renderHistogramSvg } from '../../src/figures/histogramSvg.js';
import { sideBySideSvg } from '../../src/figures/composeSvg.js';
import { PhaseCode } from '../../src/figures/phasePalette.js';
import { ascentPx, descentPx, textWidthPx } from '../../src/figures/textMeasure.js';
import { inkBox, renderPixels, rootSize, textElements, texts, type Box } from './figureProbe.js';

function disc(nx: number, ny: number, peak: number): Float64Array {
  const v = new Float64Array(nx * ny);
  for (let x = 0; x < nx; x++) for (let y = 0; y < ny; y++) v[x * ny + y] = peak * Math.exp(-((x - nx / 2) ** 2 + (y - ny / 2) ** 2) / (0.1 * nx * ny));
  return v;
}

const longTitle = 'a scenario with a rather long name: condensate density |phi|² in the plane z = 22 after the ramp';
const phase = new Uint8Array(30 * 30).map((_, i) => [PhaseCode.superfluid, PhaseCode.mott, PhaseCode.boseGlass, PhaseCode.normalFluid, PhaseCode.empty][i % 5]!);
const filling = new Uint8Array(30 * 30).map((_, i) => 1 + (i % 7));

const figures: Record<string, string> = {
  'field map with scale bar': renderFieldMapSvg({
    values: disc(81, 81, 2),
    nx: 81,
    ny: 81,
    title: 'layer: density',
    xAxis: { label: 'x (µm)', origin: -20, step: 0.5 },
    yAxis: { label: 'y (µm)', origin: -20, step: 0.5 },
    colorBarLabel: 'atoms per site',
    scaleBar: { length: 10, label: '10 µm' },
  }),
  'field map, long title and large values': renderFieldMapSvg({ values: disc(40, 30, 3.2e7), nx: 40, ny: 30, title: longTitle, colorBarLabel: 'atoms per column, summed along the imaging axis' }),
  'field map, tiny residuals': renderFieldMapSvg({ values: disc(50, 50, 1.3e-10).map((v, i) => (i % 2 ? v : -v)), nx: 50, ny: 50, colorMap: 'rift', colorBarLabel: 'measured − model, atoms per pixel', xAxis: { label: 'x (µm)', origin: -1.2e5, step: 1e3 } }),
  'flat strip with a horizontal colour bar': renderFieldMapSvg({ values: Float64Array.from({ length: 200 * 3 }, (_, i) => i * 1e-4), nx: 200, ny: 3, title: 'chain', colorBarLabel: 'atoms per site', pixelsPerSite: 3 }),
  'parameter plane, one pixel per point': renderFieldMapSvg({
    values: disc(400, 400, 1.6),
    nx: 400,
    ny: 400,
    title: 'Mean-field phase map at k_B T = 0.1 U',
    xAxis: { label: 'zJ/U', origin: 0, step: 0.25 / 399 },
    yAxis: { label: 'mu/U', origin: -0.2, step: 3.2 / 399 },
    colorBarLabel: 'order parameter phi',
    pixelsPerSite: 1,
    overlays: [{ x: [0, 0.3], y: [-0.2, 3] }],
  }),
  'log colour scale': renderFieldMapSvg({ values: disc(64, 64, 7), nx: 64, ny: 64, colorScale: 'log', colorBarLabel: 'atoms per pixel' }),
  'phase map with every phase': renderPhaseMapSvg({ phase, filling: filling.map((f, i) => (phase[i] === PhaseCode.mott ? f : 0)), nx: 30, ny: 30, title: 'phases', scaleBar: { length: 5, label: '5 sites' } }),
  'line plot, long texts and many series': renderLinePlotSvg({
    title: longTitle,
    xAxis: { label: 'local chemical potential (mu − eps)/U, averaged over the annular bins of the profile', unit: 'U' },
    yAxis: { label: 'atoms per site, or the probability of an odd occupation for the parity column', unit: 'atoms' },
    series: Array.from({ length: 7 }, (_, k) => ({ label: `series number ${k} with a long legend label`, x: [0, 1e5, 2e5, 3e5], y: [k, k + 1e5, 2, 3].map((v) => v * 1e5) })),
    verticalMarkers: [{ at: 1.5e5, label: 'n=2 outer' }],
    horizontalMarkers: [{ at: 2e10, label: 'tolerance' }],
  }),
  'line plot, log axis, small size': renderLinePlotSvg({
    widthPx: 320,
    heightPx: 220,
    xAxis: { label: 'sweep' },
    yAxis: { label: 'max |delta phi| per sweep', log: true },
    series: [{ label: 'residual', x: [1, 2, 3, 4, 5, 6], y: [1, 1e-2, 1e-4, 1e-6, 1e-8, 1e-10], style: { marker: 'circle' } }],
    horizontalMarkers: [{ at: 1e-8, label: 'tolerance 1 × 10⁻⁸' }],
  }),
  histogram: renderHistogramSvg({
    title: 'Condensate density',
    binEdges: Array.from({ length: 31 }, (_, i) => i / 10),
    series: [{ label: 'condensate |phi|²', counts: Array.from({ length: 30 }, (_, i) => 10 ** -(i / 6)) }],
    xAxis: { label: '|phi|²', unit: 'atoms per site' },
    yAxis: { label: 'fraction of cloud sites', log: true },
    widthPx: 470,
  }),
};

/** The box the layout itself reserves for a <text> element. */
function layoutBox(el: string): Box {
  const size = Number(/font-size="([^"]+)"/.exec(el)![1]);
  const anchor = /text-anchor="([^"]+)"/.exec(el)?.[1] ?? 'start';
  const content = texts(el)[0]!;
  const w = textWidthPx(content, size);
  const rotated = /rotate\(-90\)/.test(el);
  const [x, y] = rotated
    ? /translate\(([^ ]+) ([^)]+)\)/.exec(el)!.slice(1).map(Number)
    : [Number(/\sx="([^"]+)"/.exec(el)![1]), Number(/\sy="([^"]+)"/.exec(el)![1])];
  const along = anchor === 'start' ? 0 : anchor === 'middle' ? -w / 2 : -w;
  if (!rotated) return { x: x! + along, y: y! - ascentPx(size), width: w, height: ascentPx(size) + descentPx(size) };
  // rotate(-90): the text runs upwards from (x, y); glyph tops point to -x.
  return { x: x! - ascentPx(size), y: y! - along - w, width: ascentPx(size) + descentPx(size), height: w };
}

const inside = (b: Box, w: number, h: number, slack: number): boolean => b.x >= -slack && b.y >= -slack && b.x + b.width <= w + slack && b.y + b.height <= h + slack;
const overlap = (a: Box, b: Box): boolean => a.x < b.x + b.width && b.x < a.x + a.width && a.y < b.y + b.height && b.y < a.y + a.height;

describe.each(Object.entries(figures))('%s', (_name, svg) => {
  const { width, height } = rootSize(svg);
  const elements = textElements(svg);

  it('has text, all inside the figure by resvg ink and by the layout metrics', () => {
    expect(elements.length).toBeGreaterThan(3);
    for (const el of elements) {
      const ink = inkBox(svg, el);
      if (ink) expect(inside(ink, width, height, 0.5), `${el} ink ${JSON.stringify(ink)} in ${width} x ${height}`).toBe(true);
      expect(inside(layoutBox(el), width, height, 0.5), `${el} layout box`).toBe(true);
    }
  });

  it('never overlaps two pieces of text (labels inside the plot area aside)', () => {
    // Marker-line labels and plot notes are drawn over the data on purpose; everything else
    // (titles, tick labels, axis titles, legends, colour-bar labels) must stand apart.
    const free = elements.filter((el) => !/fill="#5b6472"/.test(el) || /axis-note/.test(el));
    const boxes = free.map((el) => ({ el, box: inkBox(svg, el) })).filter((b): b is { el: string; box: Box } => b.box !== null);
    for (let i = 0; i < boxes.length; i++) {
      for (let j = i + 1; j < boxes.length; j++) {
        expect(overlap(boxes[i]!.box, boxes[j]!.box), `${boxes[i]!.el}\n overlaps\n${boxes[j]!.el}`).toBe(false);
      }
    }
  });

  it('renders to a PNG of its size', () => {
    const img = renderPixels(svg);
    expect([img.width, img.height]).toEqual([Math.round(width), Math.round(height)]);
  });
});

describe('side by side', () => {
  it('places the figures left to right with the gap, each keeping its size and texts', () => {
    const a = figures['field map with scale bar']!;
    const b = figures['log colour scale']!;
    const row = sideBySideSvg([a, b], 'two pictures', 16);
    const sa = rootSize(a);
    const sb = rootSize(b);
    expect(rootSize(row)).toEqual({ width: sa.width + 16 + sb.width, height: Math.max(sa.height, sb.height) });
    expect(row).toContain(`<svg x="${sa.width + 16}" y="0"`);
    expect(texts(row)).toEqual([...texts(a), ...texts(b)]);
    const img = renderPixels(row);
    expect(img.width).toBe(sa.width + 16 + sb.width);
    // The gap between the two is white page.
    expect(img.at(sa.width + 8, sa.height / 2)).toEqual([255, 255, 255]);
  });
});
