// Reading a decimal number out of a table cell without creating a substring.
//
// Accepted: optional spaces, optional sign, digits with an optional decimal separator ('.' or,
// in decimal-comma files, ','), optional exponent (e/E, optional sign, digits), optional spaces.
// At least one digit before or after the separator. Nothing else: no thousands separators, no
// hex, no "Infinity", no units. A cell that does not match is not a number (the caller reports
// it as missing).
//
// Correct rounding: when the significant digits fit in 15 decimal digits (exactly representable
// below 2^53) and the decimal exponent is within ±22 (10^22 is the largest exactly representable
// power of ten), one IEEE multiplication or division of two exact operands gives the correctly
// rounded double (W. D. Clinger, "How to read floating point numbers accurately", PLDI 1990,
// the "fast path"). Every other valid cell goes to Number() on the validated text, which rounds
// correctly too, so the result always equals Number(cell).

const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16,
  1e17, 1e18, 1e19, 1e20, 1e21, 1e22];

const SPACE = 32;
const TAB = 9;
const PLUS = 43;
const MINUS = 45;
const DOT = 46;
const COMMA = 44;
const ZERO = 48;
const NINE = 57;
const LOWER_E = 101;
const UPPER_E = 69;

/** Result of `readNumber` for a cell holding only spaces. */
export const BLANK = -1;
/** Result of `readNumber` for a cell that is not a number. */
export const NOT_A_NUMBER = -2;
/** Result of `readNumber` for a number beyond the range of doubles (e.g. 1e400). */
export const OUT_OF_RANGE = -3;

/**
 * Parses text[start, end). On success stores the value in `out[0]` and returns 0; otherwise returns
 * BLANK, NOT_A_NUMBER or OUT_OF_RANGE. `decimalComma` selects ',' instead of '.' as separator.
 */
export function readNumber(text: string, start: number, end: number, decimalComma: boolean, out: Float64Array): number {
  while (start < end && isSpace(text.charCodeAt(start))) start++;
  while (end > start && isSpace(text.charCodeAt(end - 1))) end--;
  if (start === end) return BLANK;

  const separator = decimalComma ? COMMA : DOT;
  let i = start;
  let c = text.charCodeAt(i);
  let negative = false;
  if (c === MINUS || c === PLUS) {
    negative = c === MINUS;
    i++;
  }
  let mantissa = 0;
  let significant = 0; // significant digits taken into `mantissa`
  let exponent = 0;
  let digits = 0;
  let exact = true;
  for (; i < end; i++) {
    c = text.charCodeAt(i);
    if (c < ZERO || c > NINE) break;
    digits++;
    if (significant === 0 && c === ZERO) continue;
    if (significant < 15) {
      mantissa = mantissa * 10 + (c - ZERO);
      significant++;
    } else {
      exact = false;
    }
  }
  if (i < end && text.charCodeAt(i) === separator) {
    i++;
    for (; i < end; i++) {
      c = text.charCodeAt(i);
      if (c < ZERO || c > NINE) break;
      digits++;
      if (significant === 0 && c === ZERO) {
        exponent--;
        continue;
      }
      if (significant < 15) {
        mantissa = mantissa * 10 + (c - ZERO);
        significant++;
        exponent--;
      } else {
        exact = false;
      }
    }
  }
  if (digits === 0) return NOT_A_NUMBER;
  if (i < end) {
    c = text.charCodeAt(i);
    if (c !== LOWER_E && c !== UPPER_E) return NOT_A_NUMBER;
    i++;
    let expNegative = false;
    if (i < end) {
      c = text.charCodeAt(i);
      if (c === MINUS || c === PLUS) {
        expNegative = c === MINUS;
        i++;
      }
    }
    let expDigits = 0;
    let written = 0;
    for (; i < end; i++) {
      c = text.charCodeAt(i);
      if (c < ZERO || c > NINE) return NOT_A_NUMBER;
      expDigits++;
      if (written < 100000) written = written * 10 + (c - ZERO);
    }
    if (expDigits === 0) return NOT_A_NUMBER;
    exponent += expNegative ? -written : written;
  }

  let value: number;
  if (exact && exponent >= -22 && exponent <= 22) {
    value = exponent < 0 ? mantissa / POW10[-exponent] : mantissa * POW10[exponent];
  } else if (mantissa === 0 && exact) {
    value = 0;
  } else {
    let literal = text.slice(start, end);
    if (decimalComma) literal = literal.replace(',', '.');
    value = Math.abs(Number(literal));
  }
  if (value === Infinity) return OUT_OF_RANGE;
  out[0] = negative ? -value : value;
  return 0;
}

function isSpace(c: number): boolean {
  return c === SPACE || c === TAB || c === 0xa0;
}
