import type { CurationThreadDto, WorkQueueDto } from '@shared/schemas/curation.schema'
import type { DatasetVersionDto } from '@shared/schemas/dataset-version.schema'
import type { DatasetDto } from '@shared/schemas/dataset.schema'
import { api } from './client'

export type { CurationThreadDto, WorkQueueDto } from '@shared/schemas/curation.schema'
export type { DatasetVersionDto } from '@shared/schemas/dataset-version.schema'

const one = (idOrAccession: number | string) =>
  `/api/datasets/${encodeURIComponent(String(idOrAccession))}`

export const getCurationThread = (id: number | string) =>
  api.get<CurationThreadDto>(`${one(id)}/curation`)

export const listDatasetVersions = (id: number | string) =>
  api.get<{ items: DatasetVersionDto[] }>(`${one(id)}/versions`)

/** Opens the next version of an approved dataset as a draft (depositors). */
export const startNewVersion = (id: number | string) => api.post<DatasetDto>(`${one(id)}/versions`)

/** Puts a failed DOI registration back in line (stewards). */
export const retryDoi = (id: number | string, n: number) =>
  api.post<DatasetVersionDto>(`${one(id)}/versions/${n}/doi`)

export const getWorkQueue = () => api.get<WorkQueueDto>('/api/curation/queue')
