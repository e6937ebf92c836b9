// SVG charts of the report: well-formed XML, nice tick values, escaping of caller text,
// and where ticks and data land on linear and logarithmic axes.
//
// External references used below:
// - XML 1.0 (W3C Recommendation, 5th ed. 2008), section 2 "Documents": one root element,
//   properly nested tags, quoted unique attributes, '<' never raw in character data or
//   attribute values, '&' only in the predefined entities or character references. The
//   checker below implements exactly these rules and is itself checked on known-bad input.
// - Tick steps follow d3-array's tickIncrement (1, 2 or 5 times a power of ten, switching
//   at the geometric means sqrt 2, sqrt 10, sqrt 50 of the raw step's mantissa); every
//   expected tick list below is worked by hand from that rule beside the test (see also
//   scales.test.ts).
// - A logarithmic axis maps equal ratios to equal lengths (definition of a log scale),
//   so successive decade ticks must be equally spaced and 10^-3 must sit halfway between
//   10^-6 and 10^0.
// - SI Brochure (BIPM, 9th ed. 2019), section 5.4: minus sign U+2212, "× 10ⁿ" notation.
// Pixel coordinates are written to 0.01 px, so positions are compared to 0.011 px.

import { describe, expect, it } from 'vitest';
import { formatNumber } from '../../src/figures/formatNumber.js';
import { renderLinePlotSvg } from '../../src/figures/linePlotSvg.js';
import { renderHistogramSvg } from '../../src/figures/histogramSvg.js';
import type { LinePlotSpec } from '../../src/figures/plotSpec.js';
import { renderPixels, rootSize } from './figureProbe.js';

// ---------------------------------------------------------------------------------
// A small XML well-formedness checker (XML 1.0, section 2; no DTD support needed).

const NAME = /^[A-Za-z_:][A-Za-z0-9_:.-]*/;
const ENTITY_REF = /^&(?:amp|lt|gt|quot|apos|#[0-9]+|#x[0-9A-Fa-f]+);/;

function checkEntities(text: string, where: string): string | null {
  for (let i = text.indexOf('&'); i >= 0; i = text.indexOf('&', i + 1)) {
    if (!ENTITY_REF.test(text.slice(i))) return `bare '&' in ${where}: ${JSON.stringify(text.slice(i, i + 12))}`;
  }
  return null;
}

/** null when `xml` is a well-formed XML document, else a description of the first error. */
function xmlWellFormednessError(xml: string): string | null {
  const stack: string[] = [];
  let roots = 0;
  let i = 0;
  while (i < xml.length) {
    const lt = xml.indexOf('<', i);
    const text = lt < 0 ? xml.slice(i) : xml.slice(i, lt);
    if (text.length > 0) {
      if (stack.length === 0 && text.trim() !== '') return `text outside the root element: ${JSON.stringify(text.slice(0, 20))}`;
      if (text.includes(']]>')) return "']]>' in character data";
      const err = checkEntities(text, 'text');
      if (err) return err;
    }
    if (lt < 0) break;
    i = lt;
    if (xml.startsWith('<!--', i)) {
      const end = xml.indexOf('-->', i + 4);
      if (end < 0) return 'unterminated comment';
      i = end + 3;
      continue;
    }
    if (xml.startsWith('<![CDATA[', i)) {
      if (stack.length === 0) return 'CDATA outside the root element';
      const end = xml.indexOf(']]>', i);
      if (end < 0) return 'unterminated CDATA section';
      i = end + 3;
      continue;
    }
    if (xml.startsWith('<?', i)) {
      const end = xml.indexOf('?>', i);
      if (end < 0) return 'unterminated processing instruction';
      i = end + 2;
      continue;
    }
    if (xml.startsWith('</', i)) {
      const name = NAME.exec(xml.slice(i + 2))?.[0];
      if (!name) return `bad end tag at ${i}`;
      let j = i + 2 + name.length;
      while (/\s/.test(xml[j] ?? '')) j++;
      if (xml[j] !== '>') return `bad end tag </${name} at ${i}`;
      const open = stack.pop();
      if (open !== name) return `end tag </${name}> does not match <${open ?? '(none)'}>`;
      i = j + 1;
      continue;
    }
    // Start tag or empty-element tag.
    const name = NAME.exec(xml.slice(i + 1))?.[0];
    if (!name) return `'<' not followed by a name at ${i}: ${JSON.stringify(xml.slice(i, i + 10))}`;
    let j = i + 1 + name.length;
    const seen = new Set<string>();
    for (;;) {
      const wsStart = j;
      while (/\s/.test(xml[j] ?? '')) j++;
      if (xml.startsWith('/>', j) || xml[j] === '>') break;
      if (j === wsStart) return `missing space before attribute in <${name}> at ${j}`;
      const attr = NAME.exec(xml.slice(j))?.[0];
      if (!attr) return `bad attribute in <${name}> at ${j}: ${JSON.stringify(xml.slice(j, j + 12))}`;
      if (seen.has(attr)) return `duplicate attribute ${attr} in <${name}>`;
      seen.add(attr);
      j += attr.length;
      while (/\s/.test(xml[j] ?? '')) j++;
      if (xml[j] !== '=') return `attribute ${attr} in <${name}> has no value`;
      j++;
      while (/\s/.test(xml[j] ?? '')) j++;
      const quote = xml[j];
      if (quote !== '"' && quote !== "'") return `attribute ${attr} in <${name}> is not quoted`;
      const end = xml.indexOf(quote, j + 1);
      if (end < 0) return `unterminated attribute ${attr}`;
      const value = xml.slice(j + 1, end);
      if (value.includes('<')) return `'<' in attribute ${attr} of <${name}>`;
      const err = checkEntities(value, `attribute ${attr}`);
      if (err) return err;
      j = end + 1;
    }
    if (stack.length === 0) {
      roots += 1;
      if (roots > 1) return 'more than one root element';
    }
    if (xml.startsWith('/>', j)) {
      i = j + 2;
    } else {
      stack.push(name);
      i = j + 1;
    }
  }
  if (stack.length > 0) return `unclosed element <${stack[stack.length - 1]}>`;
  if (roots !== 1) return 'no root element';
  return null;
}

describe('the XML well-formedness checker used below', () => {
  it('accepts well-formed documents and rejects each kind of mistake', () => {
    expect(xmlWellFormednessError('<a x="1" y=\'2\'><b/>text &amp; &#955; &#x3bb;<!-- c --></a>')).toBeNull();
    const bad = [
      '<a><b></a></b>', // crossed nesting
      '<a x=1/>', // unquoted attribute
      '<a x="1" x="2"/>', // duplicate attribute
      '<a>1 < 2</a>', // raw '<'
      '<a>&bogus;</a>', // unknown entity
      '<a>R&D</a>', // bare ampersand
      '<a title="<b>"/>', // '<' in an attribute
      '<a/><b/>', // two roots
      '<a>', // unclosed
      'text<a/>', // text outside the root
    ];
    for (const doc of bad) expect(xmlWellFormednessError(doc), doc).not.toBeNull();
  });
});

// ---------------------------------------------------------------------------------
// Nice ticks

describe('formatNumber (SI Brochure 5.4 conventions)', () => {
  it('formats plain, large, small and special values', () => {
    expect(formatNumber(0.01495)).toBe('0.01495');
    expect(formatNumber(40000)).toBe('40000');
    expect(formatNumber(-2.5)).toBe('\u22122.5');
    expect(formatNumber(12345.6)).toBe('12346');
    expect(formatNumber(2 / 3)).toBe('0.6667');
    expect(formatNumber(3.96e-29)).toBe('3.96 \u00D7 10\u207B\u00B2\u2079');
    expect(formatNumber(6.02214076e23, 3)).toBe('6.02 \u00D7 10\u00B2\u00B3');
    expect(formatNumber(Number.NaN)).toBe('NaN');
  });
});

// ---------------------------------------------------------------------------------
// Rendered SVG

interface TickMark {
  value: number;
  position: number;
}

/** Tick marks of one axis read back from the SVG (value and pixel position). */
function ticksOf(svg: string, axis: 'x' | 'y'): TickMark[] {
  const re = new RegExp(`<line class="tick" data-axis="${axis}" data-value="([^"]+)" x1="([^"]+)" y1="([^"]+)"`, 'g');
  return [...svg.matchAll(re)].map((m) => ({ value: Number(m[1]), position: Number(axis === 'x' ? m[2] : m[3]) }));
}

/** The vertices of the first series path, in pixels. */
function seriesPoints(svg: string, series = 0): { x: number; y: number }[] {
  const d = new RegExp(`<path class="series" data-series="${series}" d="([^"]+)"`).exec(svg)?.[1] ?? '';
  return [...d.matchAll(/[ML](-?[\d.]+) (-?[\d.]+)/g)].map((m) => ({ x: Number(m[1]), y: Number(m[2]) }));
}

const samplePlot: LinePlotSpec = {
  title: 'Density & variance',
  xAxis: { label: 'radius', unit: 'sites' },
  yAxis: { label: 'density', unit: 'atoms/site' },
  series: [
    { label: 'mean', x: [0, 1, 2, 3, 4], y: [2, 1.9, 1.1, 1, 0.2], yErr: [0.1, 0.1, 0.2, 0.05, 0.05] },
    { label: 'model', x: [0, 2, 4], y: [2, 1, 0], style: { line: 'dashed', marker: 'square', color: '#884400' } },
  ],
  verticalMarkers: [{ at: 2.5, label: 'shell edge' }],
  horizontalMarkers: [{ at: 1, label: 'n = 1' }],
};

describe('renderLinePlotSvg', () => {
  it('is well-formed XML with one path per series and error bars on each point', () => {
    const svg = renderLinePlotSvg(samplePlot, { idPrefix: 'p1' });
    expect(xmlWellFormednessError(svg)).toBeNull();
    expect(svg.startsWith('<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    expect(svg.match(/<path class="series" /g)).toHaveLength(2);
    // One vertical bar plus two caps per point: 3 moves each, 5 points.
    const bars = /<path class="error-bars" d="([^"]+)"/.exec(svg)?.[1] ?? '';
    expect(bars.match(/M/g)).toHaveLength(15);
    expect(svg).toContain('stroke="#884400"');
    expect(svg).toContain('Density &amp; variance');
    expect(svg).toContain('radius (sites)');
    expect(svg).toContain('clip-path="url(#p1-clip)"');
  });

  it('escapes caller text: a label "<script>" appears only as &lt;script&gt;', () => {
    const hostile = '<script>alert("x")</script> & \'q\' \u0001';
    const svg = renderLinePlotSvg(
      {
        title: hostile,
        xAxis: { label: hostile, unit: '<b>' },
        yAxis: { label: 'y' },
        series: [{ label: hostile, x: [0, 1], y: [0, 1] }],
        verticalMarkers: [{ at: 0.5, label: hostile }],
      },
      { idPrefix: 'x" onload="bad' },
    );
    expect(xmlWellFormednessError(svg)).toBeNull();
    expect(svg).not.toMatch(/<script/i);
    expect(svg).not.toContain('onload="');
    expect(svg).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt; &amp; &#39;q&#39; \uFFFD');
    expect(svg).toContain('(&lt;b&gt;)');
  });

  it('places linear ticks and data consistently, ticks enclosing the data', () => {
    const svg = renderLinePlotSvg(samplePlot);
    const y = ticksOf(svg, 'y');
    const x = ticksOf(svg, 'x');
    // y: data with error bars spans 0 .. 2.1; the domain is rounded for 5 ticks (raw step
    // 0.42, mantissa 4.2 >= sqrt 10 -> 0.5) to [0, 2.5], ticked at 0.5.
    // x: the data range 0 .. 4 plus 2 % for the markers (-0.08 .. 4.08, not rounded); about
    // one tick per 90 px of the ~560 px axis asks for 6: raw 0.693, mantissa 6.93 < sqrt 50 -> 0.5.
    expect(y.map((t) => t.value)).toEqual([0, 0.5, 1, 1.5, 2, 2.5]);
    expect(x.map((t) => t.value)).toEqual([0, 0.5, 1, 1.5, 2, 2.5, 3, 3.5, 4]);
    // Equal spacing on a linear axis.
    for (let i = 2; i < y.length; i++) {
      expect(Math.abs(y[i]!.position - y[i - 1]!.position - (y[1]!.position - y[0]!.position))).toBeLessThan(0.011);
    }
    // The point (1, 1.9) lies 4/5 of the way from tick 1.5 to tick 2: linear interpolation.
    const points = seriesPoints(svg);
    const at = (v: number): number => y.find((t) => t.value === v)!.position;
    expect(points[1]!.y).toBeCloseTo(at(1.5) + 0.8 * (at(2) - at(1.5)), 1);
    expect(points[1]!.x).toBeCloseTo(x.find((t) => t.value === 1)!.position, 1);
  });

  it('log axis: decade ticks equally spaced, 10^-3 halfway between 10^-6 and 10^0', () => {
    const svg = renderLinePlotSvg({
      xAxis: { label: 'sweep' },
      yAxis: { label: 'residual', log: true },
      series: [{ label: 'residual', x: [1, 2, 3, 4], y: [1, 1e-3, 0, 1e-6] }],
    });
    expect(xmlWellFormednessError(svg)).toBeNull();
    const y = ticksOf(svg, 'y');
    expect(y.map((t) => t.value)).toEqual([1e-6, 1e-5, 1e-4, 1e-3, 1e-2, 1e-1, 1]);
    const gap = y[1]!.position - y[0]!.position;
    expect(gap).toBeLessThan(0); // larger values higher up (smaller SVG y)
    for (let i = 2; i < y.length; i++) {
      expect(Math.abs(y[i]!.position - y[i - 1]!.position - gap)).toBeLessThan(0.011);
    }
    // The zero cannot be drawn on a log axis: the line breaks there and a note says so.
    const d = /<path class="series" data-series="0" d="([^"]+)"/.exec(svg)![1]!;
    expect(d.match(/M/g)).toHaveLength(2);
    expect(svg).toContain('1 point \u2264 0 not shown on the log axis');
    const points = seriesPoints(svg);
    const at = (v: number): number => y.find((t) => t.value === v)!.position;
    expect(points[0]!.y).toBeCloseTo(at(1), 1);
    expect(points[1]!.y).toBeCloseTo(at(1e-3), 1);
    expect(points[1]!.y).toBeCloseTo((at(1e-6) + at(1)) / 2, 1);
    expect(points[2]!.y).toBeCloseTo(at(1e-6), 1);
    // Labels as powers of ten with a true minus sign.
    expect(svg).toContain('>10\u207B\u00B3<');
  });

  it('refuses mismatched data with a message naming the series', () => {
    expect(() =>
      renderLinePlotSvg({ xAxis: { label: 'x' }, yAxis: { label: 'y' }, series: [{ label: 'bad', x: [1, 2], y: [1] }] }),
    ).toThrow(/series\[0\] 'bad': x has 2 values but y has 1/);
  });

  it('draws an empty frame with a note when there is no finite data', () => {
    const svg = renderLinePlotSvg({
      xAxis: { label: 'x' },
      yAxis: { label: 'y' },
      series: [{ label: 'nothing', x: [Number.NaN], y: [1] }],
    });
    expect(xmlWellFormednessError(svg)).toBeNull();
    expect(svg).toContain('no finite data to show');
  });
});

describe('renderHistogramSvg', () => {
  it('draws one closed fill and one outline per series over the bin edges', () => {
    const svg = renderHistogramSvg(
      {
        binEdges: [0, 1, 2, 3],
        series: [
          { label: 'a <1>', counts: [3, 5, 2] },
          { label: 'b', counts: [0, 4, 4] },
        ],
        xAxis: { label: '|\u03C6|\u00B2' },
        yAxis: { label: 'sites' },
      },
      { idPrefix: 'h' },
    );
    expect(xmlWellFormednessError(svg)).toBeNull();
    expect(svg.match(/<path class="series" /g)).toHaveLength(2);
    expect(svg.match(/<path class="series-fill" /g)).toHaveLength(2);
    expect(svg).toContain('a &lt;1&gt;');
    // Bars stand on zero; 5 counts plus 4 % headroom = 5.2, rounded for 5 ticks (raw 1.04,
    // mantissa 1.04 < sqrt 2 -> step 1) to [0, 6].
    expect(ticksOf(svg, 'y').map((t) => t.value)).toEqual([0, 1, 2, 3, 4, 5, 6]);
    // Outline of series 0: up to 3 over bin 0, to 5 over bin 1, to 2 over bin 2, back to 0.
    const y = ticksOf(svg, 'y');
    const at = (v: number): number => y.find((t) => t.value === v)!.position;
    const d = /<path class="series" data-series="0" d="([^"]+)"/.exec(svg)![1]!;
    const levels = [...d.matchAll(/V(-?[\d.]+)/g)].map((m) => Number(m[1]));
    const expected = [at(3), at(5), at(2), at(0)];
    levels.forEach((v, i) => expect(Math.abs(v - expected[i]!)).toBeLessThan(0.011));
  });

  it('refuses counts that do not match the bins', () => {
    expect(() =>
      renderHistogramSvg({
        binEdges: [0, 1, 2],
        series: [{ label: 'short', counts: [1] }],
        xAxis: { label: 'x' },
        yAxis: { label: 'n' },
      }),
    ).toThrow(/series\[0\] 'short': 1 counts for 2 bins/);
    expect(() =>
      renderHistogramSvg({ binEdges: [0, 2, 1], series: [], xAxis: { label: 'x' }, yAxis: { label: 'n' } }),
    ).toThrow(/binEdges: must increase strictly/);
  });
});

describe('axis limits a reader can trust', () => {
  it('a non-negative quantity keeps its axis at zero although error bars reach below (no density axis to -0.5)', () => {
    const svg = renderLinePlotSvg({
      xAxis: { label: 'radius', unit: 'sites' },
      yAxis: { label: 'atoms per site' },
      series: [{ label: 'density n', x: [0, 1, 2, 3], y: [2, 2, 0.1, 0], yErr: [0.05, 0.05, 0.4, 0.3] }],
    });
    const y = ticksOf(svg, 'y').map((t) => t.value);
    expect(y[0]).toBe(0);
    expect(y.every((v) => v >= 0)).toBe(true);
    // A quantity that does go negative still gets its negative axis.
    const signed = renderLinePlotSvg({ xAxis: { label: 'x' }, yAxis: { label: 'residual' }, series: [{ label: 'r', x: [0, 1], y: [-0.3, 0.4] }] });
    expect(ticksOf(signed, 'y')[0]!.value).toBeLessThan(0);
  });

  it('an x axis runs over the data, without an empty stretch before the first point', () => {
    const svg = renderLinePlotSvg({ xAxis: { label: 'lattice depth', unit: 'E_r' }, yAxis: { label: 'J', log: true }, series: [{ label: 'J', x: [4, 10, 30], y: [100, 30, 1] }] });
    const x = ticksOf(svg, 'x');
    expect(x[0]!.value).toBe(5);
    expect(x[x.length - 1]!.value).toBe(30);
    const left = Number(/<rect class="plot-area" x="([^"]+)"/.exec(svg)![1]);
    // The first point (x = 4) sits on the left frame.
    expect(seriesPoints(svg)[0]!.x).toBeCloseTo(left, 1);
  });
});

describe('PNG of a line plot', () => {
  it('has the size of the SVG, white margins, and the series colour on the data points', () => {
    const svg = renderLinePlotSvg({ xAxis: { label: 'x' }, yAxis: { label: 'y' }, series: [{ label: 'line', x: [0, 1, 2], y: [0, 1, 2], style: { color: '#c02000' } }] });
    const img = renderPixels(svg);
    const { width, height } = rootSize(svg);
    expect([img.width, img.height]).toEqual([width, height]);
    expect(img.at(1, 1)).toEqual([255, 255, 255]);
    const mid = seriesPoints(svg)[1]!;
    const [r, g, b] = img.at(mid.x, mid.y);
    expect(r).toBeGreaterThan(150);
    expect(g).toBeLessThan(100);
    expect(b).toBeLessThan(100);
  });
});
