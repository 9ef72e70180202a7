/** Why a raw stack could not be read; the job that reads it stores `code` and shows `message`. */
export type RawStackErrorCode =
  | 'not-tiff'
  | 'truncated'
  | 'ifd-loop'
  | 'malformed'
  | 'unsupported'
  | 'mismatch'
  | 'unsafe-xml'
  | 'aborted'

export class RawStackError extends Error {
  constructor(
    readonly code: RawStackErrorCode,
    message: string,
  ) {
    super(message)
    this.name = 'RawStackError'
  }
}
