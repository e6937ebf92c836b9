// SVG charts of the report: well-formed XML, nice tick values, escaping of caller text,
// and where ticks and data land on linear and logarithmic axes.
//
// External references used below:
// - XML 1.0 (W3C Recommendation, 5th ed. 2008), section 2 "Documents": one root element,
//   properly nested tags, quoted unique attributes, '<' never raw in character data or
//   attribute values, '&' only in the predefined entities or character references. The
//   checker below implements exactly these rules and is itself checked on known-bad input.
// - P. S. Heckbert, "Nice numbers for graph labels", Graphics Gems (1990): steps of
//   1, 2 or 5 times a power of ten, the axis range rounded outwards to whole steps. Every
//   expected tick list below is worked by hand beside the test.
// - A logarithmic axis maps equal ratios to equal lengths (definition of a log scale),
//   so successive decade ticks must be equally spaced and 10^-3 must sit halfway between
//   10^-6 and 10^0.
// - SI Brochure (BIPM, 9th ed. 2019), section 5.4: minus sign U+2212, "× 10ⁿ" notation.
// Pixel coordinates are written to 0.01 px, so positions are compared to 0.011 px.

import { describe, expect, it } from 'vitest';
import { linearTickLabels, niceLinearTicks, niceLogTicks, scaleNote } from '../../src/figures/axisTicks.js';
import { formatNumber } from '../../src/report/formatNumber.js';
import { renderHistogramSvg, renderLinePlotSvg } from '../../src/figures/svgPlot.js';
import type { LinePlotSpec } from '../../src/report/reportModel.js';

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

describe('niceLinearTicks (Heckbert 1990; ranges worked by hand)', () => {
  it('[0, 1], 5 intervals: raw step 0.2 is already nice -> 0, 0.2, ..., 1', () => {
    const t = niceLinearTicks(0, 1, 5);
    expect(t.step).toBe(0.2);
    expect(t.values).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });

  it('[0.13, 0.87]: raw 0.148 -> 0.2; floor(0.65) = 0, ceil(4.35) = 5 -> 0 .. 1', () => {
    const t = niceLinearTicks(0.13, 0.87, 5);
    expect(t.values).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
  });

  it('[-3.7, 12.2]: raw 3.18 -> 5; floor(-0.74) = -1, ceil(2.44) = 3 -> -5 .. 15', () => {
    const t = niceLinearTicks(-3.7, 12.2, 5);
    expect(t.step).toBe(5);
    expect(t.values).toEqual([-5, 0, 5, 10, 15]);
  });

  it('[980, 1020]: raw 8 -> 10 -> 980, 990, ..., 1020', () => {
    expect(niceLinearTicks(980, 1020, 5).values).toEqual([980, 990, 1000, 1010, 1020]);
  });

  it('[1.2e-5, 3.4e-5]: raw 4.4e-6 -> 5e-6; floor(2.4) = 2, ceil(6.8) = 7 -> 1e-5 .. 3.5e-5', () => {
    const t = niceLinearTicks(1.2e-5, 3.4e-5, 5);
    expect(t.values).toEqual([1e-5, 1.5e-5, 2e-5, 2.5e-5, 3e-5, 3.5e-5]);
    const labels = linearTickLabels(t);
    expect(labels.scaleExponent).toBe(-5);
    expect(labels.labels).toEqual(['1.0', '1.5', '2.0', '2.5', '3.0', '3.5']);
    expect(scaleNote(labels.scaleExponent)).toBe('\u00D710\u207B\u2075');
  });

  it('[0, 0] widens to [-1, 1]: raw 0.4 -> 0.5 -> -1, -0.5, 0, 0.5, 1', () => {
    const t = niceLinearTicks(0, 0, 4);
    expect(t.values).toEqual([-1, -0.5, 0, 0.5, 1]);
    expect(linearTickLabels(t).labels).toEqual(['\u22121.0', '\u22120.5', '0', '0.5', '1.0']);
  });

  it('encloses the data with whole 1-2-5 steps on many ranges', () => {
    // Ranges from a fixed linear congruential sequence (deterministic, no seed needed).
    let state = 12345;
    const next = (): number => {
      state = (state * 1103515245 + 12345) % 2147483648;
      return state / 2147483648;
    };
    for (let k = 0; k < 300; k++) {
      const scale = 10 ** Math.floor(next() * 16 - 8);
      const a = (next() * 2 - 1) * scale;
      const b = a + next() * scale * 3 + 1e-3 * scale;
      const target = 3 + Math.floor(next() * 6);
      const t = niceLinearTicks(a, b, target);
      const mantissa = t.step / 10 ** Math.floor(Math.log10(t.step) + 1e-9);
      expect([1, 2, 5].some((m) => Math.abs(mantissa - m) < 1e-9), `step ${t.step}`).toBe(true);
      expect(t.values[0]!).toBeLessThanOrEqual(a);
      expect(t.values[t.values.length - 1]!).toBeGreaterThanOrEqual(b);
      // Tight: no whole empty step at either end.
      expect(t.values[0]!).toBeGreaterThan(a - t.step);
      expect(t.values[t.values.length - 1]!).toBeLessThan(b + t.step);
      expect(t.values.length - 1).toBeLessThanOrEqual(target + 2);
      expect(t.values.length).toBeGreaterThanOrEqual(2);
      for (let i = 1; i < t.values.length; i++) {
        expect(Math.abs(t.values[i]! - t.values[i - 1]! - t.step)).toBeLessThan(1e-9 * t.step);
      }
    }
  });

  it('names the bad argument', () => {
    expect(() => niceLinearTicks(Number.NaN, 1)).toThrow(/dataMin and dataMax must be finite/);
    expect(() => niceLinearTicks(2, 1)).toThrow(/dataMin \(2\) must not exceed dataMax \(1\)/);
  });
});

describe('niceLogTicks', () => {
  it('[0.05, 20]: decades 10^-2 .. 10^2 with minor ticks 2..9 in each of the 4 decades', () => {
    const t = niceLogTicks(0.05, 20);
    expect(t.exponents).toEqual([-2, -1, 0, 1, 2]);
    expect(t.values).toEqual([0.01, 0.1, 1, 10, 100]);
    expect(t.minorValues).toHaveLength(4 * 8);
    expect(t.minorValues.slice(0, 3)).toEqual([0.02, 0.03, 0.04]);
  });

  it('[2e-7, 0.3]: 10^-7 .. 10^0 is 7 decades, the most shown one by one', () => {
    expect(niceLogTicks(2e-7, 0.3).exponents).toEqual([-7, -6, -5, -4, -3, -2, -1, 0]);
  });

  it('[2e-9, 0.3]: 9 decades > 7, so every second decade, aligned on 10^0 -> 10^-10 .. 10^0', () => {
    const t = niceLogTicks(2e-9, 0.3);
    expect(t.exponents).toEqual([-10, -8, -6, -4, -2, 0]);
    expect(t.minorValues).toEqual([]);
  });

  it('refuses non-positive limits', () => {
    expect(() => niceLogTicks(0, 1)).toThrow(/positive/);
  });
});

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
    // Data (with error bars) spans 0 .. 2.1 in y (5 intervals: raw 0.42 -> 0.5) and
    // 0 .. 4 in x (6 intervals: raw 0.67 -> 1): hand-worked nice ticks.
    expect(y.map((t) => t.value)).toEqual([0, 0.5, 1, 1.5, 2, 2.5]);
    expect(x.map((t) => t.value)).toEqual([0, 1, 2, 3, 4]);
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
    // Bars stand on zero; 5 counts plus 4 % headroom = 5.2, 5 intervals: raw 1.04 -> 2.
    expect(ticksOf(svg, 'y').map((t) => t.value)).toEqual([0, 2, 4, 6]);
    // Outline of series 0: up to 3 over bin 0, to 5 over bin 1, to 2 over bin 2, back to 0.
    const y = ticksOf(svg, 'y');
    const at = (v: number): number => y.find((t) => t.value === v)!.position;
    const d = /<path class="series" data-series="0" d="([^"]+)"/.exec(svg)![1]!;
    const levels = [...d.matchAll(/V(-?[\d.]+)/g)].map((m) => Number(m[1]));
    const expected = [0.5 * (at(2) + at(4)), 0.5 * (at(4) + at(6)), at(2), at(0)];
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

describe('degenerate axis ranges', () => {
  it('a range at rounding level is treated as one value (no tick explosion)', async () => {
    const { niceLinearTicks } = await import('../../src/figures/axisTicks.js');
    const t = niceLinearTicks(-0.4798347188012912, -0.47983471880129097);
    expect(t.values.length).toBeLessThan(20);
    expect(t.min).toBeLessThanOrEqual(-0.4798347188012912);
    expect(t.max).toBeGreaterThanOrEqual(-0.47983471880129097);
  });
});
