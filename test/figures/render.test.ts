// Rendering primitives and figures. External references:
//   - Geometry: a stroke of width w and length L with round caps covers L w + pi w^2 / 4.
//   - P. S. Heckbert, "Nice numbers for graph labels", Graphics Gems (1990): ticks at
//     1, 2, 5 x 10^k; the cases below are worked by hand from that rule.
//   - Log axes: equal distances for equal ratios (log10(10) is halfway between 1 and 100).
//   - Figure conventions are those of DESIGN.md: field index (x * ny + y), y drawn upwards.

import { describe, expect, it } from 'vitest';
import { fontCellRows, fontHasGlyph, glyphFor, measureText } from '../../src/figures/bitmapFont.js';
import { buildColorTable, missingValueRgb } from '../../src/figures/colorMaps.js';
import { renderFieldFigure, renderPhaseMapFigure } from '../../src/figures/fieldFigure.js';
import { renderLinePlot, seriesColors } from '../../src/figures/linePlotFigure.js';
import { formatTicks, logTicks, looseTicks, niceNumber, niceTicks, superscriptInteger } from '../../src/figures/niceTicks.js';
import { PhaseCode, phaseColor, phasePalette } from '../../src/figures/phasePalette.js';
import { Raster, type Rgb8, type RgbaImage } from '../../src/figures/raster.js';

function pixel(img: RgbaImage, x: number, y: number): number[] {
  const i = (y * img.width + x) * 4;
  return [img.data[i], img.data[i + 1], img.data[i + 2]];
}

function tableColor(table: Uint8Array, k: number): number[] {
  return [table[3 * k], table[3 * k + 1], table[3 * k + 2]];
}

/** Ink coverage of a black-on-white drawing: sum over pixels of (255 - red) / 255. */
function inkCoverage(r: Raster): number {
  let sum = 0;
  for (let i = 0; i < r.width * r.height; i++) sum += (255 - r.data[4 * i]) / 255;
  return sum;
}

describe('Raster', () => {
  it('a horizontal line of width 3 covers exactly 3 rows and the area of a round-capped stroke', () => {
    const r = new Raster(140, 40);
    r.line(20, 20.5, 120, 20.5, { color: [0, 0, 0], widthPx: 3 });
    for (let x = 22; x < 118; x++) {
      expect(pixel(r, x, 18)).toEqual([255, 255, 255]);
      for (const y of [19, 20, 21]) expect(pixel(r, x, y)).toEqual([0, 0, 0]);
      expect(pixel(r, x, 22)).toEqual([255, 255, 255]);
    }
    // L w + pi w^2 / 4 = 100 * 3 + 7.07; 2 % for the coverage estimate and 8-bit rounding.
    expect(inkCoverage(r)).toBeGreaterThan(0.98 * 307.07);
    expect(inkCoverage(r)).toBeLessThan(1.02 * 307.07);
  });

  it('an oblique anti-aliased line covers the same area', () => {
    const r = new Raster(160, 160);
    const len = 120;
    const angle = (31 * Math.PI) / 180;
    r.line(20, 20, 20 + len * Math.cos(angle), 20 + len * Math.sin(angle), { color: [0, 0, 0], widthPx: 2 });
    const expected = len * 2 + Math.PI; // L w + pi w^2 / 4
    expect(Math.abs(inkCoverage(r) / expected - 1)).toBeLessThan(0.03);
  });

  it('a polyline paints shared joints once (no darker spot at vertices)', () => {
    const r = new Raster(60, 60);
    r.polyline([10, 30, 50], [30.5, 30.5, 30.5], { color: [0, 0, 0], widthPx: 1, alpha: 0.5 });
    expect(pixel(r, 30, 30)).toEqual(pixel(r, 20, 30));
  });

  it('NaN lifts the pen', () => {
    const r = new Raster(60, 20);
    r.polyline([5, 25, Number.NaN, 35, 55], [10.5, 10.5, 10.5, 10.5, 10.5], { color: [0, 0, 0], widthPx: 1 });
    expect(pixel(r, 15, 10)).toEqual([0, 0, 0]);
    expect(pixel(r, 30, 10)).toEqual([255, 255, 255]);
    expect(pixel(r, 45, 10)).toEqual([0, 0, 0]);
  });

  it('text puts ink inside its box and nowhere else, for both orientations', () => {
    for (const rotation of [0, 90] as const) {
      const r = new Raster(200, 200);
      const box = r.text('y (µm) 10⁻³', 100, 100, { rotation, anchor: 'middle', baseline: 'middle', scale: 2 });
      let inside = 0;
      let outside = 0;
      for (let y = 0; y < 200; y++) {
        for (let x = 0; x < 200; x++) {
          if (pixel(r, x, y)[0] === 255) continue;
          const within = x >= box.x && x < box.x + box.width && y >= box.y && y < box.y + box.height;
          if (within) inside++;
          else outside++;
        }
      }
      expect(inside).toBeGreaterThan(50);
      expect(outside).toBe(0);
      const metrics = measureText('y (µm) 10⁻³', 2);
      expect(rotation === 0 ? box.width : box.height).toBe(metrics.widthPx);
    }
  });

  it('rotated text is the unrotated text turned a quarter counter-clockwise', () => {
    const a = new Raster(80, 80);
    const b = new Raster(80, 80);
    a.text('Tq5', 10, 10, { baseline: 'top' });
    b.text('Tq5', 10, 70, { baseline: 'top', rotation: 90 });
    // Unrotated pixel (10 + u, 10 + v) must appear at (10 + v, 70 - 1 - u).
    for (let u = 0; u < 30; u++) {
      for (let v = 0; v < fontCellRows; v++) expect(pixel(b, 10 + v, 69 - u)).toEqual(pixel(a, 10 + u, 10 + v));
    }
  });

  it('blitScaled turns each source pixel into a k x k block', () => {
    const src = new Raster(2, 2);
    src.fillRect(1, 0, 1, 1, [200, 10, 10]);
    const r = new Raster(10, 10);
    r.blitScaled(src, 2, 3, 3);
    for (let y = 3; y < 6; y++) for (let x = 5; x < 8; x++) expect(pixel(r, x, y)).toEqual([200, 10, 10]);
    expect(pixel(r, 4, 3)).toEqual([255, 255, 255]);
    expect(pixel(r, 5, 6)).toEqual([255, 255, 255]);
  });
});

describe('bitmap font', () => {
  it('has its own glyph for printable ASCII and the physics symbols', () => {
    for (let c = 32; c <= 126; c++) expect(fontHasGlyph(String.fromCharCode(c)), String.fromCharCode(c)).toBe(true);
    for (const s of ['µ', 'μ', '²', '³', '·', '°', '±', '×', '−', 'ħ', 'λ', 'φ', 'Δ', '≥', '⁻', '⁰', '⁹']) {
      expect(fontHasGlyph(s), s).toBe(true);
    }
    expect(fontHasGlyph('€')).toBe(false);
  });

  it('gives every printable ASCII character a distinct bitmap (0 and O, 1 and l, ...)', () => {
    const seen = new Map<string, string>();
    for (let c = 33; c <= 126; c++) {
      const g = glyphFor(String.fromCharCode(c));
      const key = `${g.width}:${g.bits.join('')}`;
      expect(seen.get(key), `${String.fromCharCode(c)} looks like ${seen.get(key)}`).toBeUndefined();
      seen.set(key, String.fromCharCode(c));
    }
  });

  it('measures width as the sum of glyph widths plus one gap per neighbour pair, scaled', () => {
    const w = glyphFor('A').width + glyphFor('b').width + 1;
    expect(measureText('Ab', 1).widthPx).toBe(w);
    expect(measureText('Ab', 3).widthPx).toBe(3 * w);
    expect(measureText('Ab', 3).heightPx).toBe(3 * fontCellRows);
    expect(() => measureText('Ab', 1.5)).toThrow(/integer >= 1/);
  });
});

describe('nice ticks (Heckbert 1990)', () => {
  it('rounds to 1, 2, 5 x 10^k', () => {
    // 0.54: mantissa 5.4 lies in [3, 7) -> 5 -> 0.5; 1.4 -> 1; 2.9 -> 2; 7.2 -> 10.
    expect(niceNumber(0.54, true)).toBe(0.5);
    expect(niceNumber(1.4, true)).toBe(1);
    expect(niceNumber(290, true)).toBe(200);
    expect(niceNumber(7.2e-3, true)).toBe(0.01);
    // Ceiling variant: smallest of 1, 2, 5, 10 not below the mantissa.
    expect(niceNumber(2.1, false)).toBe(5);
    expect(niceNumber(0.9, false)).toBe(1);
  });

  it('ticks a fixed range at the nice step (hand-worked cases)', () => {
    // [0, 1], 6 ticks: step nice(1/5 = 0.2) = 0.2 -> 0, 0.2, ..., 1.
    expect(niceTicks(0, 1, 6).values).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    // [0.0047, 2.586], 6 ticks: step nice(0.516) = 0.5 -> 0.5 .. 2.5.
    expect(niceTicks(0.0047, 2.586, 6).values).toEqual([0.5, 1, 1.5, 2, 2.5]);
    // [-10.6, 10.6] (an image 40 sites of 0.532 µm), 5 ticks: nice(5.3) = 5.
    expect(niceTicks(-10.64, 10.64, 5).values).toEqual([-10, -5, 0, 5, 10]);
    // Decimal steps land on exact decimals (3 x 0.1 is 0.3, not 0.30000000000000004).
    expect(niceTicks(0, 1, 11).values[3]).toBe(0.3);
  });

  it('loose labelling widens the range to whole ticks', () => {
    // [-0.13, 2.6], 6 ticks: step nice(0.546) = 0.5; floor(-0.26) = -1 -> -0.5; ceil(5.2) = 6 -> 3.
    expect(looseTicks(-0.13, 2.6, 6).values).toEqual([-0.5, 0, 0.5, 1, 1.5, 2, 2.5, 3]);
  });

  it('formats labels with the decimals of the step, a true minus and a common power of ten', () => {
    expect(formatTicks(niceTicks(-1, 1, 5)).labels).toEqual(['\u22121.0', '\u22120.5', '0.0', '0.5', '1.0']);
    const small = formatTicks(niceTicks(0, 4e-4, 5)); // step 1e-4
    expect(small.multiplierLabel).toBe('\u00d710\u207b\u2074');
    expect(small.labels).toEqual(['0', '1', '2', '3', '4']);
    expect(superscriptInteger(-12)).toBe('\u207b\u00b9\u00b2');
  });

  it('ticks a log axis at decades, adding 2 and 5 over short ranges', () => {
    const wide = logTicks(1e-4, 10);
    expect(wide.major).toEqual([1e-4, 1e-3, 1e-2, 0.1, 1, 10]);
    expect(wide.labels[0]).toBe('10\u207b\u2074');
    expect(wide.minor).toContain(0.002);
    const short = logTicks(1, 20);
    expect(short.major).toEqual([1, 2, 5, 10, 20]);
    expect(short.labels).toEqual(['1', '2', '5', '10', '20']);
  });
});

describe('field figure', () => {
  const nx = 9;
  const ny = 7;

  it('draws a single hot site with the top colour, in the right place (y upwards)', () => {
    const field = new Float64Array(nx * ny);
    field[6 * ny + 2] = 1; // site x = 6, y = 2
    const fig = renderFieldFigure(field, nx, ny, { title: 'hot site', colorMap: 'ember' });
    const { imageBox: box, pixelsPerSite: k, valueMin, valueMax } = fig.layout;
    expect(valueMin).toBe(0);
    expect(valueMax).toBe(1);
    const table = buildColorTable('ember');
    const hot = tableColor(table, 255);
    const cold = tableColor(table, 0);
    for (let x = 0; x < nx; x++) {
      for (let y = 0; y < ny; y++) {
        const expected = x === 6 && y === 2 ? hot : cold;
        const row = ny - 1 - y; // y grows upwards
        for (const [dx, dy] of [[0, 0], [k - 1, k - 1], [k >> 1, 0]]) {
          expect(pixel(fig, box.x + x * k + dx, box.y + row * k + dy)).toEqual(expected);
        }
      }
    }
  });

  it('upscales small lattices to at least 400 px and draws NaN in neutral grey', () => {
    const field = new Float64Array(nx * ny).fill(0.5);
    field[0] = Number.NaN; // site (0, 0): bottom-left
    const fig = renderFieldFigure(field, nx, ny);
    const { imageBox: box, pixelsPerSite: k } = fig.layout;
    expect(box.width).toBeGreaterThanOrEqual(400);
    expect(box.width).toBe(nx * k);
    const grey = missingValueRgb.map((c) => Math.round(255 * c));
    expect(pixel(fig, box.x + 1, box.y + box.height - 2)).toEqual(grey);
  });

  it('has a colour bar whose lightness rises monotonically from bottom to top', () => {
    const field = Float64Array.from({ length: nx * ny }, (_, i) => i);
    const fig = renderFieldFigure(field, nx, ny, { colorMap: 'glacier', colorBarLabel: 'n (atoms/site)' });
    const cb = fig.layout.colorBarBox!;
    const cx = cb.x + (cb.width >> 1);
    const luma = (p: number[]): number => 0.2126 * p[0] + 0.7152 * p[1] + 0.0722 * p[2];
    let previous = -Infinity;
    let rises = 0;
    for (let y = cb.y + cb.height - 1; y >= cb.y; y--) {
      const l = luma(pixel(fig, cx, y));
      expect(l).toBeGreaterThanOrEqual(previous);
      if (l > previous) rises++;
      previous = l;
    }
    expect(rises).toBeGreaterThan(100);
    const table = buildColorTable('glacier');
    expect(pixel(fig, cx, cb.y)).toEqual(tableColor(table, 255));
    expect(pixel(fig, cx, cb.y + cb.height - 1)).toEqual(tableColor(table, 0));
  });

  it('puts a horizontal colour bar under a flat strip of sites, low values on the left', () => {
    const sx = 100;
    const sy = 4;
    const field = Float64Array.from({ length: sx * sy }, (_, i) => Math.floor(i / sy));
    const fig = renderFieldFigure(field, sx, sy, { colorBarLabel: 'n' });
    const { imageBox: box, colorBarBox: cb } = fig.layout;
    expect(cb!.width).toBeGreaterThan(cb!.height);
    expect(cb!.y).toBeGreaterThan(box.y + box.height);
    const table = buildColorTable('ember');
    const mid = cb!.y + (cb!.height >> 1);
    expect(pixel(fig, cb!.x, mid)).toEqual(tableColor(table, 0));
    expect(pixel(fig, cb!.x + cb!.width - 1, mid)).toEqual(tableColor(table, 255));
  });

  it('clamps values outside a fixed range to the ends of the map', () => {
    const field = new Float64Array(nx * ny).fill(5);
    field[0] = -5;
    const fig = renderFieldFigure(field, nx, ny, { valueRange: { min: 0, max: 1 } });
    const { imageBox: box } = fig.layout;
    const table = buildColorTable('ember');
    expect(pixel(fig, box.x + box.width - 1, box.y)).toEqual(tableColor(table, 255));
    expect(pixel(fig, box.x, box.y + box.height - 1)).toEqual(tableColor(table, 0));
  });

  it('draws overlays in axis coordinates (origin and step)', () => {
    const field = new Float64Array(nx * ny);
    // Axis: site i at -4 + 0.5 i (µm). A horizontal line at y = -1.5 µm lies on site row y = 5.
    const fig = renderFieldFigure(field, nx, ny, {
      xAxis: { label: 'x (µm)', origin: -4, step: 0.5 },
      yAxis: { label: 'y (µm)', origin: -4, step: 0.5 },
      overlays: [{ x: [-10, 10], y: [-1.5, -1.5], color: [255, 0, 255], widthPx: 2, casing: false }],
    });
    const { imageBox: box, pixelsPerSite: k } = fig.layout;
    const rowCentre = box.y + (ny - 1 - 5) * k + k / 2; // continuous y of the site centre
    expect(pixel(fig, box.x + 3 * k, Math.floor(rowCentre))).toEqual([255, 0, 255]);
    expect(pixel(fig, box.x + 3 * k, Math.floor(rowCentre) + 3)).not.toEqual([255, 0, 255]);
  });

  it('uses a symmetric range for the diverging map', () => {
    const field = Float64Array.from({ length: nx * ny }, (_, i) => (i - 10) * 1e-3);
    const fig = renderFieldFigure(field, nx, ny, { colorMap: 'rift' });
    expect(fig.layout.valueMin).toBe(-fig.layout.valueMax);
  });

  it('explains bad input', () => {
    expect(() => renderFieldFigure(new Float64Array(10), 3, 3)).toThrow(/expected nx \* ny = 9 values, got 10/);
    expect(() => renderFieldFigure(new Float64Array(9), 3, 3, { xAxis: { step: 0 } })).toThrow(/xAxis.step/);
    expect(() => renderFieldFigure(new Float64Array(9), 3, 3, { colorMap: 'jet' })).toThrow(/colorMap: 'jet' is unknown/);
  });
});

describe('phase map figure', () => {
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

  it('paints each site with its phase colour and lists the phases in a legend', () => {
    const fig = renderPhaseMapFigure(phase, filling, nx, ny, { title: 'phases' });
    const { imageBox: box, pixelsPerSite: k, legendBox } = fig.layout;
    for (let x = 0; x < nx; x++) {
      for (let y = 0; y < ny; y++) {
        const i = x * ny + y;
        const expected = [...phaseColor(phase[i], filling[i])];
        expect(pixel(fig, box.x + x * k + (k >> 1), box.y + (ny - 1 - y) * k + (k >> 1))).toEqual(expected);
      }
    }
    // Every phase present has a swatch in the legend; absent ones (Bose glass) do not.
    const legendColors = new Set<string>();
    for (let y = legendBox!.y; y < legendBox!.y + legendBox!.height; y++) {
      for (let x = legendBox!.x; x < legendBox!.x + legendBox!.width; x++) legendColors.add(pixel(fig, x, y).join(','));
    }
    for (const c of [phasePalette.superfluid, phasePalette.mottShells[0], phasePalette.mottShells[1], phasePalette.empty]) {
      expect(legendColors.has(c.join(','))).toBe(true);
    }
    expect(legendColors.has(phasePalette.boseGlass.join(','))).toBe(false);
  });

  it('names the site of a bad code or filling', () => {
    const bad = phase.slice();
    bad[3 * ny + 4] = 9;
    expect(() => renderPhaseMapFigure(bad, filling, nx, ny)).toThrow(/site \(x = 3, y = 4\) has unknown phase code 9/);
    const badFill = filling.slice();
    badFill[5 * ny + 4] = 0; // a Mott site at the centre
    expect(() => renderPhaseMapFigure(phase, badFill, nx, ny)).toThrow(/Mott site \(x = 5, y = 4\) has filling 0/);
  });
});

describe('line plot', () => {
  it('places data points at their axis coordinates', () => {
    const x = [0, 0.25, 0.5, 0.75, 1];
    const fig = renderLinePlot([{ label: 'y = 2x', x, y: x.map((v) => 2 * v), line: 'none', marker: 'square' }], {
      xLabel: 'x',
      yLabel: 'y',
      xRange: { min: 0, max: 1 },
      yRange: { min: 0, max: 2 },
      legend: 'none',
    });
    const { plotBox: p } = fig.layout;
    const px = Math.round(p.x + 0.5 * p.width);
    const py = Math.round(p.y + p.height - (1 / 2) * p.height);
    expect(pixel(fig, px, py)).toEqual([...seriesColors[0]]);
  });

  it('maps a log axis by ratios: 10 sits halfway between 1 and 100', () => {
    const fig = renderLinePlot([{ x: [0, 1], y: [1, 100], line: 'none', marker: 'none' }, { x: [0.5], y: [10], marker: 'square', line: 'none', color: [0, 200, 0] }], {
      logY: true,
      legend: 'none',
    });
    const { plotBox: p, yMin, yMax } = fig.layout;
    expect([yMin, yMax]).toEqual([1, 100]);
    const midY = Math.round(p.y + p.height / 2);
    const midX = Math.round(p.x + p.width / 2);
    expect(pixel(fig, midX, midY)).toEqual([0, 200, 0]);
  });

  it('puts the automatic legend in a corner free of data, lines included', () => {
    // Points crowd the top; the legend must go to the bottom.
    const x = Array.from({ length: 50 }, (_, i) => i / 49);
    const crowded = renderLinePlot([{ label: 'near the top', x, y: x.map((v) => 1.1 + 0.05 * Math.cos(2 * Math.PI * v)) }], {
      yRange: { min: 0, max: 1.2 },
    });
    const p1 = crowded.layout.plotBox;
    expect(crowded.layout.legendBox!.y).toBeGreaterThan(p1.y + p1.height / 2);
    // A single segment whose end points lie outside the x range still crosses both top corners.
    const segment = renderLinePlot([{ label: 'one segment', x: [0, 1], y: [1.15, 1.15] }], {
      xRange: { min: 0.1, max: 0.9 },
      yRange: { min: 0, max: 1.2 },
    });
    const p2 = segment.layout.plotBox;
    expect(segment.layout.legendBox!.y).toBeGreaterThan(p2.y + p2.height / 2);
  });

  it('explains bad input', () => {
    expect(() => renderLinePlot([{ x: [1, 2], y: [1] }])).toThrow(/x has 2 points but y has 1/);
    expect(() => renderLinePlot([{ x: [1], y: [1] }], { logY: true, yRange: { min: 0, max: 1 } })).toThrow(/log axis needs min > 0/);
  });
});

describe('large lattices', () => {
  it('renders a 512 x 512 field at one pixel per site', () => {
    const field = Float64Array.from({ length: 512 * 512 }, (_, i) => Math.sin(i / 999));
    const fig = renderFieldFigure(field, 512, 512, { title: 'large' });
    expect(fig.layout.pixelsPerSite).toBe(1);
    const colour: Rgb8 = [fig.data[0], fig.data[1], fig.data[2]];
    expect(colour).toEqual([255, 255, 255]); // the page around the figure stays white
  });
});

describe('degenerate tick ranges', () => {
  it('ranges at rounding level give a single tick instead of exploding', async () => {
    const { niceTicks, looseTicks } = await import('../../src/figures/niceTicks.js');
    for (const [a, b] of [[-0.4798347188012912, -0.47983471880129097], [1, 1 + 1e-15], [1e6, 1e6 + 1e-9]]) {
      expect(niceTicks(a, b).values.length).toBe(1);
      expect(looseTicks(a, b).values.length).toBeLessThan(20);
    }
  });
});
