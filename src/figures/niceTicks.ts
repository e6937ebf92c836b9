// Axis ticks at "nice" numbers and their labels.
//
// Linear axes follow P. S. Heckbert, "Nice numbers for graph labels", in Graphics Gems
// (Academic Press, 1990), pp. 61-63: the tick spacing is a nice number (1, 2 or 5 times a
// power of ten) close to range / (targetCount - 1), ticks sit on its multiples, and the
// labels carry just enough decimals for that spacing. Heckbert first rounds the range
// itself up to a nice number; we round range / (targetCount - 1) directly, because the
// extra rounding can halve the number of ticks inside a fixed range (0 to 2.6 with five
// wanted would get only 1 and 2 instead of 0.5, 1, ..., 2.5). Loose labelling (the axis widened
// to the enclosing ticks) is offered for line plots; image axes use the ticks inside the
// fixed extent. Very large or very small values are shown as mantissas with one common
// factor "x10^k" for the axis, written with superscript digits.
// Logarithmic axes tick at powers of ten, adding 2 and 5 times a power of ten when the
// axis spans too few decades to show several decades.

export interface TickSet {
  /** Tick values in increasing order. */
  values: number[];
  /** Spacing of the ticks (linear axes). */
  step: number;
  /** Decimals needed to print the ticks exactly at this spacing. */
  decimals: number;
}

export interface TickLabels {
  labels: string[];
  /** A common factor such as '×10⁻³' that the labels must be multiplied by, or '' when none. */
  multiplierLabel: string;
}

export interface LogTicks {
  /** Labelled ticks. */
  major: number[];
  /** Unlabelled ticks between them (2..9 times a power of ten). */
  minor: number[];
  labels: string[];
}

/**
 * Heckbert's nice number near x > 0: with `round`, the nearest of 1, 2, 5, 10 times a
 * power of ten; without, the smallest such number >= x.
 */
export function niceNumber(x: number, round: boolean): number {
  if (!(x > 0) || !Number.isFinite(x)) throw new Error(`niceNumber: expected a positive finite number, got ${x}`);
  const exponent = Math.floor(Math.log10(x));
  const fraction = x / 10 ** exponent;
  let nice: number;
  if (round) nice = fraction < 1.5 ? 1 : fraction < 3 ? 2 : fraction < 7 ? 5 : 10;
  else nice = fraction <= 1 ? 1 : fraction <= 2 ? 2 : fraction <= 5 ? 5 : 10;
  return scaleByPowerOfTen(nice, exponent);
}

// m * 10^e computed so that e.g. 3 * 10^-1 gives 0.3 and not 0.30000000000000004:
// dividing by an exact power of ten rounds correctly where multiplying by 0.1 does not.
function scaleByPowerOfTen(m: number, e: number): number {
  return e >= 0 ? m * 10 ** e : m / 10 ** -e;
}

function stepExponent(step: number): number {
  return Math.floor(Math.log10(step) + 1e-9);
}

function ticksForStep(min: number, max: number, step: number): TickSet {
  const e = stepExponent(step);
  const mantissa = Math.round(step / 10 ** e); // 1, 2 or 5 (10 is normalised below)
  const unitExp = mantissa === 10 ? e + 1 : e;
  const unitMantissa = mantissa === 10 ? 1 : mantissa;
  // Ticks are integer multiples k of the step; compare in step units with a tolerance of
  // one part in 10^9 so that an end exactly on a tick is kept despite rounding.
  const kMin = Math.ceil(min / step - 1e-9);
  const kMax = Math.floor(max / step + 1e-9);
  const values: number[] = [];
  for (let k = kMin; k <= kMax; k++) values.push(scaleByPowerOfTen(k * unitMantissa, unitExp) || 0);
  return { values, step, decimals: Math.max(0, -unitExp) };
}

/** Ticks at nice numbers within [min, max], about `targetCount` of them (at least 2 if the range allows). */
/**
 * A range at the level of rounding (values equal up to ~1e-12 relative) counts as one value:
 * a tick step that small cannot be represented next to the values, and the count explodes.
 */
function isDegenerate(min: number, max: number): boolean {
  return max - min <= 1e-12 * Math.max(Math.abs(min), Math.abs(max));
}

export function niceTicks(min: number, max: number, targetCount = 5): TickSet {
  checkRange(min, max);
  if (min === max || isDegenerate(min, max)) {
    const mid = 0.5 * (min + max);
    return { values: [mid], step: 0, decimals: decimalsOf(mid) };
  }
  const target = Math.max(2, Math.round(targetCount));
  let step = niceNumber((max - min) / (target - 1), true);
  let ticks = ticksForStep(min, max, step);
  // A range that falls between two ticks of the chosen spacing gets a finer one.
  while (ticks.values.length < 2) {
    step = niceNumber(step / 2.5, true);
    ticks = ticksForStep(min, max, step);
  }
  return ticks;
}

/** Heckbert's loose labelling: the range widened to whole ticks, with those ticks. */
export function looseTicks(min: number, max: number, targetCount = 5): TickSet {
  checkRange(min, max);
  if (min === max || isDegenerate(min, max)) {
    const mid = 0.5 * (min + max);
    const pad = mid === 0 ? 1 : Math.abs(mid) * 0.1;
    return looseTicks(mid - pad, mid + pad, targetCount);
  }
  const target = Math.max(2, Math.round(targetCount));
  const step = niceNumber((max - min) / (target - 1), true);
  const lo = Math.floor(min / step + 1e-9) * step;
  const hi = Math.ceil(max / step - 1e-9) * step;
  return ticksForStep(lo, hi, step);
}

function checkRange(min: number, max: number): void {
  if (!Number.isFinite(min) || !Number.isFinite(max) || max < min) {
    throw new Error(`tick range: expected finite min <= max, got [${min}, ${max}]`);
  }
}

function decimalsOf(x: number): number {
  if (x === 0 || !Number.isFinite(x)) return 0;
  return Math.max(0, Math.min(12, -Math.floor(Math.log10(Math.abs(x))) + 2));
}

const superscriptDigits = '\u2070\u00b9\u00b2\u00b3\u2074\u2075\u2076\u2077\u2078\u2079';

/** An integer written in superscript digits, e.g. -3 -> '⁻³'. */
export function superscriptInteger(n: number): string {
  if (!Number.isInteger(n)) throw new Error(`superscriptInteger: expected an integer, got ${n}`);
  const digits = [...String(Math.abs(n))].map((d) => superscriptDigits[Number(d)]).join('');
  return (n < 0 ? '\u207b' : '') + digits;
}

/** A number printed with `decimals` decimals and a true minus sign; never '-0'. */
export function formatFixed(x: number, decimals: number): string {
  const text = x.toFixed(decimals);
  if (/^-0(\.0*)?$/.test(text)) return text.slice(1);
  return text.startsWith('-') ? '\u2212' + text.slice(1) : text;
}

/**
 * Labels for linear ticks. Values of magnitude >= 1e5 or < 1e-3 are divided by a common
 * power of ten, returned as `multiplierLabel` (e.g. '×10⁻⁴') to print once on the axis.
 */
export function formatTicks(ticks: TickSet): TickLabels {
  const maxAbs = ticks.values.reduce((m, v) => Math.max(m, Math.abs(v)), 0);
  if (maxAbs === 0 || (maxAbs < 1e5 && maxAbs >= 1e-3)) {
    return { labels: ticks.values.map((v) => formatFixed(v, ticks.decimals)), multiplierLabel: '' };
  }
  const power = Math.floor(Math.log10(maxAbs) + 1e-9);
  const scaledStep = ticks.step > 0 ? ticks.step / 10 ** power : 0;
  const decimals = scaledStep > 0 ? Math.max(0, -stepExponent(scaledStep)) : decimalsOf(maxAbs / 10 ** power);
  return {
    labels: ticks.values.map((v) => formatFixed(scaleByPowerOfTen(v, -power), decimals)),
    multiplierLabel: `\u00d710${superscriptInteger(power)}`,
  };
}

/** Label of a power of ten, e.g. -3 -> '10⁻³', 0 -> '10⁰'. */
export function powerOfTenLabel(exponent: number): string {
  return `10${superscriptInteger(exponent)}`;
}

// m x 10^e as a plain decimal when short (0.002 .. 5000), otherwise as 'm×10ᵉ'.
function mantissaLabel(m: number, e: number): string {
  if (e >= -3 && e <= 3) return formatFixed(scaleByPowerOfTen(m, e), Math.max(0, -e));
  return m === 1 ? powerOfTenLabel(e) : `${m}\u00d7${powerOfTenLabel(e)}`;
}

/** Ticks for a logarithmic axis over [min, max] with 0 < min <= max. */
export function logTicks(min: number, max: number): LogTicks {
  if (!(min > 0) || !(max >= min) || !Number.isFinite(max)) {
    throw new Error(`log axis range: expected 0 < min <= max, got [${min}, ${max}]`);
  }
  const lo = Math.floor(Math.log10(min) + 1e-9);
  const hi = Math.ceil(Math.log10(max) - 1e-9);
  const decades = Math.max(1, hi - lo);
  const inRange = (v: number): boolean => v >= min * (1 - 1e-9) && v <= max * (1 + 1e-9);
  const major: number[] = [];
  const minor: number[] = [];
  const labels: string[] = [];
  // Label every decade, or every 2nd, 3rd, ... when there are many, keeping <= 7 labels.
  const every = Math.max(1, Math.ceil(decades / 7));
  const fewDecades = Math.log10(max / min) < 1.5;
  for (let e = lo; e <= hi; e++) {
    for (let m = 1; m <= 9; m++) {
      const v = scaleByPowerOfTen(m, e);
      if (!inRange(v)) continue;
      if (fewDecades && (m === 1 || m === 2 || m === 5)) {
        major.push(v);
        labels.push(mantissaLabel(m, e));
      } else if (!fewDecades && m === 1 && e % every === 0) {
        major.push(v);
        labels.push(powerOfTenLabel(e));
      } else if (decades <= 6 || m === 1) {
        // Over many decades the 2..9 marks would merge into a grey band; keep decades only.
        minor.push(v);
      }
    }
  }
  if (major.length < 2) {
    // A range inside one decade that holds fewer than two of 1, 2, 5: label every m x 10^e.
    const all: LogTicks = { major: [], minor: [], labels: [] };
    for (let e = lo; e <= hi; e++) {
      for (let m = 1; m <= 9; m++) {
        const v = scaleByPowerOfTen(m, e);
        if (inRange(v)) {
          all.major.push(v);
          all.labels.push(mantissaLabel(m, e));
        }
      }
    }
    return all;
  }
  return { major, minor, labels };
}
