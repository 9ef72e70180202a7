import type { Page } from '@shared/schemas/common.schema'
import type {
  CreateDatasetInput,
  DatasetDto,
  DatasetShareDto,
  DatasetSummaryDto,
  DatasetSortField,
  ReviewDatasetInput,
  SetEmbargoInput,
  ShareDatasetInput,
  UpdateDatasetInput,
} from '@shared/schemas/dataset.schema'
import type { DatasetState } from '@shared/domain/dataset-state'
import { api } from './client'

export type DatasetSort = DatasetSortField | `-${DatasetSortField}`

export interface DatasetQuery {
  limit: number
  offset: number
  sort?: DatasetSort
  q?: string
  projectId?: number
  state?: DatasetState
}

const one = (idOrAccession: number | string) =>
  `/api/datasets/${encodeURIComponent(String(idOrAccession))}`

export const listDatasets = (query: DatasetQuery) =>
  api.get<Page<DatasetSummaryDto>>('/api/datasets', { ...query })
export const getDataset = (idOrAccession: number | string) =>
  api.get<DatasetDto>(one(idOrAccession))
export const createDataset = (body: CreateDatasetInput) =>
  api.post<DatasetDto>('/api/datasets', body)
export const updateDataset = (id: number, body: UpdateDatasetInput) =>
  api.patch<DatasetDto>(one(id), body)
export const deleteDataset = (id: number) => api.delete(one(id))
export const submitDataset = (id: number) => api.post<DatasetDto>(`${one(id)}/submit`)
export const reviewDataset = (id: number, body: ReviewDatasetInput) =>
  api.post<DatasetDto>(`${one(id)}/review`, body)
export const setEmbargo = (id: number, body: SetEmbargoInput) =>
  api.put<DatasetDto>(`${one(id)}/embargo`, body)

export const listShares = (id: number) => api.get<{ items: DatasetShareDto[] }>(`${one(id)}/shares`)
export const shareDataset = (id: number, body: ShareDatasetInput) =>
  api.post<DatasetShareDto>(`${one(id)}/shares`, body)
export const revokeShare = (id: number, shareId: number) =>
  api.delete(`${one(id)}/shares/${shareId}`)
