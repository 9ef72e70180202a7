/**
 * The profile of a line region: localizations within width/2 of the line, histogrammed by their
 * position along it (arc length of their nearest point on the line), then fitted with a constant
 * plus one and plus two Gaussians. The two-peak model is kept when it explains the histogram
 * clearly better (lower Akaike information criterion) and both peaks are real (height ≥ 10 % of
 * the taller, centres inside the line). FWHM = 2√(2 ln 2)·σ for each peak; the half-maximum width
 * read off the histogram by linear interpolation is given beside it.
 */
import type { PositionNm } from '@shared/schemas/region.schema'
import { fitGaussians, type GaussianFit } from './gaussian-fit'
import { MeasurementLimitError, REGION_LIMITS } from './limits'
import { segmentDistanceSquared } from './region-shape'

export const FWHM_PER_SIGMA = 2 * Math.sqrt(2 * Math.LN2)

export interface ProfilePeak {
  /** Position along the line from its first vertex, nm. */
  position: number
  sigma: number
  fwhm: number
  /** Fitted height above the background, localizations per bin. */
  height: number
}

export interface LineProfile {
  binNm: number
  lengthNm: number
  widthNm: number
  /** Bin centres along the line and localizations per bin. */
  positions: number[]
  counts: number[]
  peaks: ProfilePeak[]
  /** Distance between the two peaks' centres, nm (null with one peak). */
  peakSeparation: number | null
  background: number
  /** Width at half the highest bin, by linear interpolation of the histogram, nm. */
  fwhmInterpolated: number | null
  /** The fitted curve at each bin centre. */
  fitted: number[]
}

export function checkProfileParams(lengthNm: number, binNm: number) {
  if (!(binNm > 0)) throw new MeasurementLimitError('The bin size must be above 0 nm.')
  if (lengthNm / binNm > REGION_LIMITS.maxProfileBins)
    throw new MeasurementLimitError(
      `A profile has at most ${REGION_LIMITS.maxProfileBins.toLocaleString('en')} bins; this line at ${binNm} nm per bin needs ${Math.ceil(lengthNm / binNm).toLocaleString('en')}. Use larger bins.`,
    )
}

/** Position along the polyline of the nearest point on it to (px, py). */
function arcPosition(line: PositionNm[], cumulative: number[], px: number, py: number): number {
  let best = Infinity
  let at = 0
  for (let s = 0; s + 1 < line.length; s++) {
    const [x0, y0] = line[s]!
    const [x1, y1] = line[s + 1]!
    const d2 = segmentDistanceSquared(px, py, x0, y0, x1, y1)
    if (d2 < best) {
      best = d2
      const dx = x1 - x0
      const dy = y1 - y0
      const len2 = dx * dx + dy * dy
      const t = len2 > 0 ? Math.max(0, Math.min(1, ((px - x0) * dx + (py - y0) * dy) / len2)) : 0
      at = cumulative[s]! + t * Math.sqrt(len2)
    }
  }
  return at
}

export function lineProfile(
  line: PositionNm[],
  widthNm: number,
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  count: number,
  binNm: number,
): LineProfile {
  const cumulative = [0]
  for (let s = 0; s + 1 < line.length; s++)
    cumulative.push(
      cumulative[s]! + Math.hypot(line[s + 1]![0] - line[s]![0], line[s + 1]![1] - line[s]![1]),
    )
  const lengthNm = cumulative[cumulative.length - 1]!
  checkProfileParams(lengthNm, binNm)
  const bins = Math.max(1, Math.ceil(lengthNm / binNm))
  const counts = new Array<number>(bins).fill(0)
  for (let i = 0; i < count; i++) {
    const s = arcPosition(line, cumulative, x[i]!, y[i]!)
    counts[Math.min(bins - 1, Math.floor(s / binNm))]!++
  }
  const positions = counts.map((_, b) => (b + 0.5) * binNm)
  const fit = bestFit(positions, counts, lengthNm)
  const peaks = (fit?.peaks ?? []).map((p) => ({
    position: p.centre,
    sigma: p.sigma,
    fwhm: FWHM_PER_SIGMA * p.sigma,
    height: p.amplitude,
  }))
  return {
    binNm,
    lengthNm,
    widthNm,
    positions,
    counts,
    peaks,
    peakSeparation: peaks.length === 2 ? peaks[1]!.position - peaks[0]!.position : null,
    background: fit?.background ?? 0,
    fwhmInterpolated: halfMaximumWidth(positions, counts),
    fitted: positions.map((s) =>
      fit
        ? fit.background +
          fit.peaks.reduce(
            (v, p) => v + p.amplitude * Math.exp(-0.5 * ((s - p.centre) / p.sigma) ** 2),
            0,
          )
        : 0,
    ),
  }
}

const aic = (fit: GaussianFit, n: number, k: number) => n * Math.log(fit.rss / n + 1e-12) + 2 * k

function bestFit(xs: number[], ys: number[], lengthNm: number): GaussianFit | null {
  const n = xs.length
  const total = ys.reduce((s, v) => s + v, 0)
  if (n < 4 || total < 3) return null
  const floor = Math.min(...ys)
  let top = 0
  ys.forEach((v, i) => (v > ys[top]! ? (top = i) : 0))
  const spread = Math.max(
    xs[1]! - xs[0]!,
    widthAtHalf(xs, ys, top) / FWHM_PER_SIGMA || lengthNm / 10,
  )
  const one = fitGaussians(xs, ys, [floor, ys[top]! - floor, xs[top]!, spread])
  // The second peak starts at the highest bin of what the first one leaves.
  const rest = ys.map(
    (v, i) =>
      v -
      one.background -
      one.peaks[0]!.amplitude *
        Math.exp(-0.5 * ((xs[i]! - one.peaks[0]!.centre) / one.peaks[0]!.sigma) ** 2),
  )
  let second = 0
  rest.forEach((v, i) => (v > rest[second]! ? (second = i) : 0))
  const two = fitGaussians(xs, ys, [
    floor,
    ys[top]! - floor,
    xs[top]!,
    spread / 2,
    Math.max(1, rest[second]!),
    xs[second]!,
    spread / 2,
  ])
  const tallest = Math.max(...two.peaks.map((p) => p.amplitude))
  const realPeaks = two.peaks.every(
    (p) => p.amplitude >= 0.1 * tallest && p.centre >= 0 && p.centre <= lengthNm && p.sigma > 0,
  )
  return realPeaks && aic(two, n, 7) < aic(one, n, 4) - 10 ? two : one
}

/** Width at half of the value at `top`, crossing points by linear interpolation. */
function widthAtHalf(xs: number[], ys: number[], top: number): number {
  const half = ys[top]! / 2
  let left = top
  while (left > 0 && ys[left]! > half) left--
  let right = top
  while (right < ys.length - 1 && ys[right]! > half) right++
  if (ys[left]! > half || ys[right]! > half) return NaN
  const cross = (a: number, b: number) =>
    xs[a]! + ((half - ys[a]!) / (ys[b]! - ys[a]!)) * (xs[b]! - xs[a]!)
  return cross(right, right - 1) - cross(left, left + 1)
}

function halfMaximumWidth(xs: number[], ys: number[]): number | null {
  let top = 0
  ys.forEach((v, i) => (v > ys[top]! ? (top = i) : 0))
  const w = widthAtHalf(xs, ys, top)
  return Number.isFinite(w) ? w : null
}
