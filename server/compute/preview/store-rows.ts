import { stat } from 'node:fs/promises'
import { readTileIndex, readTilesInBox, StoreBoxReader, type TileIndex } from '../store'
import { meets } from '../store/tile.index'
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

/** This thread's reader: stores stay open and scratch memory is reused from tile to tile. */
const boxReader = new StoreBoxReader()

/**
 * The localizations of a store inside a box (the columns rendering reads), from the store tiles
 * that meet it. The store's index is parsed once per store, not once per tile.
 */
export async function localizationsInBox(arrowPath: string, box: BoundsNm): Promise<Localizations> {
  const index = await indexOf(arrowPath)
  const columns = index.columns
  const rendered = new Set(columns.filter((c) => c.role && ROLE_FIELDS[c.role]).map((c) => c.name))
  const rows =
    (await boxReader.rowsInBox(arrowPath, box, (name) => rendered.has(name))) ??
    (await readTilesInBox(arrowPath, box, index))
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

/** Rows of the store tiles that meet the box (an upper bound of the rows inside it). */
export async function rowsMeetingBox(arrowPath: string, box: BoundsNm): Promise<number> {
  const index = await indexOf(arrowPath)
  return index.tiles.reduce((n, t) => (meets(t.boundsNm, box) ? n + t.rowCount : n), 0)
}
