// Number formatting for tables, tick labels and captions. Follows the typographic
// conventions of the SI Brochure (BIPM, 9th edition 2019, section 5.4): a true minus
// sign, powers of ten written as "× 10^n" rather than computer "e" notation. Exponents use
// the Unicode superscript digits, which plain text, HTML and SVG all display.

const SUPERSCRIPT: Record<string, string> = {
  '0': '\u2070', '1': '\u00B9', '2': '\u00B2', '3': '\u00B3', '4': '\u2074',
  '5': '\u2075', '6': '\u2076', '7': '\u2077', '8': '\u2078', '9': '\u2079', '-': '\u207B',
};

export const MINUS_SIGN = '\u2212';

/** An integer exponent as superscript text, e.g. -5 -> "⁻⁵". */
export function superscriptInteger(exponent: number): string {
  return String(Math.trunc(exponent)).replace(/[0-9-]/g, (ch) => SUPERSCRIPT[ch]!);
}

/** Replace the ASCII hyphen used by Number#toString for negatives by a minus sign. */
export function withMinusSign(text: string): string {
  return text.startsWith('-') ? MINUS_SIGN + text.slice(1) : text;
}

/** Drop trailing zeros after a decimal point ("1.2500" -> "1.25", "3.000" -> "3"). */
function trimZeros(fixed: string): string {
  return fixed.includes('.') ? fixed.replace(/\.?0+$/, '') : fixed;
}

/**
 * A number for people: integers below 10^6 in full, other values in [1e-3, 1e6) with
 * `significantDigits` significant digits, everything else as "m × 10ⁿ".
 */
export function formatNumber(value: number, significantDigits = 4): string {
  if (Number.isNaN(value)) return 'NaN';
  if (value === Infinity) return '\u221E';
  if (value === -Infinity) return MINUS_SIGN + '\u221E';
  if (value === 0) return '0';
  const digits = Math.min(15, Math.max(1, Math.round(significantDigits)));
  const magnitude = Math.abs(value);
  if (Number.isInteger(value) && magnitude < 1e6) return withMinusSign(String(value));
  if (magnitude >= 1e-3 && magnitude < 1e6) {
    const precise = value.toPrecision(digits);
    // toPrecision switches to e-notation once the integer part has more digits than asked.
    const text = precise.includes('e') ? value.toFixed(0) : trimZeros(precise);
    return withMinusSign(text);
  }
  return formatScientific(value, digits);
}

/** "m × 10ⁿ" with `significantDigits` digits in the mantissa, trailing zeros dropped. */
export function formatScientific(value: number, significantDigits = 4): string {
  if (!Number.isFinite(value) || value === 0) return formatNumber(value);
  const [mantissa, exponent] = value.toExponential(Math.max(0, significantDigits - 1)).split('e');
  return `${withMinusSign(trimZeros(mantissa!))} \u00D7 10${superscriptInteger(Number(exponent))}`;
}
