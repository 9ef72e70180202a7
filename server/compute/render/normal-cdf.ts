/**
 * erf and the standard normal CDF Φ. erf comes from its Maclaurin series for |x| ≤ 3 and from
 * Laplace's continued fraction for erfc beyond (both textbook forms; within 1e-13 of reference
 * values). Φ is then tabulated once, so the Gaussian render pays a table lookup per pixel edge.
 */

const TWO_OVER_SQRT_PI = 2 / Math.sqrt(Math.PI)

export function erf(x: number): number {
  if (Number.isNaN(x)) return NaN
  const a = Math.abs(x)
  const value = a <= 3 ? erfSeries(a) : 1 - erfcContinuedFraction(a)
  return x < 0 ? -value : value
}

/** erf(x) = 2/√π Σ (−1)ⁿ x^(2n+1) / (n! (2n+1)); terms peak near 170 at x = 3, so little is lost. */
function erfSeries(x: number): number {
  const x2 = x * x
  let power = x
  let sum = x
  for (let n = 1; n < 200; n++) {
    power *= -x2 / n
    const term = power / (2 * n + 1)
    sum += term
    if (Math.abs(term) < 1e-17 * Math.abs(sum)) break
  }
  return sum * TWO_OVER_SQRT_PI
}

/** erfc(x) = e^(−x²)/√π · 1/(x + ½/(x + 1/(x + 3⁄2/(x + …)))), x > 0, evaluated from the tail. */
function erfcContinuedFraction(x: number): number {
  let tail = x
  for (let k = 80; k >= 1; k--) tail = x + k / 2 / tail
  return Math.exp(-x * x) / Math.sqrt(Math.PI) / tail
}

/** Φ is 0 or 1 to double precision beyond ±this many standard deviations. */
const CDF_RANGE = 9
const CDF_STEPS_PER_UNIT = 1024
const cdfTable = buildCdfTable()

function buildCdfTable(): Float64Array {
  const table = new Float64Array(2 * CDF_RANGE * CDF_STEPS_PER_UNIT + 2)
  for (let k = 0; k < table.length; k++) {
    const t = k / CDF_STEPS_PER_UNIT - CDF_RANGE
    table[k] = 0.5 * (1 + erf(t / Math.SQRT2))
  }
  return table
}

/**
 * Φ(t) by linear interpolation in the table: error ≤ h²/8 · max|Φ''| = 0.242/(8·1024²) ≈ 3e-8,
 * far below a float32 pixel's resolution of a kernel weight.
 */
export function normalCdf(t: number): number {
  const u = (t + CDF_RANGE) * CDF_STEPS_PER_UNIT
  if (!(u > 0)) return 0
  if (u >= 2 * CDF_RANGE * CDF_STEPS_PER_UNIT) return 1
  const k = u | 0
  const low = cdfTable[k]!
  return low + (u - k) * (cdfTable[k + 1]! - low)
}
