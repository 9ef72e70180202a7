import { stat } from 'node:fs/promises'
import { readTileIndex, readTilesInBox, type TileIndex } from '../store'
import type { Localizations, NumericColumn } from '../localizations.types'
import type { BoundsNm } from '../render'

/** Store columns (by role) that rendering reads. */
const ROLE_FIELDS: Record<string, keyof Omit<Localizations, 'count'>> = {
  x: 'x',
  y: 'y',
  frame: 'frame',
  z: 'z',
  uncertainty: 'uncertainty',
  uncertaintyX: 'uncertainty',
  channel: 'channel',
}

/** Indexes of the stores this thread reads, by path and write time (a new ingest rewrites it). */
const indexes = new Map<string, { mtimeMs: number; index: TileIndex }>()

async function indexOf(arrowPath: string): Promise<TileIndex> {
  const { mtimeMs } = await stat(arrowPath)
  const known = indexes.get(arrowPath)
  if (known?.mtimeMs === mtimeMs) return known.index
  const index = await readTileIndex(arrowPath)
  indexes.set(arrowPath, { mtimeMs, index })
  return index
}

/**
 * The localizations of a store inside a box, read from the tiles of the store that meet it. The
 * store's index (a JSON file listing every tile) is parsed once per store, not once per tile.
 */
export async function localizationsInBox(arrowPath: string, box: BoundsNm): Promise<Localizations> {
  const index = await indexOf(arrowPath)
  const columns = index.columns
  const rows = await readTilesInBox(arrowPath, box, index)
  const locs: Partial<Record<keyof Localizations, NumericColumn | number>> = {
    count: rows.rowCount,
  }
  for (const column of columns) {
    const field = column.role ? ROLE_FIELDS[column.role] : undefined
    const values = rows.columns[column.name]
    if (field && values && locs[field] === undefined) locs[field] = values
  }
  if (!locs.frame) locs.frame = new Uint32Array(rows.rowCount)
  return locs as Localizations
}
