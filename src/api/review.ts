import type { LinkCheckResult } from '@shared/schemas/link-check.schema'
import type { JournalDto, ManuscriptDto } from '@shared/schemas/manuscript.schema'
import type { ReviewerLinkCreatedDto, ReviewerLinkDto } from '@shared/schemas/reviewer-link.schema'
import { api, request } from './client'

/** Reviewer links, manuscripts and the link check. */
export const reviewApi = {
  links: (dataset: number | string) =>
    api.get<{ items: ReviewerLinkDto[] }>(`/api/datasets/${dataset}/reviewer-links`),
  createLink: (dataset: number | string, body: { expiresAt: string; anonymous: boolean }) =>
    api.post<ReviewerLinkCreatedDto>(`/api/datasets/${dataset}/reviewer-links`, body),
  revokeLink: (dataset: number | string, id: number) =>
    api.delete(`/api/datasets/${dataset}/reviewer-links/${id}`),
  journals: () => api.get<{ items: JournalDto[] }>('/api/journals'),
  manuscripts: () => api.get<{ items: ManuscriptDto[] }>('/api/manuscripts'),
  manuscriptsOf: (dataset: number | string) =>
    api.get<{ items: ManuscriptDto[] }>(`/api/datasets/${dataset}/manuscripts`),
  createManuscript: (body: {
    journalId: number
    reference: string
    title: string
    datasets: (string | number)[]
  }) => api.post<ManuscriptDto>('/api/manuscripts', body),
  attach: (manuscript: number, dataset: string | number) =>
    api.post<ManuscriptDto>(`/api/manuscripts/${manuscript}/datasets`, { dataset }),
  checkLinks: (text: string) => api.post<LinkCheckResult>('/api/link-check', { text }),
  checkLinksCsv: (text: string) =>
    request<string>('POST', '/api/link-check?format=csv', { body: { text }, asText: true }),
}
