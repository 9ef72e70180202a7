/** What a deposited file is, detected from its content. */
export const FILE_KINDS = ['localization_table', 'raw_stack', 'metadata', 'other'] as const
export type FileKind = (typeof FILE_KINDS)[number]

/** A file's way from upload to use. */
export const FILE_STATUSES = [
  'uploading',
  'processing',
  'needs_mapping',
  'ready',
  'rejected',
] as const
export type FileStatus = (typeof FILE_STATUSES)[number]
