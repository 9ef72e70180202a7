import type { Localizations } from '../localizations.types'

/**
 * The render grid of FRC: the occupied bounding box of the finite localizations, padded to a square
 * power-of-two side at the chosen pixel and centred on the box. A box wider than maxSize pixels is
 * not coarsened (the pixel must stay well below the resolution): the grid then covers the central
 * maxSize·pixel field of the box and the localizations outside it are left out.
 */
export interface RenderGrid {
  size: number
  pixelNm: number
  originXNm: number
  originYNm: number
  field: 'occupied bounding box' | 'central crop of the bounding box'
}

/** Smallest grid side: below this the ring curve has too few points to smooth. */
const MIN_GRID_SIZE = 64

export interface Extent {
  minX: number
  maxX: number
  minY: number
  maxY: number
  minFrame: number
  maxFrame: number
  /** Rows with finite x, y and frame. */
  finite: number
  /** Variances and covariance of x and y over those rows, nm². */
  varianceX: number
  varianceY: number
  covarianceXY: number
}

/** Rows the second moments are taken from by default; more rows are sampled at a stride. */
const MOMENT_SAMPLE = 1_000_000

/**
 * Bounds, frame range and second moments of the rows with finite x, y and frame. Two simple
 * passes (one loop carrying all twelve accumulators measured several times slower than both); the
 * moments come from every `momentStride`-th row unless a stride of 1 is asked for.
 */
export function measureExtent(
  locs: Localizations,
  momentStride = Math.max(1, Math.floor(locs.count / MOMENT_SAMPLE)),
): Extent {
  const bounds = measureBounds(locs)
  return { ...bounds, ...measureMoments(locs, bounds.minX, bounds.minY, momentStride) }
}

function measureBounds(locs: Localizations) {
  const { x, y, frame, count } = locs
  let minX = Infinity
  let maxX = -Infinity
  let minY = Infinity
  let maxY = -Infinity
  let minFrame = Infinity
  let maxFrame = -Infinity
  let finite = 0
  for (let i = 0; i < count; i++) {
    const xi = x[i]!
    const yi = y[i]!
    const fi = frame[i]!
    // Finite test written so that NaN and ±Infinity fail it without a call.
    if (!(xi - xi === 0 && yi - yi === 0 && fi - fi === 0)) continue
    finite++
    minX = Math.min(minX, xi)
    maxX = Math.max(maxX, xi)
    minY = Math.min(minY, yi)
    maxY = Math.max(maxY, yi)
    minFrame = Math.min(minFrame, fi)
    maxFrame = Math.max(maxFrame, fi)
  }
  return { minX, maxX, minY, maxY, minFrame, maxFrame, finite }
}

/** Moments about (x0, y0) (the lower corner), so large coordinates do not cancel. */
function measureMoments(locs: Localizations, x0: number, y0: number, stride: number) {
  const { x, y, frame, count } = locs
  let n = 0
  let sx = 0
  let sy = 0
  let sxx = 0
  let syy = 0
  let sxy = 0
  for (let i = 0; i < count; i += stride) {
    const dx = x[i]! - x0
    const dy = y[i]! - y0
    const fi = frame[i]!
    if (!(dx - dx === 0 && dy - dy === 0 && fi - fi === 0)) continue
    n++
    sx += dx
    sy += dy
    sxx += dx * dx
    syy += dy * dy
    sxy += dx * dy
  }
  const m = Math.max(1, n)
  return {
    varianceX: sxx / m - (sx / m) ** 2,
    varianceY: syy / m - (sy / m) ** 2,
    covarianceXY: sxy / m - (sx / m) * (sy / m),
  }
}

export function chooseGrid(extent: Extent, pixelNm: number, maxSize: number): RenderGrid {
  const widthPixels = Math.max(extent.maxX - extent.minX, extent.maxY - extent.minY) / pixelNm
  let size = MIN_GRID_SIZE
  // Centred on the box, the grid holds it when the box is strictly narrower than the grid.
  while (size <= widthPixels && size < maxSize) size *= 2
  const cropped = widthPixels >= size
  const centreX = (extent.minX + extent.maxX) / 2
  const centreY = (extent.minY + extent.maxY) / 2
  return {
    size,
    pixelNm,
    originXNm: centreX - (size * pixelNm) / 2,
    originYNm: centreY - (size * pixelNm) / 2,
    field: cropped ? 'central crop of the bounding box' : 'occupied bounding box',
  }
}
