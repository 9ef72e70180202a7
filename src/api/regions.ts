import type { CommentDto, CreateCommentInput, MentionDto } from '@shared/schemas/comment.schema'
import type { CreateRegionInput, PatchRegionInput, RegionDto } from '@shared/schemas/region.schema'
import { api } from './client'
import type { DatasetRef } from './quality'

export type { CommentDto, MentionDto } from '@shared/schemas/comment.schema'
export type { RegionDto, RegionGeometry, RegionShape } from '@shared/schemas/region.schema'

const datasetPath = (id: DatasetRef) => `/api/datasets/${encodeURIComponent(String(id))}`

export const listFileRegions = (datasetId: DatasetRef, fileId: number) =>
  api.get<{ items: RegionDto[] }>(`${datasetPath(datasetId)}/files/${fileId}/regions`)
export const listDatasetRegions = (datasetId: DatasetRef) =>
  api.get<{ items: RegionDto[] }>(`${datasetPath(datasetId)}/regions`)
export const createRegion = (datasetId: DatasetRef, fileId: number, body: CreateRegionInput) =>
  api.post<RegionDto>(`${datasetPath(datasetId)}/files/${fileId}/regions`, body)
export const patchRegion = (id: number, body: PatchRegionInput) =>
  api.patch<RegionDto>(`/api/regions/${id}`, body)
export const deleteRegion = (id: number) => api.delete(`/api/regions/${id}`)

export const listComments = (datasetId: DatasetRef, regionId?: number) =>
  api.get<{ items: CommentDto[] }>(`${datasetPath(datasetId)}/comments`, { regionId })
export const postComment = (datasetId: DatasetRef, body: CreateCommentInput) =>
  api.post<CommentDto>(`${datasetPath(datasetId)}/comments`, body)
export const editComment = (id: number, body: string) =>
  api.patch<CommentDto>(`/api/comments/${id}`, { body })
export const setThreadResolved = (rootId: number, resolved: boolean) =>
  api.post<CommentDto>(`/api/comments/${rootId}/${resolved ? 'resolve' : 'reopen'}`)
export const listMyMentions = () => api.get<{ items: MentionDto[] }>('/api/me/mentions')

/** The dataset's live stream of new comments and regions (server-sent events). */
export const datasetEventsUrl = (datasetId: DatasetRef) => `${datasetPath(datasetId)}/events`
