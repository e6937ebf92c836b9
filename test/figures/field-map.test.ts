// Heat maps and phase maps, read back from the PNG that resvg renders from their SVG.
// Conventions checked (DESIGN.md): field index x * ny + y, y drawn upwards; one integer
// block of pixels per site, so every site is a flat square of its colour (no smoothing).
// Colours are compared with the colour table built independently in the test from
// colorMaps.ts; exact equality holds because the image is drawn unscaled-by-interpolation
// (resvg's optimizeSpeed nearest-neighbour upscaling).

import { describe, expect, it } from 'vitest';
import { buildColorTable, colorMapLookup, missingValueRgb } from '../../src/figures/colorMaps.js';
import { COLOR_TABLE_ENTRIES } from '../../src/figures/fieldPixels.js';
import { renderFieldMapSvg } from '../../src/figures/fieldMapSvg.js';
import { renderPhaseMapSvg } from '../../src/figures/phaseMapSvg.js';
import { PhaseCode, phaseColor, phasePalette } from '../../src/figures/phasePalette.js';
import { elementBox, renderPixels, rootSize, texts } from './figureProbe.js';

const top = COLOR_TABLE_ENTRIES - 1;
function tableColor(name: string, k: number): number[] {
  const t = buildColorTable(name, COLOR_TABLE_ENTRIES);
  return [t[3 * k]!, t[3 * k + 1]!, t[3 * k + 2]!];
}
function mapEnd(name: string, at: 0 | 1): number[] {
  return colorMapLookup(name)(at).map((c) => Math.round(255 * c));
}

describe('field map', () => {
  const nx = 9;
  const ny = 7;

  it('draws a single hot site with the top colour, in the right place (y upwards), every site a flat square', () => {
    const field = new Float64Array(nx * ny);
    field[6 * ny + 2] = 1; // site x = 6, y = 2
    const svg = renderFieldMapSvg({ values: field, nx, ny, title: 'hot site', colorMap: 'ember' });
    const box = elementBox(svg, 'image', 'pixels');
    const k = box.width / nx;
    expect(Number.isInteger(k)).toBe(true);
    expect(box.height).toBe(ny * k);
    const img = renderPixels(svg);
    const hot = mapEnd('ember', 1);
    const cold = mapEnd('ember', 0);
    for (let x = 0; x < nx; x++) {
      for (let y = 0; y < ny; y++) {
        const expected = x === 6 && y === 2 ? hot : cold;
        const row = ny - 1 - y;
        // The corners and the centre of each site block: the same colour (no blending across site edges).
        for (const [dx, dy] of [[0, 0], [k - 1, k - 1], [k >> 1, k >> 1], [0, k - 1]]) {
          expect(img.at(box.x + x * k + dx!, box.y + row * k + dy!)).toEqual(expected);
        }
      }
    }
  });

  it('upscales small lattices to at least 420 px and draws NaN in neutral grey', () => {
    const field = new Float64Array(nx * ny).fill(0.5);
    field[0] = Number.NaN; // site (0, 0): bottom-left
    const svg = renderFieldMapSvg({ values: field, nx, ny });
    const box = elementBox(svg, 'image', 'pixels');
    expect(box.width).toBeGreaterThanOrEqual(420);
    const grey = missingValueRgb.map((c) => Math.round(255 * c));
    expect(renderPixels(svg).at(box.x + 1, box.y + box.height - 2)).toEqual(grey);
  });

  it("has a colour bar whose ends are the map's ends and whose lightness rises from bottom to top", () => {
    const field = Float64Array.from({ length: nx * ny }, (_, i) => i);
    const svg = renderFieldMapSvg({ values: field, nx, ny, colorMap: 'glacier', colorBarLabel: 'n (atoms/site)' });
    const cb = elementBox(svg, 'image', 'color-strip');
    expect(cb.height).toBeGreaterThan(cb.width);
    const img = renderPixels(svg);
    const cx = cb.x + cb.width / 2;
    expect(img.at(cx, cb.y)).toEqual(mapEnd('glacier', 1));
    expect(img.at(cx, cb.y + cb.height - 1)).toEqual(mapEnd('glacier', 0));
    const luma = (p: number[]): number => 0.2126 * p[0]! + 0.7152 * p[1]! + 0.0722 * p[2]!;
    let previous = -Infinity;
    let rises = 0;
    for (let y = cb.y + cb.height - 1; y >= cb.y; y--) {
      const l = luma(img.at(cx, y));
      expect(l).toBeGreaterThanOrEqual(previous);
      if (l > previous) rises++;
      previous = l;
    }
    expect(rises).toBeGreaterThan(100);
    // The bar's range is the data range, written on the bar.
    expect(svg).toContain('data-min="0" data-max="62"');
    expect(texts(svg)).toContain('n (atoms/site)');
  });

  it('puts a horizontal colour bar under a flat strip of sites, low values on the left', () => {
    const sx = 100;
    const sy = 4;
    const field = Float64Array.from({ length: sx * sy }, (_, i) => Math.floor(i / sy));
    const svg = renderFieldMapSvg({ values: field, nx: sx, ny: sy, colorBarLabel: 'n' });
    const box = elementBox(svg, 'image', 'pixels');
    const cb = elementBox(svg, 'image', 'color-strip');
    expect(cb.width).toBeGreaterThan(cb.height);
    expect(cb.y).toBeGreaterThan(box.y + box.height);
    const img = renderPixels(svg);
    const mid = cb.y + cb.height / 2;
    expect(img.at(cb.x, mid)).toEqual(mapEnd('ember', 0));
    expect(img.at(cb.x + cb.width - 1, mid)).toEqual(mapEnd('ember', 1));
  });

  it('clamps values outside a fixed range to the ends of the map', () => {
    const field = new Float64Array(nx * ny).fill(5);
    field[0] = -5;
    const svg = renderFieldMapSvg({ values: field, nx, ny, valueRange: { min: 0, max: 1 } });
    const box = elementBox(svg, 'image', 'pixels');
    const img = renderPixels(svg);
    expect(img.at(box.x + box.width - 1, box.y)).toEqual(tableColor('ember', top));
    expect(img.at(box.x, box.y + box.height - 1)).toEqual(tableColor('ember', 0));
  });

  it('draws overlays in axis coordinates (origin and step), clipped to the image', () => {
    const field = new Float64Array(nx * ny);
    // Axis: site i at -4 + 0.5 i (µm). A horizontal line at y = -1.5 µm runs through the centre of site row y = 5.
    const svg = renderFieldMapSvg({
      values: field,
      nx,
      ny,
      xAxis: { label: 'x (µm)', origin: -4, step: 0.5 },
      yAxis: { label: 'y (µm)', origin: -4, step: 0.5 },
      overlays: [{ x: [-10, 10], y: [-1.5, -1.5], color: [255, 0, 255], widthPx: 2, casing: false }],
    });
    const box = elementBox(svg, 'image', 'pixels');
    const k = box.width / nx;
    const rowCentre = box.y + (ny - 1 - 5) * k + k / 2;
    const img = renderPixels(svg);
    expect(img.at(box.x + 3 * k, rowCentre)).toEqual([255, 0, 255]);
    expect(img.at(box.x + 3 * k, rowCentre + 4)).not.toEqual([255, 0, 255]);
    // The line runs from x = -10 to 10 µm but stops at the image's frame.
    expect(img.at(box.x - 3, rowCentre)).not.toEqual([255, 0, 255]);
  });

  it('uses a symmetric range for the diverging map, and zero as the low end of a non-negative field', () => {
    const residual = Float64Array.from({ length: nx * ny }, (_, i) => (i - 10) * 1e-3);
    const svg = renderFieldMapSvg({ values: residual, nx, ny, colorMap: 'rift' });
    const [min, max] = /data-min="([^"]+)" data-max="([^"]+)"/.exec(svg)!.slice(1).map(Number);
    expect(min).toBe(-max!);
    expect(max).toBeCloseTo(0.052, 12);
    const density = Float64Array.from({ length: nx * ny }, (_, i) => 1e-6 + i / 10);
    expect(renderFieldMapSvg({ values: density, nx, ny })).toContain('data-min="0" data-max="6.200001"');
  });

  it('log colour scale: decades equally spaced on the bar, values at or below the bottom at the low end', () => {
    const field = Float64Array.from({ length: nx * ny }, (_, i) => 10 ** (-(i % 7)));
    const svg = renderFieldMapSvg({ values: field, nx, ny, colorScale: 'log', logDecades: 3, colorBarLabel: 'atoms per pixel' });
    expect(svg).toContain('data-min="0.001" data-max="1" data-scale="log"');
    const ticks = [...svg.matchAll(/<line class="tick" data-axis="color" data-value="([^"]+)" x1="[^"]+" y1="([^"]+)"/g)].map((m) => ({ v: Number(m[1]), y: Number(m[2]) }));
    expect(ticks.map((t) => t.v)).toEqual([0.001, 0.01, 0.1, 1]);
    const gap = ticks[1]!.y - ticks[0]!.y;
    for (let i = 2; i < ticks.length; i++) expect(Math.abs(ticks[i]!.y - ticks[i - 1]!.y - gap)).toBeLessThan(0.011);
    expect(texts(svg)).toEqual(expect.arrayContaining(['10\u207B\u00B3', '10\u207B\u00B2', '10\u207B\u00B9', '10\u2070']));
  });

  it('a scale bar of the given length in axis units, light on a dark image', () => {
    const field = new Float64Array(40 * 40);
    const svg = renderFieldMapSvg({ values: field, nx: 40, ny: 40, xAxis: { label: 'x (µm)', step: 0.5 }, scaleBar: { length: 5, label: '5 µm' } });
    const box = elementBox(svg, 'image', 'pixels');
    const bar = /<g class="scale-bar"[^>]*>\n?<rect[^>]*>\n?<rect x="([^"]+)" y="[^"]+" width="([^"]+)" height="4" fill="([^"]+)"/.exec(svg)!;
    // 5 µm of a 20 µm wide image.
    expect(Number(bar[2])).toBeCloseTo(box.width / 4, 6);
    expect(bar[3]).toBe('#ffffff');
    expect(texts(svg)).toContain('5 µm');
    // A flat strip (a chain from above) has no room for the bar: none is drawn, the axis carries the scale.
    const strip = renderFieldMapSvg({ values: new Float64Array(120 * 4), nx: 120, ny: 4, xAxis: { label: 'x (µm)', step: 0.5 }, scaleBar: { length: 5, label: '5 µm' } });
    expect(strip).not.toContain('scale-bar');
  });

  it('keeps a 512 x 512 field cheap: one embedded image, one pixel per site, a small SVG', () => {
    const field = Float64Array.from({ length: 512 * 512 }, (_, i) => Math.sin(i / 999));
    const svg = renderFieldMapSvg({ values: field, nx: 512, ny: 512, title: 'large' });
    expect(elementBox(svg, 'image', 'pixels').width).toBe(512);
    expect(svg.match(/<image /g)).toHaveLength(2); // the field and the colour strip
    expect(svg.length).toBeLessThan(2_000_000);
    const img = renderPixels(svg);
    expect(img.at(0, 0)).toEqual([255, 255, 255]); // the page around the figure stays white
  });

  it('explains bad input', () => {
    expect(() => renderFieldMapSvg({ values: new Float64Array(10), nx: 3, ny: 3 })).toThrow(/expected nx \* ny = 9 values, got 10/);
    expect(() => renderFieldMapSvg({ values: new Float64Array(9), nx: 3, ny: 3, xAxis: { step: 0 } })).toThrow(/xAxis.step/);
    expect(() => renderFieldMapSvg({ values: new Float64Array(9), nx: 3, ny: 3, colorMap: 'jet' })).toThrow(/colorMap: 'jet' is unknown/);
    expect(() => renderFieldMapSvg({ values: new Float64Array(9), nx: 3, ny: 3, colorScale: 'log', valueRange: { min: 0, max: 1 } })).toThrow(/log colour scale needs min > 0/);
  });
});

describe('phase map', () => {
  const nx = 12;
  const ny = 10;
  const phase = new Uint8Array(nx * ny);
  const filling = new Uint8Array(nx * ny);
  for (let x = 0; x < nx; x++) {
    for (let y = 0; y < ny; y++) {
      const r = Math.hypot(x - 5.5, y - 4.5);
      const i = x * ny + y;
      if (r < 2) [phase[i], filling[i]] = [PhaseCode.mott, 2];
      else if (r < 3) phase[i] = PhaseCode.superfluid;
      else if (r < 5) [phase[i], filling[i]] = [PhaseCode.mott, 1];
    }
  }

  it('paints each site with its phase colour and lists the phases present in the legend, in words the tables use', () => {
    const svg = renderPhaseMapSvg({ phase, filling, nx, ny, title: 'phases' });
    const box = elementBox(svg, 'image', 'pixels');
    const k = box.width / nx;
    const img = renderPixels(svg);
    for (let x = 0; x < nx; x++) {
      for (let y = 0; y < ny; y++) {
        const i = x * ny + y;
        expect(img.at(box.x + x * k + k / 2, box.y + (ny - 1 - y) * k + k / 2)).toEqual([...phaseColor(phase[i]!, filling[i]!)]);
      }
    }
    const hex = (c: readonly number[]): string => `#${c.map((v) => v.toString(16).padStart(2, '0')).join('')}`;
    const swatches = [...svg.matchAll(/<g class="legend-entry"><rect [^>]*fill="(#[0-9a-f]{6})"/g)].map((m) => m[1]);
    expect(swatches).toEqual([phasePalette.superfluid, phasePalette.mottShells[0], phasePalette.mottShells[1], phasePalette.empty].map(hex));
    const words = texts(svg);
    expect(words).toEqual(expect.arrayContaining(['superfluid', 'Mott insulator, n = 1', 'Mott insulator, n = 2', 'empty']));
    expect(words).not.toContain('vacuum');
    expect(swatches).not.toContain(hex(phasePalette.boseGlass));
  });

  it('names the site of a bad code or filling', () => {
    const bad = phase.slice();
    bad[3 * ny + 4] = 9;
    expect(() => renderPhaseMapSvg({ phase: bad, filling, nx, ny })).toThrow(/site \(x = 3, y = 4\) has unknown phase code 9/);
    const badFill = filling.slice();
    badFill[5 * ny + 4] = 0;
    expect(() => renderPhaseMapSvg({ phase, filling: badFill, nx, ny })).toThrow(/Mott site \(x = 5, y = 4\) has filling 0/);
  });

  it('renders to a PNG of the SVG size', () => {
    const svg = renderPhaseMapSvg({ phase, filling, nx, ny });
    const { width, height } = rootSize(svg);
    const img = renderPixels(svg);
    expect([img.width, img.height]).toEqual([width, height]);
  });
});
