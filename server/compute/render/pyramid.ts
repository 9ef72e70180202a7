/**
 * The geometry of a zoomable tile pyramid over a field of localizations.
 *
 * Level 0 shows the whole field in one square tile; each level halves the pixel, and the deepest
 * level's pixel is exactly `finestPixelNm` (so every level's pixel is finestPixelNm·2^k). Tiles are
 * addressed (z, x, y) from the field's smallest x and y: x grows rightward and y downward, as rows
 * of a RenderView do, which is the tile order of the usual XYZ web-map convention. A level holds
 * only the tiles that meet the field's bounds.
 */
import type { RenderView } from './render-view'

export interface BoundsNm {
  xMin: number
  xMax: number
  yMin: number
  yMax: number
}

export interface TilePyramid {
  /** Levels z = 0 … levels − 1. */
  levels: number
  tileSize: number
  /** Corner of tile (0, 0) at every level: the smallest x and y of the bounds, nm. */
  originNm: { x: number; y: number }
  /** Side of the level-0 tile, nm: the field's longer side, rounded up to a power-of-two size. */
  extentNm: number
  /** Pixel size per level, nm (index z). */
  resolutionsNm: number[]
  /** Tiles per level that meet the bounds (index z). */
  tileCounts: { columns: number; rows: number }[]
  boundsNm: BoundsNm
  /** Set when the bounds given were unusable and an empty one-tile field stands in. */
  reason?: string
}

/** Deeper than this is a pixel of 2⁻⁴⁰ of level 0: a sign of nonsense bounds or pixel sizes. */
const MAX_LEVELS = 40
export const DEFAULT_TILE_SIZE = 256
export const DEFAULT_FINEST_PIXEL_NM = 1

export function pyramidFor(
  boundsNm: BoundsNm,
  tileSize = DEFAULT_TILE_SIZE,
  finestPixelNm = DEFAULT_FINEST_PIXEL_NM,
): TilePyramid {
  const size = Number.isInteger(tileSize) && tileSize > 0 ? tileSize : DEFAULT_TILE_SIZE
  const finest =
    Number.isFinite(finestPixelNm) && finestPixelNm > 0 ? finestPixelNm : DEFAULT_FINEST_PIXEL_NM
  const { bounds, reason } = usableBounds(boundsNm)
  const side = Math.max(bounds.xMax - bounds.xMin, bounds.yMax - bounds.yMin)
  const deepest = Math.min(
    MAX_LEVELS - 1,
    Math.max(0, Math.ceil(Math.log2(side / (size * finest)))),
  )
  const levels = deepest + 1
  const resolutionsNm: number[] = []
  const tileCounts: TilePyramid['tileCounts'] = []
  for (let z = 0; z < levels; z++) {
    const pixel = finest * 2 ** (deepest - z)
    const tileNm = size * pixel
    resolutionsNm.push(pixel)
    tileCounts.push({
      columns: Math.max(1, Math.ceil((bounds.xMax - bounds.xMin) / tileNm)),
      rows: Math.max(1, Math.ceil((bounds.yMax - bounds.yMin) / tileNm)),
    })
  }
  const pyramid: TilePyramid = {
    levels,
    tileSize: size,
    originNm: { x: bounds.xMin, y: bounds.yMin },
    extentNm: size * resolutionsNm[0]!,
    resolutionsNm,
    tileCounts,
    boundsNm: bounds,
  }
  if (reason) pyramid.reason = reason
  return pyramid
}

function usableBounds(b: BoundsNm): { bounds: BoundsNm; reason?: string } {
  const finite = [b.xMin, b.xMax, b.yMin, b.yMax].every((v) => Number.isFinite(v))
  if (finite && b.xMax >= b.xMin && b.yMax >= b.yMin) return { bounds: { ...b } }
  return {
    bounds: { xMin: 0, xMax: 0, yMin: 0, yMax: 0 },
    reason: 'bounds are not finite or have max below min',
  }
}

/** The view of tile (z, x, y), or null when the pyramid has no such tile. */
export function tileView(pyramid: TilePyramid, z: number, x: number, y: number): RenderView | null {
  if (![z, x, y].every((v) => Number.isInteger(v) && v >= 0)) return null
  const pixelNm = pyramid.resolutionsNm[z]
  const counts = pyramid.tileCounts[z]
  if (pixelNm === undefined || !counts || x >= counts.columns || y >= counts.rows) return null
  const tileNm = pyramid.tileSize * pixelNm
  return {
    xMinNm: pyramid.originNm.x + x * tileNm,
    yMinNm: pyramid.originNm.y + y * tileNm,
    pixelNm,
    width: pyramid.tileSize,
    height: pyramid.tileSize,
  }
}
