import type { Completeness } from '@shared/metadata/completeness'
import type { DatasetMetadata, DatasetMetadataInput } from '@shared/metadata/metadata.schema'
import { api } from './client'

export interface MetadataAnswer {
  metadata: DatasetMetadata
  completeness: Completeness
}

/** What an OME-XML document would fill in, and what of it has no place here (with why). */
export interface OmeImportReport {
  metadata: DatasetMetadata
  mapped: { path: string; from: string; value: unknown }[]
  ignored: { from: string; reason: string }[]
}

/** Values already used in a project, keyed by field path (`*` stands for any list index). */
export type ProjectSuggestions = Record<string, string[]>

export const EXPORT_FORMATS = ['ome-xml', 'datacite', 'jsonld', 'methods'] as const
export type ExportFormat = (typeof EXPORT_FORMATS)[number]

const base = (id: number) => `/api/datasets/${id}`

export const getMetadata = (datasetId: number) =>
  api.get<MetadataAnswer>(`${base(datasetId)}/metadata`)
export const putMetadata = (datasetId: number, metadata: DatasetMetadataInput) =>
  api.put<MetadataAnswer>(`${base(datasetId)}/metadata`, metadata)
export const importOmeXml = (xml: string) =>
  api.postText<OmeImportReport>('/api/metadata/import', xml, 'application/xml')
export const getProjectSuggestions = (projectId: number) =>
  api.get<ProjectSuggestions>(`/api/projects/${projectId}/suggestions`)

/** Where the browser downloads (or opens) an export of the dataset's description. */
export const exportUrl = (datasetId: number, format: ExportFormat) =>
  `${base(datasetId)}/export/${format}`
export const getMethodsText = (datasetId: number) => api.getText(exportUrl(datasetId, 'methods'))
