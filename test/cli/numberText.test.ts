// The one strict number reader of the command line (src/cli/numberText.ts), on plain
// strings: integers in decimal only, reals in the usual decimal and exponent forms (the
// grammar of a JSON number, RFC 8259 section 6, plus a leading '+' or '.' and a trailing
// '.'), each within the option's range, and every refusal names the option, the range and
// the unit.

import { describe, expect, it } from 'vitest';
import { describeReal, parseInteger, parseReal } from '../../src/cli/numberText.js';
import { InputError } from '../../src/scenario/inputError.js';

describe('integers', () => {
  it('accepts decimal whole numbers in range', () => {
    for (const [text, n] of [['16', 16], ['0', 0], ['-3', -3], ['007', 7], ['256', 256]] as const) expect(parseInteger(text, '--n', { min: -5, max: 256 })).toBe(n);
    expect(Object.is(parseInteger('-0', '--n', { min: -5, max: 5 }), 0)).toBe(true);
  });
  it('refuses hex, exponents, fractions, blanks, signs, separators and out-of-range values', () => {
    for (const text of ['0x10', '1e3', '1.0', ' 4', '4 ', '+2', '1_000', '', 'abc', '0b1', '1,5', '257', '-6', 'Infinity', '99999999999999999999']) {
      expect(() => parseInteger(text, '--threads', { min: -5, max: 256 }), text).toThrow(InputError);
      expect(() => parseInteger(text, '--threads', { min: -5, max: 256 }), text).toThrow(`--threads: expected a whole number from -5 to 256, got ${JSON.stringify(text)}`);
    }
  });
});

describe('real numbers', () => {
  it('accepts the usual forms', () => {
    for (const [text, x] of [['0.5', 0.5], ['.5', 0.5], ['5.', 5], ['-2', -2], ['+2', 2], ['1e-3', 1e-3], ['6.02E23', 6.02e23], ['0', 0]] as const) expect(parseReal(text, '--x')).toBe(x);
  });
  it('refuses hex, infinities, NaN, blanks, units and overflow, naming range and unit', () => {
    const range = { min: 0, minOpen: true, unit: 'µm', what: 'the object-plane pixel size' };
    for (const text of ['0x10', 'Infinity', '-Infinity', 'NaN', ' 1', '1 ', '5um', '1e999', '', '.', 'e3', '1..2', '0']) {
      expect(() => parseReal(text, '--pixel-um', range), text).toThrow(`--pixel-um: expected the object-plane pixel size in µm, a number above 0, got ${JSON.stringify(text)}`);
    }
  });
  it('describes ranges in words', () => {
    expect(describeReal({ min: 0, max: 100 })).toBe('a number from 0 to 100');
    expect(describeReal({ min: 0, minOpen: true, max: 10 })).toBe('a number above 0 and at most 10');
    expect(describeReal({ min: -100, minOpen: true, max: 100, maxOpen: true })).toBe('a number above -100 and below 100');
    expect(describeReal({ unit: 'Hz' })).toBe('a number (Hz)');
  });
});
