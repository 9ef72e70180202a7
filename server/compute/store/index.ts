/**
 * The localization store: one ingested table as a tile-ordered Apache Arrow file plus its tile
 * index. The ingest writes it (../ingest); the engines, previews and downloads read it here.
 */
export { readLocalizations } from './read-localizations'
export { readTilesInBox, type BoxRows } from './tile.reader'
export { StoreBoxReader } from './box-reader'
export { indexPathFor, readTileIndex, type TileIndex } from './tile.index'
export type { Bounds, TileGrid } from './tile.grid'
