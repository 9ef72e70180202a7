import type { Localizations } from '../localizations.types'
import { CellBuckets, orderRowsByFrame } from '../merge'

export interface DistanceHistogram {
  /** Bin edges, nm: edges[k] … edges[k + 1] for counts[k]; edges[0] = 0, last = search radius. */
  edges: number[]
  counts: number[]
  /** Localizations with a neighbour within the search radius in the next frame. */
  pairs: number
  /** Adjacent frame pairs (f, f + 1) that both hold localizations. */
  adjacentFrames: number
  excludedRows: number
}

/**
 * For every localization in frame f, the distance to its nearest localization in frame f + 1, if
 * one lies within the search radius, tallied straight into a histogram (no per-pair storage).
 * Frame f + 1 is bucketed on a hashed grid once, then each row of frame f visits 2 × 2 cells: O(n).
 */
export function nextFrameDistanceHistogram(
  locs: Localizations,
  searchRadiusNm: number,
  binNm: number,
): DistanceHistogram {
  const order = orderRowsByFrame(locs)
  const binCount = Math.max(1, Math.round(searchRadiusNm / binNm))
  const tally = new Float64Array(binCount)
  const buckets = new CellBuckets()
  const radiusSquared = searchRadiusNm * searchRadiusNm
  let pairs = 0
  let adjacentFrames = 0
  for (let k = 0; k + 1 < order.frames.length; k++) {
    if ((order.frames[k + 1] ?? 0) !== (order.frames[k] ?? 0) + 1) continue
    adjacentFrames++
    const nextStart = order.starts[k + 1] ?? 0
    const nextRows = order.rows.subarray(nextStart, order.starts[k + 2] ?? 0)
    buckets.build(nextRows, nextRows.length, locs.x, locs.y, searchRadiusNm)
    for (let at = order.starts[k] ?? 0; at < nextStart; at++) {
      const row = order.rows[at] ?? 0
      const squared = nearestSquaredDistance(buckets, locs, row, radiusSquared)
      if (squared > radiusSquared) continue
      const bin = Math.min(
        binCount - 1,
        Math.floor((Math.sqrt(squared) / searchRadiusNm) * binCount),
      )
      tally[bin] = (tally[bin] ?? 0) + 1
      pairs++
    }
  }
  const edges = Array.from({ length: binCount + 1 }, (_, k) => (k * searchRadiusNm) / binCount)
  return {
    edges,
    counts: Array.from(tally),
    pairs,
    adjacentFrames,
    excludedRows: order.excludedRows,
  }
}

/** Squared distance from `row` to the nearest bucketed point, or Infinity when none is within reach. */
function nearestSquaredDistance(
  buckets: CellBuckets,
  locs: Localizations,
  row: number,
  radiusSquared: number,
): number {
  const x = locs.x[row] ?? 0
  const y = locs.y[row] ?? 0
  buckets.findNearBuckets(x, y)
  let best = Infinity
  for (let q = 0; q < 4; q++) {
    const bucket = buckets.nearBuckets[q] ?? 0
    const end = buckets.end(bucket)
    for (let m = buckets.start(bucket); m < end; m++) {
      const other = buckets.memberAt(m)
      const dx = (locs.x[other] ?? 0) - x
      const dy = (locs.y[other] ?? 0) - y
      const squared = dx * dx + dy * dy
      if (squared < best && squared <= radiusSquared) best = squared
    }
  }
  return best
}
