/**
 * Decimal text to a double, read straight from bytes.
 *
 * The fast path takes `[+-]digits[.digits][(e|E)[+-]digits]` with at most 15 mantissa digits and a
 * net power of ten within ±22. The mantissa is then an exact integer below 2^53 and 10^k is exact
 * for k ≤ 22, so one multiplication or division gives the correctly rounded result, the same double
 * `Number()` returns (Clinger 1990, "How to read floating point numbers accurately", the fast path).
 * Anything outside that form returns NaN and the caller decides with the slow path.
 */

const ZERO = 48
const NINE = 57
const MINUS = 45
const PLUS = 43
const LOWER_E = 101
const UPPER_E = 69
const MAX_FAST_DIGITS = 15
const MAX_FAST_EXPONENT = 22

/** Exact powers of ten; `Number('1e22')` is correctly rounded, `10 ** 22` need not be. */
const POW10 = Float64Array.from({ length: MAX_FAST_EXPONENT + 1 }, (_, k) => Number(`1e${k}`))

/** Where the last successful scan stopped (the first byte after the number). */
export const scanned = { end: 0 }

/**
 * Reads a number starting at `p`. Returns NaN when the bytes are not in the fast form; the text is
 * then left to `classifyFieldText`. The buffer must hold a non-digit byte after the number (every
 * chunk ends with a line feed), so the loops never run past its end.
 */
export function scanDecimal(u: Uint8Array, start: number, decimalMark: number): number {
  let p = start
  let c = u[p]!
  const negative = c === MINUS
  if (negative || c === PLUS) c = u[++p]!
  let mantissa = 0
  let digits = 0
  while (c >= ZERO && c <= NINE) {
    mantissa = mantissa * 10 + (c - ZERO)
    digits++
    c = u[++p]!
  }
  let exponent = 0
  if (c === decimalMark) {
    c = u[++p]!
    while (c >= ZERO && c <= NINE) {
      mantissa = mantissa * 10 + (c - ZERO)
      digits++
      exponent--
      c = u[++p]!
    }
  }
  if (digits === 0 || digits > MAX_FAST_DIGITS) return NaN
  if (c === LOWER_E || c === UPPER_E) {
    const stated = scanExponent(u, p + 1)
    if (stated !== stated) return NaN
    exponent += stated
    p = scanned.end
  }
  scanned.end = p
  let value = mantissa
  if (exponent > 0) {
    if (exponent > MAX_FAST_EXPONENT) return NaN
    value = mantissa * POW10[exponent]!
  } else if (exponent < 0) {
    if (exponent < -MAX_FAST_EXPONENT) return NaN
    value = mantissa / POW10[-exponent]!
  }
  return negative ? -value : value
}

/** The integer after `e`; NaN when no digit follows. Large values saturate (they leave the fast path). */
function scanExponent(u: Uint8Array, start: number): number {
  let p = start
  let c = u[p]!
  const negative = c === MINUS
  if (negative || c === PLUS) c = u[++p]!
  if (c < ZERO || c > NINE) return NaN
  let value = 0
  while (c >= ZERO && c <= NINE) {
    if (value < 10_000) value = value * 10 + (c - ZERO)
    c = u[++p]!
  }
  scanned.end = p
  return negative ? -value : value
}
