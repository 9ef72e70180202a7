import type { FileKind, FileStatus } from '@shared/domain/files'
import type { ColumnRole, ColumnUnit, MappingSuggestion } from '@shared/domain/localization-columns'
import type {
  ColumnMapping,
  ColumnMappingInput,
  TableFormatChoice,
} from '@shared/schemas/localization-mapping.schema'
import { api } from './client'
import type { OmeImportReport } from './metadata'

export interface FileJob {
  state: string
  /** 0..1 */
  progress: number
  message: string | null
}

export interface DatasetFileDto {
  id: number
  name: string
  size: number
  sha256: string | null
  kind: FileKind
  status: FileStatus
  mediaType: string | null
  /** What went wrong or needs doing, in words. */
  problem: string | null
  summary: Record<string, unknown> | null
  job: FileJob | null
  createdAt: string
}

/** An upload the server holds part of, started by this person for this dataset. */
export interface UploadInProgress {
  uploadId: string
  name: string
  size: number
  startedAt: string
}

export interface FilesAnswer {
  items: DatasetFileDto[]
  uploadsInProgress: UploadInProgress[]
}

/** How a table is written, as the inspection found it; `sampleRows` are its first rows as text. */
export interface TableSniff {
  delimiter: string
  hasHeader: boolean
  header: string[]
  sampleRows: string[][]
  compression: string
  decimalMark: string
  dataStartLine?: number
  problems: string[]
}

export interface RejectExample {
  /** 1-based line of the file where the record starts. */
  line: number
  text: string
  column?: string
  detail?: string
}

export interface RejectedReason {
  count: number
  description: string
  examples: RejectExample[]
}

export interface IngestedColumn {
  name: string
  role: ColumnRole
  unit: string | null
  sourceColumn?: string
  sourceUnit?: ColumnUnit | null
  min: number | null
  max: number | null
  count: number
  missing?: number
}

/** A table's report: the inspection always, the ingest's findings once it ran. */
export interface TableReport {
  sniff?: TableSniff
  /** The separator the depositor declared (PUT …/format), when they did. */
  declaredFormat?: TableFormatChoice | null
  suggestion?: MappingSuggestion
  rowsRead?: number
  rowsAccepted?: number
  rowsRejected?: number
  rejected?: Record<string, RejectedReason>
  columns?: IngestedColumn[]
  boundsNm?: { xMin: number; xMax: number; yMin: number; yMax: number } | null
  /** Stored frame numbers, counted from 0. */
  frames?: { first: number; last: number; sourceBase: 0 | 1 } | null
  aduColumns?: string[]
  problems?: string[]
}

export type OmePrefill = OmeImportReport | { error: string }

export interface StackReport {
  format: string
  byteOrder: string
  width: number
  height: number
  frames: number
  bitsPerSample: number
  sampleFormat: string
  compression: string
  fileSet: string[]
  hasOmeXml: boolean
  omePrefill: OmePrefill | null
  trace?: { min: number; max: number; mean: number }
  thumbnail?: { width: number; height: number }
}

interface ValidationBase {
  id: number
  name: string
  status: FileStatus
  problem: string | null
  mapping: ColumnMapping | null
}

/** GET …/validation: the report's shape follows the file's kind. */
export type FileValidation = ValidationBase &
  (
    | { kind: 'localization_table'; report: TableReport | null }
    | { kind: 'raw_stack'; report: StackReport | null }
    | { kind: 'metadata' | 'other'; report: null }
  )

/** The table report of a validation, when the file is a table. */
export const tableReportOf = (v: FileValidation | null): TableReport | null =>
  v?.kind === 'localization_table' ? v.report : null

const files = (datasetId: number) => `/api/datasets/${datasetId}/files`
const one = (datasetId: number, fileId: number) => `${files(datasetId)}/${fileId}`

export const listFiles = (datasetId: number) => api.get<FilesAnswer>(files(datasetId))
export const getValidation = (datasetId: number, fileId: number) =>
  api.get<FileValidation>(`${one(datasetId, fileId)}/validation`)
export const putMapping = (datasetId: number, fileId: number, mapping: ColumnMappingInput) =>
  api.put<DatasetFileDto>(`${one(datasetId, fileId)}/mapping`, mapping)

export const putFormat = (datasetId: number, fileId: number, format: TableFormatChoice) =>
  api.put<DatasetFileDto>(`${one(datasetId, fileId)}/format`, format)
export const deleteFile = (datasetId: number, fileId: number) => api.delete(one(datasetId, fileId))
export const getFrameMeans = (datasetId: number, fileId: number) =>
  api.get<number[]>(`${one(datasetId, fileId)}/frame-means.json`)

/** Where the browser fetches a file's bytes, previews and the dataset's bundles. */
export const fileUrls = {
  content: (datasetId: number, fileId: number) => `${one(datasetId, fileId)}/content`,
  thumbnail: (datasetId: number, fileId: number) => `${one(datasetId, fileId)}/thumbnail.png`,
  manifest: (datasetId: number) => `/api/datasets/${datasetId}/manifest.txt`,
  archive: (datasetId: number) => `/api/datasets/${datasetId}/archive.zip`,
}
