/**
 * Ripley's K, L = √(K/π) and H = L − r (Ripley 1977) for the localizations in a region, with the
 * translation edge correction w = A / |W ∩ (W + d)| for any region shape (the window's set
 * covariance |W ∩ (W + d)| is the autocorrelation of its pixel coverage), and an envelope of
 * complete spatial randomness: the same number of points placed uniformly in the same shape, in
 * `simulations` seeded runs; simulation s always uses seed + s, so runs split across threads give
 * the same envelope. The pixel method is in ripley-grid.ts.
 */
import { fft2d } from '../fft'
import { Random } from '../simulate'
import {
  binPoints,
  displacementWeights,
  ripleyGrid,
  type DisplacementWeights,
  type RipleyGrid,
} from './ripley-grid'
import type { RegionShape } from './region-shape'
import { MeasurementLimitError, REGION_LIMITS } from './limits'

export type EdgeCorrection = 'translation' | 'none'

export interface RipleyParams {
  /** Largest r, nm. */
  rMax: number
  /** Values of r: rMax·k/steps for k = 1…steps. */
  steps: number
  simulations: number
  seed: number
  correction: EdgeCorrection
}

export interface RipleyCurves {
  r: number[]
  K: number[]
  L: number[]
  H: number[]
  /** Pointwise lowest and highest L(r) of the simulations (null without simulations). */
  envelope: { low: number[]; high: number[] } | null
  simulations: number
  pixelNm: number
  correction: EdgeCorrection
}

export function checkRipleyParams(count: number, shape: RegionShape, p: RipleyParams) {
  const b = shape.bounds
  const shorter = Math.min(b.xMax - b.xMin, b.yMax - b.yMin)
  if (count < 2)
    throw new MeasurementLimitError('Ripley’s functions need at least 2 localizations.')
  if (!(p.rMax > 0) || p.rMax > shorter / 2)
    throw new MeasurementLimitError(
      `rMax must be above 0 and at most half the region's shorter side (${Math.floor(shorter / 2)} nm here): beyond it the edge correction rests on too few pairs.`,
    )
  if (!Number.isInteger(p.steps) || p.steps < 1 || p.steps > REGION_LIMITS.maxRadii)
    throw new MeasurementLimitError(`steps is a whole number from 1 to ${REGION_LIMITS.maxRadii}.`)
  if (
    !Number.isInteger(p.simulations) ||
    p.simulations < 0 ||
    p.simulations > REGION_LIMITS.maxSimulations
  )
    throw new MeasurementLimitError(
      `simulations is a whole number from 0 to ${REGION_LIMITS.maxSimulations}.`,
    )
  if (count * p.simulations > REGION_LIMITS.maxSimulatedPoints)
    throw new MeasurementLimitError(
      `${p.simulations} simulations of ${count.toLocaleString('en')} localizations exceed the limit of ${REGION_LIMITS.maxSimulatedPoints.toLocaleString('en')} simulated localizations; use at most ${Math.floor(REGION_LIMITS.maxSimulatedPoints / count)} simulations or a smaller region.`,
    )
}

export const radiiFor = (rMax: number, steps: number) =>
  Array.from({ length: steps }, (_, k) => (rMax * (k + 1)) / steps)

/** What every part of one Ripley computation shares: grid, weights, window covariance. */
export interface RipleySetup {
  grid: RipleyGrid
  weights: DisplacementWeights
  /** |W ∩ (W + d)| per displacement of `weights`, nm². */
  overlap: Float64Array
  radii: number[]
  area: number
}

export function ripleySetup(shape: RegionShape, rMax: number, steps: number): RipleySetup {
  const grid = ripleyGrid(shape, rMax, shape.vertices)
  const radii = radiiFor(rMax, steps)
  const weights = displacementWeights(grid, radii)
  const [windowCorrelation] = autocorrelations(grid.size, grid.coverage)
  const p2 = grid.pixelNm * grid.pixelNm
  const overlap = new Float64Array(weights.cells.length)
  weights.cells.forEach((cell, o) => (overlap[o] = windowCorrelation![cell]! * p2))
  return { grid, weights, overlap, radii, area: shape.area }
}

/** Autocorrelations of one or two real images through one complex FFT pair. */
function autocorrelations(size: number, a: Float64Array, b?: Float64Array): Float64Array[] {
  const re = Float64Array.from(a)
  const im = b ? Float64Array.from(b) : new Float64Array(size * size)
  fft2d(re, im, size)
  const mask = size - 1
  const powA = new Float64Array(size * size)
  const powB = new Float64Array(size * size)
  for (let row = 0; row < size; row++) {
    const mirrorRow = ((size - row) & mask) * size
    for (let col = 0; col < size; col++) {
      const k = row * size + col
      const m = mirrorRow + ((size - col) & mask)
      // Z = A + iB at k, W = Z at −k: |A|² = (|Z|² + |W|²)/4 + Re(Z·W)/2, |B|² = … − Re(Z·W)/2.
      const zr = re[k]!
      const zi = im[k]!
      const wr = re[m]!
      const wi = im[m]!
      const sum = (zr * zr + zi * zi + wr * wr + wi * wi) / 4
      const product = (zr * wr - zi * wi) / 2
      powA[k] = sum + product
      powB[k] = sum - product
    }
  }
  // Both power spectra are real and even, so one inverse transform returns both correlations.
  fft2d(powA, powB, size, true)
  return b ? [powA, powB] : [powA]
}

/** K(r) at every radius from a counts autocorrelation. */
function kFromCorrelation(
  setup: RipleySetup,
  correlation: Float64Array,
  n: number,
  correction: EdgeCorrection,
): Float64Array {
  const { weights, overlap, area } = setup
  const R = weights.radii
  const k = new Float64Array(R)
  const zero = 0 // the zero displacement's cell: each point paired with itself is taken out
  for (let o = 0; o < weights.cells.length; o++) {
    const cell = weights.cells[o]!
    let pairs = correlation[cell]!
    if (cell === zero) pairs -= n
    if (Math.abs(pairs) < 1e-6) continue
    const weight = correction === 'translation' ? (pairs * area) / overlap[o]! : pairs
    const base = o * R
    for (let j = 0; j < R; j++) k[j]! += weight * weights.within[base + j]!
  }
  const scale = area / (n * (n - 1))
  for (let j = 0; j < R; j++) k[j]! *= scale
  return k
}

const lOf = (k: number) => Math.sqrt(Math.max(0, k) / Math.PI)

/**
 * CSR counts: n points placed independently in the region, each pixel drawn with its coverage —
 * a multinomial over the covered pixels, drawn pixel by pixel as conditional binomials
 * (n_i ~ Bin(n − placed, p_i / p_rest)), so memory is walked in order instead of scattered.
 */
function csrSampler(grid: RipleyGrid) {
  const cells: number[] = []
  for (let c = 0; c < grid.coverage.length; c++) if (grid.coverage[c]! > 0) cells.push(c)
  const cellOf = Int32Array.from(cells)
  const share = Float64Array.from(cells, (c) => grid.coverage[c]!)
  // Share of the pixels from i on, summed from the end so no subtraction error builds up.
  const rest = new Float64Array(share.length + 1)
  for (let i = share.length - 1; i >= 0; i--) rest[i] = rest[i + 1]! + share[i]!
  return (n: number, random: Random, out: Float64Array) => {
    out.fill(0)
    let left = n
    for (let i = 0; i < cellOf.length && left > 0; i++) {
      const q = Math.min(1, share[i]! / rest[i]!)
      out[cellOf[i]!] = q >= 1 ? left : binomial(left, q, random)
      left -= out[cellOf[i]!]!
    }
    return out
  }
}

/** Bin(m, q) by inversion of its distribution function (one uniform; a few steps at small m·q). */
function binomial(m: number, q: number, random: Random): number {
  if (q <= 0) return 0
  const mean = m * q
  // Past ~700 expected points per pixel the first term underflows; the normal law is exact enough there.
  if (mean > 500) {
    const k = Math.round(mean + Math.sqrt(mean * (1 - q)) * random.normal())
    return Math.min(m, Math.max(0, k))
  }
  const u = random.uniform()
  let p = Math.exp(m * Math.log1p(-q))
  const ratio = q / (1 - q)
  let cdf = p
  let k = 0
  while (u >= cdf && k < m) {
    p *= ((m - k) / (k + 1)) * ratio
    k++
    cdf += p
    if (p < 1e-300) break
  }
  return k
}

/** L(r) of simulations `from` … `to` − 1, folded into pointwise low and high. */
export function simulateEnvelope(
  setup: RipleySetup,
  n: number,
  params: RipleyParams,
  from: number,
  to: number,
) {
  const R = setup.radii.length
  const low = new Float64Array(R).fill(Infinity)
  const high = new Float64Array(R).fill(-Infinity)
  const sample = csrSampler(setup.grid)
  const cells = setup.grid.size * setup.grid.size
  const a = new Float64Array(cells)
  const b = new Float64Array(cells)
  const fold = (k: Float64Array) => {
    for (let j = 0; j < R; j++) {
      const l = lOf(k[j]!)
      if (l < low[j]!) low[j] = l
      if (l > high[j]!) high[j] = l
    }
  }
  for (let s = from; s < to; s += 2) {
    sample(n, new Random(params.seed + s), a)
    const pair = s + 1 < to
    if (pair) sample(n, new Random(params.seed + s + 1), b)
    const correlations = autocorrelations(setup.grid.size, a, pair ? b : undefined)
    for (const c of correlations) fold(kFromCorrelation(setup, c, n, params.correction))
  }
  return { low, high }
}

/** The region's own K, L, H (no envelope). */
export function observedCurves(
  setup: RipleySetup,
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  n: number,
  correction: EdgeCorrection,
) {
  const counts = binPoints(setup.grid, x, y, n)
  const [correlation] = autocorrelations(setup.grid.size, counts)
  const K = Array.from(kFromCorrelation(setup, correlation!, n, correction))
  const L = K.map(lOf)
  return { K, L, H: L.map((l, j) => l - setup.radii[j]!) }
}

/** Everything on one thread (tests and small regions; measure-runner splits the simulations). */
export function ripley(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  n: number,
  shape: RegionShape,
  params: RipleyParams,
): RipleyCurves {
  checkRipleyParams(n, shape, params)
  const setup = ripleySetup(shape, params.rMax, params.steps)
  const observed = observedCurves(setup, x, y, n, params.correction)
  const envelope =
    params.simulations > 0 ? simulateEnvelope(setup, n, params, 0, params.simulations) : null
  return assembleCurves(setup, observed, envelope ? [envelope] : [], params)
}

export function assembleCurves(
  setup: RipleySetup,
  observed: { K: number[]; L: number[]; H: number[] },
  parts: { low: Float64Array; high: Float64Array }[],
  params: RipleyParams,
): RipleyCurves {
  const R = setup.radii.length
  const envelope = parts.length
    ? {
        low: Array.from({ length: R }, (_, j) => Math.min(...parts.map((p) => p.low[j]!))),
        high: Array.from({ length: R }, (_, j) => Math.max(...parts.map((p) => p.high[j]!))),
      }
    : null
  return {
    r: setup.radii,
    ...observed,
    envelope,
    simulations: params.simulations,
    pixelNm: setup.grid.pixelNm,
    correction: params.correction,
  }
}
