/**
 * The fixed square grid over the x/y bounds that orders the output. Tile (column c, row r) covers
 * [originX + c·size, originX + (c+1)·size) × [originY + r·size, …); the last column and row also
 * take the upper edge. Its key is r·columns + c, the order tiles are written in.
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

/** Multiplies by 1/size (faster than dividing, over millions of rows); the store does the same. */
export function tileColumn(grid: TileGrid, x: number): number {
  const c = Math.floor((x - grid.originX) * (1 / grid.tileSizeNm))
  return c < 0 ? 0 : c >= grid.columns ? grid.columns - 1 : c
}

export function tileRow(grid: TileGrid, y: number): number {
  const r = Math.floor((y - grid.originY) * (1 / grid.tileSizeNm))
  return r < 0 ? 0 : r >= grid.rows ? grid.rows - 1 : r
}

export function tileKey(grid: TileGrid, x: number, y: number): number {
  return tileRow(grid, y) * grid.columns + tileColumn(grid, x)
}
