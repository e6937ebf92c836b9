// Scales of the figure grammar: a scale maps data values on its domain to pixels on its
// range, linearly or logarithmically, and gives the ticks an axis or colour bar draws.
// Domains, "nice" rounding and tick values come from d3-scale (ticks at 1, 2 or 5 times
// a power of ten, d3-array's tickIncrement; log ticks at decades and their integer
// multiples); labels are ours (tickLabels.ts).
// A linear range of zero width (or one at the level of rounding, e.g. equal values
// computed two ways) is widened by 10 % of its value, or to [-1, 1] around zero, so that
// no tick step below the resolution of the values is ever asked for.

import { scaleLinear, scaleLog } from 'd3-scale';
import { tickStep } from 'd3-array';
import { linearTickLabels, logTickLabel, scaleNote } from './tickLabels.js';

export type ScaleKind = 'linear' | 'log';

export interface Scale {
  kind: ScaleKind;
  /** Data values at the two ends. */
  domain: readonly [number, number];
  /** Pixel positions of domain[0] and domain[1] (either order). */
  range: readonly [number, number];
  /** Pixel position of a value; NaN when it cannot be drawn (not finite, or <= 0 on a log scale). */
  map(value: number): number;
}

export interface AxisTicks {
  /** Labelled tick values inside the domain, increasing. */
  major: number[];
  labels: string[];
  /** Unlabelled ticks (log axes: 2..9 times a decade). */
  minor: number[];
  /** "×10ⁿ" to print once beside the axis, or ''. */
  note: string;
}

function checkDomain(kind: ScaleKind, low: number, high: number, what: string): void {
  if (!Number.isFinite(low) || !Number.isFinite(high)) {
    throw new RangeError(`${what}: expected finite limits, got ${low} and ${high}`);
  }
  if (low > high) throw new RangeError(`${what}: the lower limit (${low}) must not exceed the upper (${high})`);
  if (kind === 'log' && !(low > 0)) throw new RangeError(`${what}: a log scale needs positive limits, got ${low}`);
}

/** [low, high] widened when it has zero width at the precision of the values. */
export function widenDegenerate(low: number, high: number): [number, number] {
  if (high - low > 1e-12 * Math.max(Math.abs(low), Math.abs(high))) return [low, high];
  const mid = 0.5 * (low + high);
  const pad = mid === 0 ? 1 : Math.abs(mid) * 0.1;
  return [mid - pad, mid + pad];
}

/**
 * The domain of an axis that must show [low, high]: widened to d3's nice values for about
 * `count` ticks (linear) or to whole decades (log). Fixed ends are kept as given.
 */
export function niceDomain(
  kind: ScaleKind,
  low: number,
  high: number,
  count: number,
  fixed: { min?: boolean; max?: boolean } = {},
  what = 'axis',
): [number, number] {
  checkDomain(kind, low, high, what);
  if (kind === 'log') {
    const hi = high > low ? high : low * 10;
    if (fixed.min && fixed.max) return [low, hi];
    const [a, b] = scaleLog().domain([low, hi]).nice().domain() as [number, number];
    return [fixed.min ? low : a, fixed.max ? hi : b];
  }
  const [l, h] = widenDegenerate(low, high);
  const [a, b] = scaleLinear().domain([l, h]).nice(count).domain() as [number, number];
  return [fixed.min ? l : a, fixed.max ? h : b];
}

/** A linear or logarithmic scale from `domain` to the pixel `range`. */
export function createScale(kind: ScaleKind, domain: readonly [number, number], range: readonly [number, number], what = 'scale'): Scale {
  checkDomain(kind, domain[0], domain[1], what);
  const d: [number, number] = kind === 'linear' ? widenDegenerate(domain[0], domain[1]) : [domain[0], domain[1] > domain[0] ? domain[1] : domain[0] * 10];
  const s = kind === 'log' ? scaleLog().domain(d).range([range[0], range[1]]) : scaleLinear().domain(d).range([range[0], range[1]]);
  return {
    kind,
    domain: d,
    range: [range[0], range[1]],
    map: (value: number) => (Number.isFinite(value) && (kind === 'linear' || value > 0) ? s(value) : Number.NaN),
  };
}

function inside(v: number, low: number, high: number, kind: ScaleKind): boolean {
  const slack = kind === 'log' ? 1e-9 * v : 1e-9 * (high - low);
  return v >= low - slack && v <= high + slack;
}

/** Ticks of a scale's domain, about `count` labelled ones (d3's choice), with labels. */
export function scaleTicks(scale: Scale, count: number): AxisTicks {
  const [low, high] = scale.domain;
  const n = Math.max(1, Math.round(count));
  if (scale.kind === 'linear') {
    const major = scaleLinear().domain([low, high]).ticks(n).filter((v) => inside(v, low, high, 'linear')).map((v) => (v === 0 ? 0 : v));
    const step = major.length > 1 ? Math.abs(tickStep(low, high, n)) : 0;
    const { labels, scaleExponent } = linearTickLabels(major, step);
    return { major, labels, minor: [], note: scaleNote(scaleExponent) };
  }
  const all = scaleLog().domain([low, high]).ticks(n).filter((v) => inside(v, low, high, 'log'));
  const isDecade = (v: number): boolean => {
    const e = Math.round(Math.log10(v));
    return Math.abs(v / Number(`1e${e}`) - 1) < 1e-9;
  };
  const decades = all.filter(isDecade);
  // Two or more decades: label those, the 2..9 multiples become minor ticks. Within about
  // one decade d3 returns the integer multiples (or linear ticks): label them all.
  const major = decades.length >= 2 ? decades : all;
  let minor: number[] = [];
  if (decades.length >= 2) {
    // Minor ticks at 2..9 times each decade while there are few decades (more would merge
    // into a grey band): ask d3 for the dense set, which lists them below 10 decades.
    const span = Math.log10(high / low);
    const dense = span <= 8 ? scaleLog().domain([low, high]).ticks(Math.max(n, Math.ceil(span) + 1)) : all;
    minor = dense.filter((v) => !isDecade(v) && inside(v, low, high, 'log'));
  }
  return { major, labels: major.map(logTickLabel), minor, note: '' };
}
