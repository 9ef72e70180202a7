/**
 * The fixed square grid that orders the output. Tile (column c, row r) covers [originX + c·size,
 * originX + (c+1)·size) × [originY + r·size, …); the first and last columns and rows also take
 * what lies beyond the grid's extent. Its key is r·columns + c, the order tiles are written in.
 */

export interface TileGrid {
  originX: number
  originY: number
  /** Side of a tile, nm. */
  tileSizeNm: number
  columns: number
  rows: number
}

export interface Bounds {
  xMin: number
  xMax: number
  yMin: number
  yMax: number
}

/** About this many rows per tile: a region query reads a few hundred kB per tile touched. */
export const TARGET_ROWS_PER_TILE = 50_000
/** Keys fit a Uint16Array. */
export const MAX_TILES = 65_536

export function planGrid(
  bounds: Bounds,
  rowCount: number,
  rowsPerTile = TARGET_ROWS_PER_TILE,
): TileGrid {
  const width = bounds.xMax - bounds.xMin
  const height = bounds.yMax - bounds.yMin
  const wanted = Math.min(MAX_TILES, Math.max(1, Math.ceil(rowCount / rowsPerTile)))
  let size =
    width * height > 0 ? Math.sqrt((width * height) / wanted) : Math.max(width, height) / wanted
  if (!(size > 0)) size = 1
  while (Math.ceil(width / size || 1) * Math.ceil(height / size || 1) > MAX_TILES) size *= 1.25
  const grid = { originX: bounds.xMin, originY: bounds.yMin, tileSizeNm: size }
  return {
    ...grid,
    columns: Math.max(1, Math.ceil(width / size)),
    rows: Math.max(1, Math.ceil(height / size)),
  }
}
