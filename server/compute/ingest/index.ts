/** Localization tables: sniff, and ingest into the localization store (see ../store). */
export { sniffTable } from './sniff.service'
export { ingestLocalizationTable } from './ingest.service'
export type { IngestLimits, IngestOptions } from './ingest-options'
export { prestartParseWorkers } from './parse-worker.pool'
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
