import { statSync } from 'node:fs'
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
  // Synchronous: this runs in a tile thread, twice a tile; no thread-pool round trip for a stat.
  const { mtimeMs } = statSync(arrowPath)
  const known = indexes.get(arrowPath)
  if (known?.mtimeMs === mtimeMs) return known.index
  const index = await readTileIndex(arrowPath)
  indexes.set(arrowPath, { mtimeMs, index })
  return index
}

/** This thread's reader: stores stay open and scratch memory is reused from tile to tile. */
const boxReader = new StoreBoxReader()

/** Frames for renders that do not read them (Localizations always has the column). */
let noFrames = new Uint32Array(0)
function zeroFrames(count: number): Uint32Array {
  if (noFrames.length < count) noFrames = new Uint32Array(count)
  return noFrames.subarray(0, count)
}

/**
 * The localizations of a store inside a box, from the store tiles that meet it: x and y, and of
 * the other columns rendering reads those in `drawn` (all of them when it is not given). The
 * store's index is parsed once per store, not once per tile.
 */
export async function localizationsInBox(
  arrowPath: string,
  box: BoundsNm,
  drawn?: ReadonlySet<string>,
): Promise<Localizations> {
  const index = await indexOf(arrowPath)
  const columns = index.columns
  const wanted = (role: string | null | undefined) => {
    const field = role ? ROLE_FIELDS[role] : undefined
    return field !== undefined && (field === 'x' || field === 'y' || !drawn || drawn.has(field))
  }
  const rendered = new Set(columns.filter((c) => wanted(c.role)).map((c) => c.name))
  const rows =
    (await boxReader.rowsInBox(arrowPath, box, (name) => rendered.has(name))) ??
    (await readTilesInBox(arrowPath, box, index))
  const locs: Partial<Record<keyof Localizations, NumericColumn | number>> = {
    count: rows.rowCount,
  }
  for (const column of columns) {
    const field = column.role ? ROLE_FIELDS[column.role] : undefined
    const values = rendered.has(column.name) ? rows.columns[column.name] : undefined
    if (field && values && locs[field] === undefined) locs[field] = values
  }
  // Shared zeros: only a render that does not read frames gets here without them.
  if (!locs.frame) locs.frame = zeroFrames(rows.rowCount)
  return locs as Localizations
}

/** Rows of the store tiles that meet the box (an upper bound of the rows inside it). */
export async function rowsMeetingBox(arrowPath: string, box: BoundsNm): Promise<number> {
  const index = await indexOf(arrowPath)
  return index.tiles.reduce((n, t) => (meets(t.boundsNm, box) ? n + t.rowCount : n), 0)
}
