import type { AuditEventDto, AuditFilter } from '@shared/schemas/audit.schema'
import type { Page } from '@shared/schemas/common.schema'
import { api, type Query } from './client'

export type { AuditEventDto, AuditFilter }

/** Only the filters that are set, so the URL and the query stay short. */
export function auditFilterQuery(filter: AuditFilter): Query {
  return Object.fromEntries(Object.entries(filter).filter(([, v]) => v != null && v !== ''))
}

export const listAuditEvents = (query: AuditFilter & { limit: number; offset: number }) =>
  api.get<Page<AuditEventDto>>('/api/audit', auditFilterQuery(query))

/** The link that downloads the filtered log as CSV (the browser sends the session cookie). */
export function auditCsvUrl(filter: AuditFilter): string {
  const params = new URLSearchParams(auditFilterQuery(filter) as Record<string, string>)
  const query = params.toString()
  return `/api/audit/export.csv${query ? `?${query}` : ''}`
}
