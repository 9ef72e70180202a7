/**
 * Distance from each localization to its nearest other localization in the region, searched in
 * rings of grid cells of about the mean spacing around each point until no closer one can exist.
 */
import { MeasurementLimitError, REGION_LIMITS } from './limits'
import { cellGrid } from './cell-grid'

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
  const g = cellGrid(x, y, count, Math.sqrt(area / count))
  const { xs, ys, start, columns, rows, cell } = g
  for (let s = 0; s < count; s++) {
    const px = xs[s]!
    const py = ys[s]!
    const cx = Math.floor((px - g.x0) / cell)
    const cy = Math.floor((py - g.y0) / cell)
    let best = Infinity
    // Rings of cells at Chebyshev distance k; anything in ring k + 1 is at least k cells away.
    for (let k = 0; ; k++) {
      for (let j = cy - k; j <= cy + k; j++) {
        if (j < 0 || j >= rows) continue
        const edgeRow = j === cy - k || j === cy + k
        for (let i = cx - k; i <= cx + k; i += edgeRow ? 1 : 2 * k) {
          if (i < 0 || i >= columns) continue
          const c = j * columns + i
          for (let t = start[c]!; t < start[c + 1]!; t++) {
            if (t === s) continue
            const dx = xs[t]! - px
            const dy = ys[t]! - py
            const d2 = dx * dx + dy * dy
            if (d2 < best) best = d2
          }
        }
      }
      if (best <= k * k * cell * cell || (k > columns && k > rows)) break
    }
    out[g.order[s]!] = Math.sqrt(best)
  }
  return out
}
