import type { PreviewInfo, TileQuery } from '@shared/schemas/preview.schema'
import type { DatasetQualityDto, QualityReportDto } from '@shared/schemas/quality.schema'
import { api } from './client'

export type { PreviewInfo, TileQuery } from '@shared/schemas/preview.schema'
export type {
  DatasetQualityDto,
  DatasetQualityItem,
  QualityMetric,
  QualityReportDto,
  QualityVerdictChip,
} from '@shared/schemas/quality.schema'

/** The options of a tile; the server fills in a default for every one left out. */
export type TileOptions = Partial<TileQuery>

/** The server finds a dataset by its numeric id or by its accession. */
export type DatasetRef = number | string

const one = (datasetId: DatasetRef, fileId: number) =>
  `/api/datasets/${encodeURIComponent(String(datasetId))}/files/${fileId}`

export const getQuality = (datasetId: DatasetRef, fileId: number) =>
  api.get<QualityReportDto>(`${one(datasetId, fileId)}/quality`)

/** The standalone HTML report of a finished table: a download, so a plain link, not a fetch. */
export const qualityReportHtmlUrl = (datasetId: DatasetRef, fileId: number) =>
  `${one(datasetId, fileId)}/quality/report.html`

/** Every localization table of a dataset with its report's state, headline numbers and verdicts. */
export const getDatasetQuality = (datasetId: DatasetRef) =>
  api.get<DatasetQualityDto>(`/api/datasets/${encodeURIComponent(String(datasetId))}/quality`)

export const getPreviewInfo = (datasetId: DatasetRef, fileId: number) =>
  api.get<PreviewInfo>(`${one(datasetId, fileId)}/preview`)

/** The query of a tile, keys sorted so that the same options always give the same URL (cache). */
export function tileQueryString(query: TileOptions): string {
  const params = new URLSearchParams()
  for (const key of Object.keys(query).sort()) {
    const value = query[key as keyof TileOptions]
    if (value !== undefined && value !== null) params.set(key, String(value))
  }
  return params.toString()
}

/** Where the browser fetches tile (z, x, y) of a table's preview, drawn with `query`. */
export function tileUrl(
  datasetId: DatasetRef,
  fileId: number,
  z: number,
  x: number,
  y: number,
  query: TileOptions = {},
): string {
  const qs = tileQueryString(query)
  const path = `${one(datasetId, fileId)}/tiles/${z}/${x}/${y}.png`
  return qs ? `${path}?${qs}` : path
}
