import { readTilesInBox } from '../../modules/files/localizations/tile.reader'
import { readTileIndex, type TileIndex } from '../../modules/files/localizations/tile.index'
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

/** The localizations of a store inside a box, read from the tiles of the store that meet it. */
export async function localizationsInBox(
  arrowPath: string,
  box: BoundsNm,
  index?: TileIndex,
): Promise<Localizations> {
  const columns = (index ?? (await readTileIndex(arrowPath))).columns
  const rows = await readTilesInBox(arrowPath, box)
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
