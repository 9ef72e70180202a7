import type { Localizations } from '../localizations.types'
import { measureExtent, type Extent } from './render-grid'

/** Fewest localizations FRC is computed from; below this every ring is noise. */
export const MIN_LOCALIZATIONS = 100

/** Largest frame span whose distinct frames are counted with a bitmap (16 MB). */
const MAX_COUNTED_FRAME_SPAN = 1 << 27

function distinctFrames(locs: Localizations, extent: Extent): number {
  const span = extent.maxFrame - extent.minFrame + 1
  if (span > MAX_COUNTED_FRAME_SPAN) return span
  const seen = new Uint8Array(Math.ceil(span))
  const frame = locs.frame
  let distinct = 0
  for (let i = 0; i < locs.count; i++) {
    const offset = Math.floor(frame[i]! - extent.minFrame)
    if (offset >= 0 && offset < seen.length && seen[offset] === 0) {
      seen[offset] = 1
      distinct++
    }
  }
  return distinct
}

/**
 * Spread of the points across and along their main direction, nm: the square roots of the
 * eigenvalues of the 2×2 covariance of x and y (minor = 0 when all points lie on one line).
 */
function principalSpreads(extent: Extent): { minor: number; major: number } {
  const mean = (extent.varianceX + extent.varianceY) / 2
  const radius = Math.hypot((extent.varianceX - extent.varianceY) / 2, extent.covarianceXY)
  return { minor: Math.sqrt(Math.max(0, mean - radius)), major: Math.sqrt(mean + radius) }
}

function isLine({ minor, major }: { minor: number; major: number }): boolean {
  return minor < Math.max(1e-3, 1e-6 * major)
}

/** The data's extent, or the reason FRC cannot be computed from it. */
export function checkInput(
  locs: Localizations,
  blocks: number,
  pixelNm: number,
): { extent: Extent } | { reason: string } {
  if (locs.count < MIN_LOCALIZATIONS) {
    return { reason: `only ${locs.count} localizations; FRC needs at least ${MIN_LOCALIZATIONS}` }
  }
  const extent = measureExtent(locs)
  if (extent.finite < MIN_LOCALIZATIONS) {
    return { reason: `only ${extent.finite} localizations have finite x, y and frame` }
  }
  if (extent.minFrame === extent.maxFrame) {
    return { reason: 'all localizations are in one frame, so the run cannot be cut in time blocks' }
  }
  const frames = distinctFrames(locs, extent)
  if (frames < blocks) {
    return { reason: `only ${frames} distinct frames for ${blocks} time blocks` }
  }
  let spreads = principalSpreads(extent)
  // Moments from a sample: a sample on one line is confirmed (or not) with every row.
  if (spreads.major < pixelNm || isLine(spreads)) spreads = principalSpreads(measureExtent(locs, 1))
  if (spreads.major < pixelNm) return { reason: 'all localizations lie within one render pixel' }
  if (isLine(spreads)) return { reason: 'all localizations lie on one straight line' }
  return { extent }
}
