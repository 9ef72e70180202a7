/**
 * Decimal text to a double, read straight from bytes, always the double `Number()` gives.
 *
 * It accepts `[+-]digits[.digits][(e|E)[+-]digits]` (at least one mantissa digit). With at most
 * 15 mantissa digits and a net power of ten within ±22 the mantissa is an exact integer below 2^53
 * and 10^k is exact, so one multiplication or division yields the correctly rounded result
 * (Clinger 1990, "How to read floating point numbers accurately", the fast path). Longer mantissas
 * and larger exponents are rare in localization tables; they go to `Number()` on the same text.
 */

const ZERO = 48
const POINT = 46
const NINE = 57
const MINUS = 45
const PLUS = 43
const LOWER_E = 101
const CASE_BIT = 0x20
const MAX_FAST_DIGITS = 15
const MAX_FAST_EXPONENT = 22

/** Exact powers of ten; `Number('1e22')` is correctly rounded, `10 ** 22` need not be. */
export const POW10 = Float64Array.from({ length: MAX_FAST_EXPONENT + 1 }, (_, k) =>
  Number(`1e${k}`),
)

/** The value of the last successful scan. */
export const scannedValue = new Float64Array(1)

/**
 * Scans a number at `start`. Returns the index of the first byte after it (the value is then in
 * `scannedValue[0]`), or -1 when the bytes there are not a decimal number. The buffer must hold a
 * non-number byte after the number (every chunk ends with a line feed).
 */
export function scanDecimal(u: Uint8Array, start: number, decimalMark: number): number {
  let p = start
  let c = u[p]!
  const negative = c === MINUS
  if (negative || c === PLUS) c = u[++p]!
  const integerStart = p
  let mantissa = 0
  while (c >= ZERO && c <= NINE) {
    mantissa = mantissa * 10 + (c - ZERO)
    c = u[++p]!
  }
  let digits = p - integerStart
  let exponent = 0
  if (c === decimalMark) {
    const fractionStart = ++p
    c = u[p]!
    while (c >= ZERO && c <= NINE) {
      mantissa = mantissa * 10 + (c - ZERO)
      c = u[++p]!
    }
    exponent = fractionStart - p
    digits -= exponent
  }
  if (digits === 0) return -1
  if ((c | CASE_BIT) === LOWER_E) {
    p = scanExponent(u, p + 1)
    if (p < 0) return -1
    exponent += scannedValue[0]!
  }
  if (digits > MAX_FAST_DIGITS || exponent > MAX_FAST_EXPONENT || exponent < -MAX_FAST_EXPONENT) {
    scannedValue[0] = Number(asciiText(u, start, p, decimalMark))
    return p
  }
  const magnitude = exponent < 0 ? mantissa / POW10[-exponent]! : mantissa * POW10[exponent]!
  scannedValue[0] = negative ? -magnitude : magnitude
  return p
}

/** The integer after `e` (in scannedValue[0]) and its end, or -1 when no digit follows. */
function scanExponent(u: Uint8Array, start: number): number {
  let p = start
  let c = u[p]!
  const negative = c === MINUS
  if (negative || c === PLUS) c = u[++p]!
  if (c < ZERO || c > NINE) return -1
  let value = 0
  while (c >= ZERO && c <= NINE) {
    if (value < 100_000) value = value * 10 + (c - ZERO)
    c = u[++p]!
  }
  scannedValue[0] = negative ? -value : value
  return p
}

const latin1 = new TextDecoder('latin1')
function asciiText(u: Uint8Array, start: number, end: number, decimalMark: number): string {
  const text = latin1.decode(u.subarray(start, end))
  return decimalMark === POINT ? text : text.replace(String.fromCharCode(decimalMark), '.')
}
