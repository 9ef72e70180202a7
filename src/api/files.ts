import type { FileKind, FileStatus } from '@shared/domain/files'
import type { FileValidation, TableReport } from '@shared/schemas/file-report.schema'

export type {
  FileValidation,
  OmePrefill,
  StackReport,
  TableReport,
} from '@shared/schemas/file-report.schema'
import type {
  ColumnMappingInput,
  TableFormatChoice,
} from '@shared/schemas/localization-mapping.schema'
import { api } from './client'

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
