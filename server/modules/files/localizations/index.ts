/** Localization tables: sniff, ingest into a tile-ordered Arrow file, read regions back. */
export { sniffTable } from './sniff.service'
export { ingestLocalizationTable, type IngestOptions } from './ingest.service'
export { prestartParseWorkers } from './parse-worker.pool'
export { readTilesInBox, type BoxRows } from './tile.reader'
export type { IngestReport, ColumnReport } from './ingest-report'
export type { FormatOverrides } from './table.sniffer'
export {
  TableFormatError,
  DELIMITERS,
  type Delimiter,
  type TableFormat,
  type TableSniff,
} from './table-format.types'
export { REJECT_REASONS, REJECT_DESCRIPTIONS, type RejectReason } from './rejections'
export { indexPathFor, readTileIndex, type TileIndex } from './tile.index'
export type { Bounds, TileGrid } from './tile.grid'
