/** How a localization table is written: what `sniffTable` finds and the ingest reads by. */

import { TABLE_DELIMITERS, type TableDelimiter } from '@shared/schemas/localization-mapping.schema'

export const DELIMITERS = TABLE_DELIMITERS
/** `whitespace`: one or more spaces or tabs between fields. */
export type Delimiter = TableDelimiter

export interface TableFormat {
  compression: 'none' | 'gzip'
  delimiter: Delimiter
  /** `,` only in tables whose fields are not separated by commas (`1,5;2,5`). */
  decimalMark: '.' | ','
  hasHeader: boolean
  /** A UTF-8 byte-order mark, skipped. */
  bom: boolean
  lineEnding: 'lf' | 'crlf'
  /** Lines starting with `#` before the header, skipped. */
  commentLines: number
  /** Offset in the (decompressed) bytes of the first data record. */
  dataOffset: number
  /** 1-based line number of the first data record. */
  dataStartLine: number
  columnCount: number
  /** Column names; `column_1`, `column_2` … when the table has no header. */
  header: string[]
}

export interface TableSniff extends TableFormat {
  /** The first data rows, split into fields (quotes removed). */
  sampleRows: string[][]
  /** Mean bytes per sampled data line, for sizing buffers. */
  averageRowBytes: number
  /** Things worth telling the depositor that do not stop the ingest. */
  problems: string[]
}

export type TableFormatErrorCode =
  | 'empty'
  | 'binary'
  | 'encoding'
  | 'line_too_long'
  | 'unterminated_quote'
  | 'no_data'
  | 'expansion'
  | 'too_many_rows'
  | 'too_large'

/** The file cannot be read as a table at all; `message` says why in words. */
export class TableFormatError extends Error {
  constructor(
    readonly code: TableFormatErrorCode,
    message: string,
  ) {
    super(message)
    this.name = 'TableFormatError'
  }
}

/** Longest record we accept; real rows are well under 1 KiB. */
export const MAX_RECORD_BYTES = 1 << 20
