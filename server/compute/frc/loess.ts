/**
 * LOESS smoothing (Cleveland 1979): at every point, a weighted least-squares quadratic fitted to
 * the `span` nearest points (the window shifts inwards at the ends so it always holds `span`
 * points), tricube weights (1 − (d/h)³)³. The bandwidth h is one more than the farthest distance in
 * the window, so every point of the window keeps a positive weight — with h equal to the farthest
 * distance, a 5-point window would weight only 3 points and the quadratic would pass through them.
 */
export function loessQuadratic(values: ArrayLike<number>, span: number): Float64Array {
  const n = values.length
  const smoothed = new Float64Array(n)
  const width = Math.min(Math.max(3, Math.floor(span)), n)
  if (n < 3) {
    for (let i = 0; i < n; i++) smoothed[i] = values[i]!
    return smoothed
  }
  const series = Float64Array.from(values)
  for (let i = 0; i < n; i++) {
    const first = Math.min(Math.max(0, i - Math.floor(width / 2)), n - width)
    smoothed[i] = quadraticAt(series, i, first, first + width - 1)
  }
  return smoothed
}

function tricube(distance: number, bandwidth: number): number {
  const r = Math.abs(distance) / bandwidth
  const inner = 1 - r * r * r
  return inner * inner * inner
}

/** Intercept at `centre` of the tricube-weighted quadratic fitted over values[first … last]. */
function quadraticAt(values: Float64Array, centre: number, first: number, last: number): number {
  const bandwidth = Math.max(centre - first, last - centre) + 1
  let s0 = 0
  let s1 = 0
  let s2 = 0
  let s3 = 0
  let s4 = 0
  let t0 = 0
  let t1 = 0
  let t2 = 0
  for (let j = first; j <= last; j++) {
    const d = j - centre
    const w = tricube(d, bandwidth)
    const wd = w * d
    const wdd = wd * d
    const value = values[j]!
    s0 += w
    s1 += wd
    s2 += wdd
    s3 += wdd * d
    s4 += wdd * d * d
    t0 += w * value
    t1 += wd * value
    t2 += wdd * value
  }
  // Cramer's rule for the intercept of the 3×3 normal equations.
  const determinant = s0 * (s2 * s4 - s3 * s3) - s1 * (s1 * s4 - s3 * s2) + s2 * (s1 * s3 - s2 * s2)
  const interceptNumerator =
    t0 * (s2 * s4 - s3 * s3) - s1 * (t1 * s4 - s3 * t2) + s2 * (t1 * s3 - s2 * t2)
  return interceptNumerator / determinant
}

/** LOESS span of the FRC curve: max(5, ⌈L/20⌉) rings, made odd (L = grid side). */
export function frcSmoothingSpan(gridSize: number): number {
  const span = Math.max(5, Math.ceil(gridSize / 20))
  return span % 2 === 0 ? span + 1 : span
}
