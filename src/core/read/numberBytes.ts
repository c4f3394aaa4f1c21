/**
 * Numbers read straight from UTF-8 bytes, bit-identical to `Number()` on the same text.
 *
 * Grammar of a numeric cell (after the surrounding spaces are trimmed by the caller):
 *   [+-]? ( digits [ '.' digits? ] | '.' digits ) ( [eE] [+-]? digits )?
 * with the decimal separator `.` (or `,` with the decimal-comma option) and, when a thousands
 * separator is configured, that separator allowed between two digits of the integer part (the
 * group lengths are not checked). Hexadecimal, binary and `Infinity` forms that `Number()` also
 * accepts are not numbers here; the infinity tokens are recognised separately (`infinityFromBytes`).
 *
 * The fast path is Clinger's: when every digit fits an integer mantissa below 2^53 (so it is exact)
 * and the decimal exponent lies within ±22 (so 10^|e| is an exact double), one IEEE multiplication
 * or division gives the correctly rounded result, which is what `Number()` returns. Anything else
 * is handed to `Number()` on the (normalised) text of the slice.
 * W. D. Clinger, "How to read floating point numbers accurately", PLDI 1990, section 4.
 */

/** Exact powers of ten representable as doubles: 10^0 … 10^22. */
const EXACT_POWERS_OF_TEN: Float64Array = (() => {
  const powers = new Float64Array(23);
  let power = 1;
  for (let i = 0; i < 23; i++) {
    powers[i] = power;
    power *= 10;
  }
  return powers;
})();

const TWO_TO_53 = 9007199254740992;

const PLUS = 0x2b;
const MINUS = 0x2d;
const DOT = 0x2e;
const COMMA = 0x2c;
const DIGIT_ZERO = 0x30;
const LOWER_E = 0x65;
const UPPER_E = 0x45;

/** How numbers are written in a file: decimal separator byte and an optional thousands separator byte (-1 = none). */
export interface NumberSyntax {
  decimalSeparator: number;
  thousandsSeparator: number;
}

export const PLAIN_NUMBER_SYNTAX: NumberSyntax = { decimalSeparator: DOT, thousandsSeparator: -1 };

export function numberSyntax(decimalComma: boolean | undefined, thousandsSeparator: string | undefined): NumberSyntax {
  return {
    decimalSeparator: decimalComma ? COMMA : DOT,
    thousandsSeparator: thousandsSeparator === undefined || thousandsSeparator === '' ? -1 : thousandsSeparator.charCodeAt(0),
  };
}

/**
 * The number written in bytes[start, end), or NaN when the bytes do not follow the grammar above.
 * (The grammar never describes NaN, so NaN unambiguously means "not a number".)
 */
export function parseNumberBytes(bytes: Uint8Array, start: number, end: number, syntax: NumberSyntax): number {
  let p = start;
  if (p >= end) return NaN;
  let negative = false;
  let c = bytes[p];
  if (c === MINUS || c === PLUS) {
    negative = c === MINUS;
    p++;
  }
  const decimal = syntax.decimalSeparator;
  const thousands = syntax.thousandsSeparator;
  let mantissa = 0;
  let digits = 0;
  let fractionDigits = 0;
  let separators = 0;
  // Integer part.
  while (p < end) {
    c = bytes[p];
    const digit = c - DIGIT_ZERO;
    if (digit >= 0 && digit <= 9) {
      mantissa = mantissa * 10 + digit;
      digits++;
      p++;
    } else if (c === thousands && digits > 0 && p + 1 < end && bytes[p + 1] - DIGIT_ZERO >= 0 && bytes[p + 1] - DIGIT_ZERO <= 9) {
      separators++;
      p++;
    } else {
      break;
    }
  }
  const integerDigits = digits;
  // Fraction part.
  if (p < end && bytes[p] === decimal) {
    p++;
    while (p < end) {
      const digit = bytes[p] - DIGIT_ZERO;
      if (digit < 0 || digit > 9) break;
      mantissa = mantissa * 10 + digit;
      digits++;
      fractionDigits++;
      p++;
    }
  }
  if (digits === 0) return NaN;
  // Exponent part.
  let exponent = 0;
  if (p < end && (bytes[p] === LOWER_E || bytes[p] === UPPER_E)) {
    p++;
    let exponentNegative = false;
    if (p < end && (bytes[p] === MINUS || bytes[p] === PLUS)) {
      exponentNegative = bytes[p] === MINUS;
      p++;
    }
    const exponentStart = p;
    while (p < end) {
      const digit = bytes[p] - DIGIT_ZERO;
      if (digit < 0 || digit > 9) break;
      // Saturate: beyond this the value is 0 or Infinity anyway, decided by Number() below.
      if (exponent < 100000) exponent = exponent * 10 + digit;
      p++;
    }
    if (p === exponentStart) return NaN;
    if (exponentNegative) exponent = -exponent;
  }
  if (p !== end) return NaN;
  if (integerDigits === 0 && fractionDigits === 0) return NaN;
  const scale = exponent - fractionDigits;
  if (mantissa < TWO_TO_53 && scale >= -22 && scale <= 22) {
    const magnitude = scale >= 0 ? mantissa * EXACT_POWERS_OF_TEN[scale] : mantissa / EXACT_POWERS_OF_TEN[-scale];
    return negative ? -magnitude : magnitude;
  }
  return Number(normalizedText(bytes, start, end, syntax, separators));
}

/** The slice as text `Number()` understands: thousands separators dropped, decimal comma made a point. */
function normalizedText(bytes: Uint8Array, start: number, end: number, syntax: NumberSyntax, separators: number): string {
  let text = '';
  const plain = separators === 0 && syntax.decimalSeparator === DOT;
  for (let i = start; i < end; i++) {
    const c = bytes[i];
    if (!plain && c === syntax.thousandsSeparator && c !== syntax.decimalSeparator) continue;
    text += String.fromCharCode(!plain && c === syntax.decimalSeparator ? DOT : c);
  }
  return text;
}

const LOWER_CASE_BIT = 0x20;

/**
 * ±Infinity for the tokens `inf` and `infinity` in any letter case with an optional sign
 * (`Inf`, `-Inf`, `inf`, `Infinity`, `+INF` …); 0 when the bytes are not such a token.
 */
export function infinityFromBytes(bytes: Uint8Array, start: number, end: number): number {
  let p = start;
  let sign = 1;
  if (p < end && (bytes[p] === MINUS || bytes[p] === PLUS)) {
    if (bytes[p] === MINUS) sign = -1;
    p++;
  }
  const length = end - p;
  if (length !== 3 && length !== 8) return 0;
  const word = length === 3 ? 'inf' : 'infinity';
  for (let i = 0; i < length; i++) {
    if ((bytes[p + i] | LOWER_CASE_BIT) !== word.charCodeAt(i)) return 0;
  }
  return sign * Infinity;
}

/**
 * The scanner's shortcut for the common cell: the number starting exactly at bytes[p] (no spaces,
 * no thousands separators), read only when Clinger's fast path applies. Writes it to out[at] and
 * returns the offset after it, or returns -1 (out untouched) when the caller must take the general
 * route (parseNumberBytes), which decides every other case. The caller checks what follows (a
 * delimiter or the line end). The value goes to the array rather than being returned: a double
 * returned from a call that is not inlined is boxed, one heap number per cell.
 */
export function plainNumberInto(bytes: Uint8Array, p: number, decimal: number, out: Float64Array, at: number): number {
  let c = bytes[p];
  let negative = false;
  if (c === MINUS) {
    negative = true;
    c = bytes[++p];
  } else if (c === PLUS) c = bytes[++p];
  let mantissa = 0;
  let digits = 0;
  let fractionDigits = 0;
  while (c >= DIGIT_ZERO && c <= DIGIT_ZERO + 9) {
    mantissa = mantissa * 10 + (c - DIGIT_ZERO);
    digits++;
    c = bytes[++p];
  }
  if (c === decimal) {
    c = bytes[++p];
    while (c >= DIGIT_ZERO && c <= DIGIT_ZERO + 9) {
      mantissa = mantissa * 10 + (c - DIGIT_ZERO);
      fractionDigits++;
      c = bytes[++p];
    }
  }
  if (digits + fractionDigits === 0) return -1;
  let exponent = 0;
  if (c === LOWER_E || c === UPPER_E) {
    c = bytes[++p];
    let exponentNegative = false;
    if (c === MINUS || c === PLUS) {
      exponentNegative = c === MINUS;
      c = bytes[++p];
    }
    let exponentDigits = 0;
    while (c >= DIGIT_ZERO && c <= DIGIT_ZERO + 9 && exponentDigits < 4) {
      exponent = exponent * 10 + (c - DIGIT_ZERO);
      exponentDigits++;
      c = bytes[++p];
    }
    if (exponentDigits === 0 || (c >= DIGIT_ZERO && c <= DIGIT_ZERO + 9)) return -1;
    if (exponentNegative) exponent = -exponent;
  }
  const scale = exponent - fractionDigits;
  if (mantissa >= TWO_TO_53 || scale < -22 || scale > 22) return -1;
  const magnitude = scale >= 0 ? mantissa * EXACT_POWERS_OF_TEN[scale] : mantissa / EXACT_POWERS_OF_TEN[-scale];
  out[at] = negative ? -magnitude : magnitude;
  return p;
}
