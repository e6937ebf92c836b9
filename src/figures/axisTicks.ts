// Axis tick positions a reader can interpolate between: the "nice numbers" idea of
// P. S. Heckbert, "Nice numbers for graph labels", Graphics Gems (Academic Press, 1990),
// pp. 61-63. Linear axes step by 1, 2 or 5 times a power of ten and the axis range is
// widened to whole steps, so the first and last ticks enclose the data. Logarithmic axes
// put major ticks on whole decades (every k-th decade when there are many) and minor
// ticks at 2..9 times each decade when few decades are shown.

import { superscriptInteger, withMinusSign } from '../report/formatNumber.js';

export interface LinearTicks {
  /** Axis range: the data range widened to whole steps. */
  min: number;
  max: number;
  step: number;
  /** Tick values from min to max inclusive. */
  values: number[];
}

export interface LogTicks {
  /** Axis range, whole decades. */
  min: number;
  max: number;
  /** Decade exponents of the major ticks, e.g. [-6, -4, -2, 0]. */
  exponents: number[];
  /** Major tick values 10^exponent. */
  values: number[];
  /** Minor tick values (2..9 times a decade), empty when decades are skipped or many. */
  minorValues: number[];
}

/** 10^exponent for an integer exponent, correctly rounded (parsing is exact-rounding). */
export function powerOfTen(exponent: number): number {
  return Number(`1e${exponent}`);
}

/**
 * Nice linear ticks enclosing [dataMin, dataMax], aiming at about `targetCount` intervals.
 * A zero-width range is widened by 10 % of its value (or to [-1, 1] around zero).
 */
export function niceLinearTicks(dataMin: number, dataMax: number, targetCount = 5): LinearTicks {
  if (!Number.isFinite(dataMin) || !Number.isFinite(dataMax)) {
    throw new RangeError(`niceLinearTicks: dataMin and dataMax must be finite, got ${dataMin} and ${dataMax}`);
  }
  if (dataMin > dataMax) {
    throw new RangeError(`niceLinearTicks: dataMin (${dataMin}) must not exceed dataMax (${dataMax})`);
  }
  if (!Number.isInteger(targetCount) || targetCount < 1) {
    throw new RangeError(`niceLinearTicks: targetCount must be a positive integer, got ${targetCount}`);
  }
  let low = dataMin;
  let high = dataMax;
  // A range at the level of rounding (e.g. equal values computed two ways) counts as zero
  // width: a tick step below ~1e-12 of the values cannot be represented, and the tick count
  // would explode.
  if (high - low <= 1e-12 * Math.max(Math.abs(low), Math.abs(high))) {
    const mid = 0.5 * (low + high);
    low = mid;
    high = mid;
  }
  if (low === high) {
    const pad = low === 0 ? 1 : Math.abs(low) * 0.1;
    low -= pad;
    high += pad;
  }
  const rawStep = (high - low) / targetCount;
  let exponent = Math.floor(Math.log10(rawStep));
  const fraction = rawStep / powerOfTen(exponent);
  // Smallest of 1, 2, 5, 10 (times 10^exponent) not below the raw step: at most
  // targetCount + 1 intervals once the ends are rounded outwards.
  let factor: number;
  if (fraction <= 1 + 1e-9) factor = 1;
  else if (fraction <= 2 + 1e-9) factor = 2;
  else if (fraction <= 5 + 1e-9) factor = 5;
  else {
    factor = 1;
    exponent += 1;
  }
  const step = tickValue(1, factor, exponent);
  // Tolerance so that a value like 0.30000000000000004 still counts as the tick 0.3.
  const first = Math.floor(low / step + 1e-9);
  const last = Math.ceil(high / step - 1e-9);
  const values: number[] = [];
  for (let k = first; k <= last; k++) values.push(tickValue(k, factor, exponent));
  return { min: values[0]!, max: values[values.length - 1]!, step, values };
}

/** k * factor * 10^exponent, computed so that decimal ticks come out as the nearest double. */
function tickValue(k: number, factor: number, exponent: number): number {
  const v = exponent >= 0 ? k * factor * powerOfTen(exponent) : (k * factor) / powerOfTen(-exponent);
  return v === 0 ? 0 : v; // no negative zero
}

/**
 * Decade ticks enclosing [dataMin, dataMax] (both > 0). At most `maxMajor` + 1 major
 * ticks: with more decades than that, every k-th decade is labelled.
 */
export function niceLogTicks(dataMin: number, dataMax: number, maxMajor = 7): LogTicks {
  if (!(dataMin > 0) || !(dataMax > 0) || !Number.isFinite(dataMin) || !Number.isFinite(dataMax)) {
    throw new RangeError(`niceLogTicks: a log axis needs positive finite limits, got ${dataMin} and ${dataMax}`);
  }
  if (dataMin > dataMax) {
    throw new RangeError(`niceLogTicks: dataMin (${dataMin}) must not exceed dataMax (${dataMax})`);
  }
  if (!Number.isInteger(maxMajor) || maxMajor < 1) {
    throw new RangeError(`niceLogTicks: maxMajor must be a positive integer, got ${maxMajor}`);
  }
  let low = Math.floor(Math.log10(dataMin) + 1e-10);
  let high = Math.ceil(Math.log10(dataMax) - 1e-10);
  if (high <= low) high = low + 1;
  const stride = Math.ceil((high - low) / maxMajor);
  // Align the labelled decades on multiples of the stride so that 10^0 is one when in range.
  low = Math.floor(low / stride) * stride;
  high = Math.ceil(high / stride) * stride;
  const exponents: number[] = [];
  for (let e = low; e <= high; e += stride) exponents.push(e);
  const minorValues: number[] = [];
  if (stride === 1 && high - low <= 6) {
    for (let e = low; e < high; e++) {
      for (let m = 2; m <= 9; m++) minorValues.push(Number(`${m}e${e}`));
    }
  }
  return {
    min: powerOfTen(low),
    max: powerOfTen(high),
    exponents,
    values: exponents.map(powerOfTen),
    minorValues,
  };
}

export interface TickLabels {
  labels: string[];
  /** Common power of ten taken out of the labels (0 = none); shown as "×10ⁿ" by the axis. */
  scaleExponent: number;
}

/**
 * Labels for linear ticks with as many decimals as the step needs. Very large or very
 * small ticks share one power of ten, written once beside the axis, so the labels stay short.
 */
export function linearTickLabels(ticks: LinearTicks): TickLabels {
  let largest = 0;
  for (const v of ticks.values) largest = Math.max(largest, Math.abs(v));
  const stepExponent = Math.floor(Math.log10(ticks.step) + 1e-9);
  let scaleExponent = 0;
  if (largest >= 1e5 || (largest > 0 && largest < 1e-3)) {
    scaleExponent = Math.floor(Math.log10(largest) + 1e-9);
  }
  const decimals = Math.max(0, scaleExponent - stepExponent);
  const labels = ticks.values.map((v) => {
    const scaled = scaleExponent === 0 ? v : v / powerOfTen(scaleExponent);
    const text = scaled.toFixed(decimals);
    return Number(text) === 0 ? '0' : withMinusSign(text);
  });
  return { labels, scaleExponent };
}

/** "10ⁿ" labels for decade ticks. */
export function logTickLabels(ticks: LogTicks): string[] {
  return ticks.exponents.map((e) => `10${superscriptInteger(e)}`);
}

/** The "×10ⁿ" note placed at the end of an axis whose labels were scaled. */
export function scaleNote(scaleExponent: number): string {
  return scaleExponent === 0 ? '' : `\u00D710${superscriptInteger(scaleExponent)}`;
}
