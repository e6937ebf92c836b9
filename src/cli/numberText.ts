// The one strict reader of numbers written on the command line, used by every option.
//
// Integers: decimal digits only, with an optional minus sign: "16", "-3". Refused: hex
// ("0x10"), exponents ("1e3"), fractions ("1.0"), blanks (" 4"), separators ("1_000"),
// a leading "+", and anything beyond the safe integer range.
// Real numbers: the usual decimal and exponent forms: "0.5", ".5", "5.", "-2", "1e-3",
// "6.02E23". Refused: hex, "Infinity", "NaN", blanks, separators, a trailing unit
// ("5um": the unit is in the option's name), values that overflow to infinity.
// Every refusal is an InputError naming the option, what it expects (range and unit) and
// what was given.

import { InputError } from '../scenario/inputError.js';

const INTEGER = /^-?\d+$/;
const REAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

export interface IntegerRange {
  min: number;
  max: number;
}

export interface RealRange {
  /** lower bound and whether it is included (default: included) */
  min?: number;
  minOpen?: boolean;
  max?: number;
  maxOpen?: boolean;
  /** unit the value is read in, for messages, e.g. 'µm' */
  unit?: string;
  /** what the number is, for messages, e.g. 'the object-plane pixel size' */
  what?: string;
}

const shown = (text: string): string => JSON.stringify(text.length > 60 ? `${text.slice(0, 57)}...` : text);

export function describeInteger(range: IntegerRange): string {
  return range.max === Number.MAX_SAFE_INTEGER ? `a whole number of at least ${range.min}` : `a whole number from ${range.min} to ${range.max}`;
}

export function describeReal(range: RealRange): string {
  const { min: lo, max: hi } = range;
  let bounds: string;
  if (lo !== undefined && hi !== undefined && !range.minOpen && !range.maxOpen) bounds = ` from ${lo} to ${hi}`;
  else {
    const parts: string[] = [];
    if (lo !== undefined) parts.push(range.minOpen ? `above ${lo}` : `of at least ${lo}`);
    if (hi !== undefined) parts.push(range.maxOpen ? `below ${hi}` : `at most ${hi}`);
    bounds = parts.length > 0 ? ` ${parts.join(' and ')}` : '';
  }
  const number = `a number${bounds}`;
  if (range.what) return `${range.what}${range.unit ? ` in ${range.unit}` : ''}, ${number}`;
  return range.unit ? `${number} (${range.unit})` : number;
}

/** A whole number in decimal within `range`; `option` names the option in messages. */
export function parseInteger(text: string, option: string, range: IntegerRange): number {
  const n = INTEGER.test(text) ? Number(text) : NaN;
  if (!Number.isSafeInteger(n) || n < range.min || n > range.max) {
    throw new InputError(`${option}: expected ${describeInteger(range)}, got ${shown(text)}`);
  }
  return n === 0 ? 0 : n; // no -0
}

/** A finite real number in decimal or exponent form within `range`. */
export function parseReal(text: string, option: string, range: RealRange = {}): number {
  const x = REAL.test(text) ? Number(text) : NaN;
  const below = range.min !== undefined && (range.minOpen ? !(x > range.min) : !(x >= range.min));
  const above = range.max !== undefined && (range.maxOpen ? !(x < range.max) : !(x <= range.max));
  if (!Number.isFinite(x) || below || above) throw new InputError(`${option}: expected ${describeReal(range)}, got ${shown(text)}`);
  return x === 0 ? 0 : x;
}
