/**
 * The JSON index written beside the Arrow file (`<output>.index.json`). Layout of the pair:
 *
 * - The Arrow IPC file holds one record batch per non-empty tile of a square grid, batches in
 *   tile-key order (key = row · columns + column, row-major from the lower x/y corner), rows
 *   inside a batch in source order. Concatenated, the batches are the table sorted by tile key.
 *   The grid is laid over the extent of the first rows (localization tables run in frame order,
 *   and early frames span the field), or of all rows when more than 5 % fell outside it; rows
 *   beyond its extent belong to its edge tiles.
 * - The index names the grid (origin, tile side, columns, rows), the bounds of all rows, the row
 *   count, the columns and, per tile, its batch number, first row, row count and the bounds of its
 *   rows. A region query reads the index, then only the batches whose row bounds meet the region.
 */
import { readFile, writeFile } from 'node:fs/promises'
import { basename } from 'node:path'
import type { Schema } from 'apache-arrow'
import type { Bounds, TileGrid } from './tile.grid'

export const TILE_INDEX_FORMAT = 'stipple.localization-tiles'

export interface WrittenTile {
  key: number
  column: number
  row: number
  /** Index of its record batch in the file. */
  batch: number
  /** First row of the tile in the whole table. */
  rowStart: number
  rowCount: number
  /** Bounds of the tile's rows (not of the tile), nm. */
  boundsNm: Bounds
}

export interface TileIndex {
  format: typeof TILE_INDEX_FORMAT
  version: 1
  /** File name of the Arrow file, in the same directory. */
  arrowFile: string
  rowCount: number
  boundsNm: Bounds | null
  grid: TileGrid
  columns: { name: string; type: string; unit: string | null; role: string | null }[]
  tiles: WrittenTile[]
}

export const indexPathFor = (outputPath: string) => `${outputPath}.index.json`

export function buildTileIndex(
  outputPath: string,
  schema: Schema,
  grid: TileGrid,
  tiles: WrittenTile[],
  boundsNm: Bounds | null,
): TileIndex {
  const columns = schema.fields.map((f) => ({
    name: f.name,
    type: String(f.type),
    unit: f.metadata.get('unit') ?? null,
    role: f.metadata.get('role') ?? null,
  }))
  const rowCount = tiles.reduce((n, t) => n + t.rowCount, 0)
  return {
    format: TILE_INDEX_FORMAT,
    version: 1,
    arrowFile: basename(outputPath),
    rowCount,
    boundsNm,
    grid,
    columns,
    tiles,
  }
}

export async function writeTileIndex(outputPath: string, index: TileIndex) {
  await writeFile(indexPathFor(outputPath), `${JSON.stringify(index, null, 1)}\n`)
}

export async function readTileIndex(outputPath: string): Promise<TileIndex> {
  const index = JSON.parse(await readFile(indexPathFor(outputPath), 'utf8')) as TileIndex
  if (index.format !== TILE_INDEX_FORMAT || index.version !== 1) {
    throw new Error(`${indexPathFor(outputPath)} is not a tile index this version reads`)
  }
  return index
}

/** Whether a tile's rows may fall in the box (both closed). */
export function meets(tile: Bounds, box: Bounds): boolean {
  return (
    tile.xMin <= box.xMax && tile.xMax >= box.xMin && tile.yMin <= box.yMax && tile.yMax >= box.yMin
  )
}
