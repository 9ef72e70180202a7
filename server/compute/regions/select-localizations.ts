/**
 * The localizations inside a region, read from the columnar store: only the tiles whose rows meet
 * the region's bounding box are read (the store is ordered by tile and indexed), x, y and the
 * precision column only, then each row is tested against the exact shape.
 */
import { StoreBoxReader, readTileIndex, readTilesInBox, type Bounds } from '../store'
import type { RegionShape } from './region-shape'
import { MeasurementLimitError, REGION_LIMITS } from './limits'

export interface RegionPoints {
  count: number
  x: Float64Array
  y: Float64Array
  /** Lateral precision per localization, nm, when the table has one. */
  precision: Float64Array | null
  tilesRead: number
  tilesTotal: number
}

const PRECISION_ROLES = ['uncertainty', 'uncertaintyX']

const meets = (t: Bounds, b: Bounds) =>
  t.xMin <= b.xMax && t.xMax >= b.xMin && t.yMin <= b.yMax && t.yMax >= b.yMin

export async function selectLocalizations(
  arrowPath: string,
  shape: RegionShape,
  maxLocalizations: number = REGION_LIMITS.maxLocalizations,
): Promise<RegionPoints> {
  const index = await readTileIndex(arrowPath)
  const tiles = index.tiles.filter((t) => meets(t.boundsNm, shape.bounds))
  // Refused before reading: the rows of the tiles met bound the rows inside from above.
  const candidates = tiles.reduce((n, t) => n + t.rowCount, 0)
  if (candidates > maxLocalizations) {
    throw new MeasurementLimitError(
      `The region reaches up to ${candidates.toLocaleString('en')} localizations; measurements take at most ${maxLocalizations.toLocaleString('en')}. Draw a smaller region.`,
    )
  }
  const precisionName =
    PRECISION_ROLES.map((role) => index.columns.find((c) => c.role === role)?.name).find(Boolean) ??
    null
  const reader = new StoreBoxReader()
  let rows
  try {
    rows =
      (await reader.rowsInBox(arrowPath, shape.bounds, (name) => name === precisionName)) ??
      (await readTilesInBox(arrowPath, shape.bounds, index))
  } finally {
    await reader.close()
  }
  const bx = rows.columns.x!
  const by = rows.columns.y!
  const bp = precisionName ? rows.columns[precisionName] : undefined
  const x = new Float64Array(rows.rowCount)
  const y = new Float64Array(rows.rowCount)
  const precision = bp ? new Float64Array(rows.rowCount) : null
  let n = 0
  for (let i = 0; i < rows.rowCount; i++) {
    const xi = bx[i]!
    const yi = by[i]!
    if (!shape.contains(xi, yi)) continue
    x[n] = xi
    y[n] = yi
    if (precision) precision[n] = bp![i]!
    n++
  }
  return {
    count: n,
    x: x.subarray(0, n),
    y: y.subarray(0, n),
    precision: precision ? precision.subarray(0, n) : null,
    tilesRead: rows.tilesRead,
    tilesTotal: rows.tilesTotal,
  }
}
