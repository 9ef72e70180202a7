/** What an ingest is asked to do and what it may cost; kept apart so the writer and the service need not import each other. */
import type { ColumnMappingInput } from '@shared/schemas/localization-mapping.schema'
import type { FormatOverrides } from './table.sniffer'

export interface IngestOptions {
  sourcePath: string
  /** The Arrow file to write; its index goes to `<outputPath>.index.json`. */
  outputPath: string
  mapping: ColumnMappingInput
  /** Called with 0…1, at least every ~2 % of the input bytes. */
  onProgress?: (fraction: number) => void
  /** What the depositor declared, over what the sniffer finds. */
  format?: FormatOverrides
  /** What one table may cost; an ingest past any of them stops with a TableFormatError. */
  limits?: IngestLimits
  /**
   * For tests and benchmarks: worker count (0 = this thread), chunk size, rows per tile, and the
   * parsed bytes held in memory before the rest spill to disk.
   */
  tuning?: {
    workers?: number
    chunkBytes?: number
    rowsPerTile?: number
    memoryBudgetBytes?: number
  }
}

export interface IngestLimits {
  /** Gzip: text bytes per compressed byte. */
  maxExpansion?: number
  maxRows?: number
  /** Bytes the localization store may take (the project's remaining quota). */
  maxOutputBytes?: number
}
