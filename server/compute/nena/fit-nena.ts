/**
 * Fit of the next-frame nearest-neighbour distance histogram. Endesfelder et al. 2014 model the
 * distances of one molecule seen in two frames as the distance between two independent Gaussian
 * positions of SD σ: a Rayleigh law of scale √2·σ, p(d) = d/(2σ²)·exp(−d²/(4σ²)). As recalled from
 * memory [M], the paper adds a Gaussian term for neighbours at a typical distance and a term linear
 * in d for unrelated neighbours; we fit the Rayleigh and the linear term (uniformly scattered
 * neighbours have a density growing ∝ d), and leave the Gaussian term out.
 * Expected bin counts are integrated over each bin (no bin-centre approximation):
 *   A·[exp(−a²/4σ²) − exp(−b²/4σ²)] + B·(b² − a²)/R²   for the bin [a, b), R the search radius.
 * For each σ, A ≥ 0 and B ≥ 0 come from linear least squares; σ from a log grid refined by a
 * golden-section search on the residual sum of squares.
 */

export interface NenaFit {
  sigmaNm: number
  /** Pairs attributed to the Rayleigh part (A) and to the linear part (B). */
  rayleighPairs: number
  linearPairs: number
  /** 1 − SSE / total sum of squares about the mean count. */
  rSquared: number
  /** Expected count per bin under the fit. */
  expected: number[]
  /** True when σ sits at the edge of the searched range (the fit did not find a minimum). */
  atBound: boolean
}

/** Rayleigh law of the distance between two positions of SD σ each (scale √2·σ). */
export function nenaRayleighDensity(distanceNm: number, sigmaNm: number): number {
  const s2 = sigmaNm * sigmaNm
  return (distanceNm / (2 * s2)) * Math.exp(-(distanceNm * distanceNm) / (4 * s2))
}

const GRID_STEPS = 80

export function fitNena(edges: number[], counts: number[]): NenaFit {
  const radius = edges[edges.length - 1] ?? 1
  const lowest = Math.max(0.05, ((edges[1] ?? 1) - (edges[0] ?? 0)) / 4)
  const highest = radius / 2
  const ratio = Math.pow(highest / lowest, 1 / GRID_STEPS)
  let bestStep = 0
  let bestError = Infinity
  for (let step = 0; step <= GRID_STEPS; step++) {
    const error = solveAmplitudes(edges, counts, lowest * ratio ** step).error
    if (error < bestError) {
      bestError = error
      bestStep = step
    }
  }
  const from = Math.log(lowest * ratio ** Math.max(0, bestStep - 1))
  const to = Math.log(lowest * ratio ** Math.min(GRID_STEPS, bestStep + 1))
  const sigma = Math.exp(
    goldenMinimum(from, to, (t) => solveAmplitudes(edges, counts, Math.exp(t)).error),
  )
  const { a, b, error, expected } = solveAmplitudes(edges, counts, sigma)
  return {
    sigmaNm: sigma,
    rayleighPairs: a,
    linearPairs: b,
    rSquared: 1 - error / totalSumOfSquares(counts),
    expected,
    atBound: bestStep === 0 || bestStep === GRID_STEPS,
  }
}

/** Non-negative least-squares amplitudes of the two bin profiles at one σ. */
function solveAmplitudes(edges: number[], counts: number[], sigma: number) {
  const radius = edges[edges.length - 1] ?? 1
  const u: number[] = []
  const v: number[] = []
  for (let k = 0; k < counts.length; k++) {
    const low = edges[k] ?? 0
    const high = edges[k + 1] ?? 0
    u.push(
      Math.exp(-(low * low) / (4 * sigma * sigma)) - Math.exp(-(high * high) / (4 * sigma * sigma)),
    )
    v.push((high * high - low * low) / (radius * radius))
  }
  const [uu, uv, vv, uc, vc] = [dot(u, u), dot(u, v), dot(v, v), dot(u, counts), dot(v, counts)]
  const determinant = uu * vv - uv * uv
  let a = determinant > 0 ? (uc * vv - vc * uv) / determinant : 0
  let b = determinant > 0 ? (vc * uu - uc * uv) / determinant : 0
  if (!(a >= 0 && b >= 0)) {
    // Best of the one-term fits: the optimum lies on an edge of the non-negative quadrant.
    const onlyA = uu > 0 ? Math.max(0, uc / uu) : 0
    const onlyB = vv > 0 ? Math.max(0, vc / vv) : 0
    const keepA = onlyA * uc >= onlyB * vc
    a = keepA ? onlyA : 0
    b = keepA ? 0 : onlyB
  }
  const expected = u.map((uk, k) => a * uk + b * (v[k] ?? 0))
  let error = 0
  for (let k = 0; k < counts.length; k++) error += ((counts[k] ?? 0) - (expected[k] ?? 0)) ** 2
  return { a, b, error, expected }
}

function dot(p: number[], q: number[]): number {
  let sum = 0
  for (let k = 0; k < p.length; k++) sum += (p[k] ?? 0) * (q[k] ?? 0)
  return sum
}

function totalSumOfSquares(counts: number[]): number {
  const mean =
    dot(
      counts,
      counts.map(() => 1),
    ) / Math.max(1, counts.length)
  let sum = 0
  for (const count of counts) sum += (count - mean) ** 2
  return sum > 0 ? sum : 1
}

/** Minimum of a unimodal function on [from, to] by golden-section search. */
function goldenMinimum(from: number, to: number, f: (t: number) => number): number {
  const shrink = (Math.sqrt(5) - 1) / 2
  let [lo, hi] = [from, to]
  let left = hi - shrink * (hi - lo)
  let right = lo + shrink * (hi - lo)
  let [fLeft, fRight] = [f(left), f(right)]
  for (let iteration = 0; iteration < 60 && hi - lo > 1e-7; iteration++) {
    if (fLeft < fRight) {
      hi = right
      right = left
      fRight = fLeft
      left = hi - shrink * (hi - lo)
      fLeft = f(left)
    } else {
      lo = left
      left = right
      fLeft = fRight
      right = lo + shrink * (hi - lo)
      fRight = f(right)
    }
  }
  return (lo + hi) / 2
}
