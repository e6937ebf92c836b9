// Labels for axis ticks, in the project's number style (SI Brochure, BIPM 9th ed. 2019,
// section 5.4: a true minus sign, powers of ten as "×10ⁿ"). Tick values themselves come
// from d3 (scales.ts); this file only writes them.
// Linear axes: as many decimals as the tick step needs; very large or very small ticks
// (largest |tick| >= 1e5 or < 1e-3) share one power of ten, written once beside the axis.
// Logarithmic axes: decades as 10ⁿ, other ticks as plain decimals (or m×10ⁿ far from 1).

import { superscriptInteger, withMinusSign } from './formatNumber.js';

export interface TickLabels {
  labels: string[];
  /** Common power of ten taken out of the labels (0 = none). */
  scaleExponent: number;
}

/** 10^exponent for an integer exponent, correctly rounded (decimal parsing rounds exactly). */
export function powerOfTen(exponent: number): number {
  return Number(`1e${exponent}`);
}

function decimalExponent(x: number): number {
  return Math.floor(Math.log10(Math.abs(x)) + 1e-9);
}

/** Labels of linear ticks `values` spaced by `step` (> 0; 0 for a single tick). */
export function linearTickLabels(values: readonly number[], step: number): TickLabels {
  let largest = 0;
  for (const v of values) largest = Math.max(largest, Math.abs(v));
  let scaleExponent = 0;
  if (largest >= 1e5 || (largest > 0 && largest < 1e-3)) scaleExponent = decimalExponent(largest);
  // A single tick (degenerate range) has no step: show it with four significant digits.
  const stepExponent = step > 0 ? decimalExponent(step) : scaleExponent - 3;
  const decimals = Math.min(20, Math.max(0, scaleExponent - stepExponent));
  const labels = values.map((v) => {
    const scaled = scaleExponent === 0 ? v : v / powerOfTen(scaleExponent);
    const text = scaled.toFixed(decimals);
    return Number(text) === 0 ? '0' : withMinusSign(text);
  });
  return { labels, scaleExponent };
}

/** The "×10ⁿ" note placed at the end of an axis whose labels were scaled. */
export function scaleNote(scaleExponent: number): string {
  return scaleExponent === 0 ? '' : `\u00D710${superscriptInteger(scaleExponent)}`;
}

/** A tick of a log axis: 10ⁿ at decades, a plain decimal near 1, m×10ⁿ otherwise. */
export function logTickLabel(value: number): string {
  const exponent = decimalExponent(value);
  const mantissa = Math.round((value / powerOfTen(exponent)) * 1e6) / 1e6;
  if (mantissa === 1) return `10${superscriptInteger(exponent)}`;
  if (exponent >= -3 && exponent <= 3) return withMinusSign(Number(value.toPrecision(6)).toString());
  return `${Number(mantissa.toPrecision(6))}\u00D710${superscriptInteger(exponent)}`;
}
