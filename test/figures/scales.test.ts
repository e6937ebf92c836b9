// Scales and ticks. Tick values come from d3-scale / d3-array; the expected lists below are
// worked by hand from d3-array's tickIncrement rule: raw step = span / count, mantissa m
// of the raw step, step = 10, 5, 2 or 1 times its power of ten for m >= sqrt 50, sqrt 10,
// sqrt 2 or below (the geometric midpoints between neighbouring nice steps). "nice" widens
// a linear domain to whole steps, a log domain to whole decades.
// Labels are ours: decimals of the step, U+2212 minus, one common "×10ⁿ" for very large or
// small ticks (SI Brochure, BIPM 9th ed. 2019, section 5.4).
// A log scale maps equal ratios to equal lengths (definition), checked on the pixels.

import { describe, expect, it } from 'vitest';
import { createScale, niceDomain, scaleTicks } from '../../src/figures/scales.js';
import { linearTickLabels, logTickLabel, scaleNote } from '../../src/figures/tickLabels.js';

function ticksOf(low: number, high: number, count: number, nice = true): { domain: [number, number]; values: number[]; labels: string[]; note: string } {
  const domain = nice ? niceDomain('linear', low, high, count) : ([low, high] as [number, number]);
  const t = scaleTicks(createScale('linear', domain, [0, 100]), count);
  return { domain, values: t.major, labels: t.labels, note: t.note };
}

describe('linear ticks (d3 tickIncrement, worked by hand)', () => {
  it('[0, 1], 5 ticks: raw 0.2, mantissa 2 >= sqrt 2 -> 0.2: 0, 0.2, ..., 1', () => {
    const t = ticksOf(0, 1, 5);
    expect(t.domain).toEqual([0, 1]);
    expect(t.values).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(t.labels).toEqual(['0', '0.2', '0.4', '0.6', '0.8', '1.0']);
  });

  it('[0.13, 0.87]: raw 0.148 -> 0.2; nice widens to [0, 1]', () => {
    expect(ticksOf(0.13, 0.87, 5).domain).toEqual([0, 1]);
  });

  it('[-3.7, 12.2]: raw 3.18, mantissa 3.18 >= sqrt 10 = 3.162 -> 5: domain [-5, 15]', () => {
    const t = ticksOf(-3.7, 12.2, 5);
    expect(t.domain).toEqual([-5, 15]);
    expect(t.values).toEqual([-5, 0, 5, 10, 15]);
    expect(t.labels[0]).toBe('\u22125');
  });

  it('[980, 1020]: raw 8 >= sqrt 50 -> 10', () => {
    expect(ticksOf(980, 1020, 5).values).toEqual([980, 990, 1000, 1010, 1020]);
  });

  it('[0, 12], 10 ticks: raw 1.2 < sqrt 2 -> step 1 (13 ticks, where "the smallest nice step above the raw one" would give 2)', () => {
    expect(ticksOf(0, 12, 10).values).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12]);
  });

  it('[1.2e-5, 3.4e-5]: raw 4.4e-6 -> 5e-6; labels share ×10⁻⁵', () => {
    const t = ticksOf(1.2e-5, 3.4e-5, 5);
    expect(t.values).toEqual([1e-5, 1.5e-5, 2e-5, 2.5e-5, 3e-5, 3.5e-5]);
    expect(t.labels).toEqual(['1.0', '1.5', '2.0', '2.5', '3.0', '3.5']);
    expect(t.note).toBe('\u00D710\u207B\u2075');
  });

  it('[0, 0] widens to [-1, 1]: raw 0.5 -> -1, -0.5, 0, 0.5, 1', () => {
    const t = ticksOf(0, 0, 4);
    expect(t.values).toEqual([-1, -0.5, 0, 0.5, 1]);
    expect(t.labels).toEqual(['\u22121.0', '\u22120.5', '0', '0.5', '1.0']);
  });

  it('ticks inside a fixed (not rounded) range, as on image axes: [-40.5, 40.5] by 10', () => {
    expect(ticksOf(-40.5, 40.5, 8, false).values).toEqual([-40, -30, -20, -10, 0, 10, 20, 30, 40]);
  });

  it('encloses the data with whole 1-2-5 steps on many ranges', () => {
    let state = 12345; // a fixed linear congruential sequence
    const next = (): number => {
      state = (state * 1103515245 + 12345) % 2147483648;
      return state / 2147483648;
    };
    for (let k = 0; k < 300; k++) {
      const scale = 10 ** Math.floor(next() * 16 - 8);
      const a = (next() * 2 - 1) * scale;
      const b = a + next() * scale * 3 + 1e-3 * scale;
      const count = 3 + Math.floor(next() * 6);
      const { domain, values } = ticksOf(a, b, count);
      const step = values[1]! - values[0]!;
      const mantissa = step / 10 ** Math.floor(Math.log10(step) + 1e-9);
      expect([1, 2, 5].some((m) => Math.abs(mantissa - m) < 1e-6), `step ${step}`).toBe(true);
      expect(domain[0]).toBeLessThanOrEqual(a);
      expect(domain[1]).toBeGreaterThanOrEqual(b);
      // d3's nice repeats the rounding until the step is stable; a step that grows on the
      // way (e.g. [-4.39e-5, 8.16e-5] with 4 ticks: 2e-5, then 5e-5) can leave up to two
      // final steps of margin at one end, never more.
      expect(domain[0]).toBeGreaterThan(a - 2 * step * (1 + 1e-9));
      expect(domain[1]).toBeLessThan(b + 2 * step * (1 + 1e-9));
      // A step at least raw / sqrt 2 allows at most sqrt 2 * count intervals over the data, plus the rounding at both ends.
      expect(values.length - 1).toBeLessThanOrEqual(Math.ceil(Math.SQRT2 * count) + 2);
      for (let i = 1; i < values.length; i++) expect(Math.abs(values[i]! - values[i - 1]! - step)).toBeLessThan(1e-6 * step);
    }
  });

  it('ranges at rounding level are one value, widened: no tick explosion', () => {
    for (const [a, b] of [[-0.4798347188012912, -0.47983471880129097], [1, 1 + 1e-15], [1e6, 1e6 + 1e-9]] as const) {
      const t = ticksOf(a, b, 5);
      expect(t.values.length).toBeLessThan(20);
      expect(t.domain[0]).toBeLessThanOrEqual(a);
      expect(t.domain[1]).toBeGreaterThanOrEqual(b);
    }
  });

  it('names the bad argument', () => {
    expect(() => niceDomain('linear', Number.NaN, 1, 5, {}, 'yAxis')).toThrow(/yAxis: expected finite limits/);
    expect(() => niceDomain('linear', 2, 1, 5, {}, 'yAxis')).toThrow(/yAxis: the lower limit \(2\) must not exceed the upper \(1\)/);
    expect(() => niceDomain('log', 0, 1, 5, {}, 'yAxis')).toThrow(/log scale needs positive limits/);
  });
});

describe('log ticks', () => {
  const logTicks = (low: number, high: number, count: number) => {
    const domain = niceDomain('log', low, high, count);
    return { domain, ...scaleTicks(createScale('log', domain, [0, 300]), count) };
  };

  it('[0.05, 20]: decades 10⁻² .. 10² labelled, 2..9 times each of the 4 decades as minor ticks', () => {
    const t = logTicks(0.05, 20, 10);
    expect(t.domain).toEqual([0.01, 100]);
    expect(t.major).toEqual([0.01, 0.1, 1, 10, 100]);
    expect(t.minor).toHaveLength(4 * 8);
    expect(t.minor.slice(0, 3)).toEqual([0.02, 0.03, 0.04]);
    expect(t.labels).toEqual(['10\u207B\u00B2', '10\u207B\u00B9', '10\u2070', '10\u00B9', '10\u00B2']);
  });

  it('[2e-9, 0.3] with room for 5 labels: 9 decades, d3 ticks the exponents at step 2 (raw 1.8 >= sqrt 2), no minor ticks', () => {
    const t = logTicks(2e-9, 0.3, 5);
    expect(t.domain).toEqual([1e-9, 1]);
    expect(t.major).toEqual([1e-8, 1e-6, 1e-4, 1e-2, 1]);
    expect(t.minor).toEqual([]);
  });

  it('within one decade the integer multiples are labelled as plain numbers', () => {
    const scale = createScale('log', [2, 8], [0, 300]);
    const t = scaleTicks(scale, 10);
    expect(t.major).toEqual([2, 3, 4, 5, 6, 7, 8]);
    expect(t.labels).toEqual(['2', '3', '4', '5', '6', '7', '8']);
    expect(logTickLabel(3e-7)).toBe('3\u00D710\u207B\u2077');
  });

  it('equal ratios are equal lengths: 10 sits halfway between 1 and 100', () => {
    const s = createScale('log', [1, 100], [300, 0]);
    expect(s.map(10)).toBeCloseTo(150, 9);
    expect(Number.isNaN(s.map(0))).toBe(true);
    expect(Number.isNaN(s.map(-1))).toBe(true);
  });
});

describe('tick labels', () => {
  it('use the decimals of the step, a true minus and never -0', () => {
    expect(linearTickLabels([-0.5, 0, 0.5], 0.5).labels).toEqual(['\u22120.5', '0', '0.5']);
    expect(linearTickLabels([1e5, 2e5, 3e5], 1e5)).toEqual({ labels: ['1', '2', '3'], scaleExponent: 5 });
    expect(scaleNote(0)).toBe('');
    expect(linearTickLabels([0.48], 0).labels).toEqual(['0.480']);
  });
});
