/**
 * Distance from each localization to its nearest other localization in the region. A radius
 * query around each point starts at about twice the mean spacing and doubles until it finds a
 * neighbour, so a point costs about one query of a dozen candidates.
 */
import { MeasurementLimitError, REGION_LIMITS } from './limits'
import { pointIndex } from './point-index'

export function checkNearestNeighbourParams(count: number) {
  if (count > REGION_LIMITS.maxClusteringPoints)
    throw new MeasurementLimitError(
      `Nearest-neighbour distances take at most ${REGION_LIMITS.maxClusteringPoints.toLocaleString('en')} localizations; this region holds ${count.toLocaleString('en')}.`,
    )
}

/** Nearest-neighbour distance per point, nm (NaN when the region holds one point). */
export function nearestNeighbourDistances(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  count: number,
  area: number,
): Float64Array {
  const out = new Float64Array(count).fill(NaN)
  if (count < 2) return out
  const index = pointIndex(x, y, count)
  const start = 2 * Math.sqrt(area / count) || 1
  for (let i = 0; i < count; i++) {
    const xi = x[i]!
    const yi = y[i]!
    for (let r = start; ; r *= 2) {
      const ids = index.within(xi, yi, r)
      let best = Infinity
      for (const j of ids) {
        if (j === i) continue
        const d2 = (x[j]! - xi) ** 2 + (y[j]! - yi) ** 2
        if (d2 < best) best = d2
      }
      if (best < Infinity) {
        out[i] = Math.sqrt(best)
        break
      }
    }
  }
  return out
}
