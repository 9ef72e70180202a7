import sharp, { type OverlayOptions } from 'sharp'
import type { PreviewInfo } from '@shared/schemas/preview.schema'

/** The whole field of a table as the preview draws it, cropped to where the data are. */
export interface FieldPicture {
  png: Uint8Array
  widthPx: number
  heightPx: number
  /** The data's extent in the sample, nm, and one pixel of the picture. */
  widthNm: number
  heightNm: number
  pixelNm: number
}

export type TileSource = (z: number, x: number, y: number) => Promise<Uint8Array>

/** At least this many pixels across the data, so a sparse field is not a few dots in a corner. */
const MIN_SIDE_PX = 256
/** Level 2 at most: no more than 4 × 4 tiles for one picture. */
const MAX_LEVEL = 2

/**
 * The data's bounding box from the preview's own tiles: level 0 holds the whole pyramid in one
 * tile, whose square (a power of two of the finest pixel) can be much larger than the data; the
 * coarsest level that gives the data MIN_SIDE_PX pixels is stitched and cropped to their bounds.
 */
export async function fieldPicture(info: PreviewInfo, tile: TileSource): Promise<FieldPicture> {
  const { boundsNm: b, originNm, tileSize } = info
  const sideNm = Math.max(b.xMax - b.xMin, b.yMax - b.yMin, 1)
  const deepest = Math.min(info.levels - 1, MAX_LEVEL)
  let z = 0
  while (z < deepest && sideNm / info.resolutionsNm[z]! < MIN_SIDE_PX) z++
  const pixelNm = info.resolutionsNm[z]!
  const tilesAcross = 2 ** z
  const last = tilesAcross * tileSize
  // The data's pixels at this level (row 0 is the smallest y, as in the tiles).
  const clamp = (v: number) => Math.min(Math.max(v, 0), last)
  const left = clamp(Math.floor((b.xMin - originNm.x) / pixelNm))
  const top = clamp(Math.floor((b.yMin - originNm.y) / pixelNm))
  const right = Math.max(clamp(Math.ceil((b.xMax - originNm.x) / pixelNm)), left + 1)
  const bottom = Math.max(clamp(Math.ceil((b.yMax - originNm.y) / pixelNm)), top + 1)
  const tx0 = Math.floor(left / tileSize)
  const ty0 = Math.floor(top / tileSize)
  const tx1 = Math.min(Math.floor((right - 1) / tileSize), tilesAcross - 1)
  const ty1 = Math.min(Math.floor((bottom - 1) / tileSize), tilesAcross - 1)

  const pieces: OverlayOptions[] = []
  for (let ty = ty0; ty <= ty1; ty++)
    for (let tx = tx0; tx <= tx1; tx++)
      pieces.push({
        input: Buffer.from(await tile(z, tx, ty)),
        left: (tx - tx0) * tileSize,
        top: (ty - ty0) * tileSize,
      })
  // Composition runs last in a sharp pipeline: stitch first, crop from the stitched image.
  const stitched = await sharp({
    create: {
      width: (tx1 - tx0 + 1) * tileSize,
      height: (ty1 - ty0 + 1) * tileSize,
      channels: 4,
      background: { r: 0, g: 0, b: 0, alpha: 1 },
    },
  })
    .composite(pieces)
    .png()
    .toBuffer()
  const widthPx = right - left
  const heightPx = bottom - top
  const png = await sharp(stitched)
    .extract({
      left: left - tx0 * tileSize,
      top: top - ty0 * tileSize,
      width: widthPx,
      height: heightPx,
    })
    .flatten({ background: '#000000' })
    .png()
    .toBuffer()
  return {
    png,
    widthPx,
    heightPx,
    widthNm: widthPx * pixelNm,
    heightNm: heightPx * pixelNm,
    pixelNm,
  }
}
