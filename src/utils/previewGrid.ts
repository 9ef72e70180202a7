import type { Extent } from 'ol/extent'
import Projection from 'ol/proj/Projection'
import TileGrid from 'ol/tilegrid/TileGrid'
import type { PreviewInfo } from '@/api/quality'
import { roundLengthBelow } from './fileReport'

/**
 * The geometry of a table's preview in OpenLayers. Map coordinates are sample nm with y negated:
 * OpenLayers' y axis points up, while the preview's image rows (and its tile y index) grow
 * downward from the smallest sample y. With the tile grid's origin at the top-left corner
 * (originNm.x, −originNm.y), OpenLayers' tile y index grows downward too, and is the server's.
 */

export const PREVIEW_PROJECTION_CODE = 'stipple-nm'

export type MapCoordinate = [number, number]

export const toMap = (xNm: number, yNm: number): MapCoordinate => [xNm, -yNm]
export const fromMap = ([x, y]: readonly number[]): { xNm: number; yNm: number } => ({
  xNm: x ?? 0,
  yNm: -(y ?? 0),
})

/** The square level-0 tile in map coordinates: [minX, minY, maxX, maxY]. */
export function pyramidExtent(info: PreviewInfo): Extent {
  const { x, y } = info.originNm
  return [x, -(y + info.extentNm), x + info.extentNm, -y]
}

/** The localizations' bounds in map coordinates, at least one finest pixel wide and high. */
export function boundsExtent(info: PreviewInfo): Extent {
  const b = info.boundsNm
  const finest = info.resolutionsNm[info.resolutionsNm.length - 1] ?? 1
  const xMax = Math.max(b.xMax, b.xMin + finest)
  const yMax = Math.max(b.yMax, b.yMin + finest)
  return [b.xMin, -yMax, xMax, -b.yMin]
}

/** A projection in nm (1e−9 m per unit), so lengths on the map are sample lengths. */
export function previewProjection(info: PreviewInfo): Projection {
  return new Projection({
    code: PREVIEW_PROJECTION_CODE,
    units: 'm',
    metersPerUnit: 1e-9,
    extent: pyramidExtent(info),
    getPointResolution: (resolution: number) => resolution,
  })
}

/**
 * The server's tile pyramid: tile (0, 0) of every level has its top-left corner at originNm,
 * level z has pixels of resolutionsNm[z], and only tiles meeting the bounds exist.
 */
export function previewTileGrid(info: PreviewInfo): TileGrid {
  return new TileGrid({
    origin: toMap(info.originNm.x, info.originNm.y),
    resolutions: info.resolutionsNm,
    tileSize: info.tileSize,
    extent: boundsExtent(info),
  })
}

/** The tile [z, x, y] of level z that holds the sample point (xNm, yNm). */
export function tileAt(grid: TileGrid, z: number, xNm: number, yNm: number): number[] {
  return grid.getTileCoordForCoordAndZ(toMap(xNm, yNm), z)
}

/** Zoom range of the view: from a little beyond the whole field down to the finest tiles. */
export function viewLimits(info: PreviewInfo): { maxResolution: number; minResolution: number } {
  const coarsest = info.resolutionsNm[0] ?? 1
  const finest = info.resolutionsNm[info.resolutionsNm.length - 1] ?? coarsest
  return { maxResolution: coarsest * 2, minResolution: Math.min(finest, 1) }
}

const micronFmt = new Intl.NumberFormat(undefined, { maximumFractionDigits: 2 })

/** A round-length scale bar (1, 2 or 5 × 10ⁿ nm) no wider than maxWidthPx at this resolution. */
export function scaleBar(
  nmPerPixel: number,
  maxWidthPx = 120,
): { lengthNm: number; widthPx: number; label: string } | null {
  if (!(nmPerPixel > 0) || !Number.isFinite(nmPerPixel)) return null
  const lengthNm = roundLengthBelow(nmPerPixel * maxWidthPx)
  const label =
    lengthNm >= 1000
      ? `${micronFmt.format(lengthNm / 1000)} µm`
      : `${micronFmt.format(lengthNm)} nm`
  return { lengthNm, widthPx: lengthNm / nmPerPixel, label }
}
