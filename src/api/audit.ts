import type { Page } from '@shared/schemas/common.schema'
import { api } from './client'

/** One audit log entry (the server's shape for GET /api/audit). */
export interface AuditEventDto {
  id: number
  /** The acting user's id, or null for the system. */
  actor: number | null
  action: string
  targetType: string
  targetId: string
  time: string
  address: string | null
  details: Record<string, unknown> | null
}

export const listAuditEvents = (query: { limit: number; offset: number }) =>
  api.get<Page<AuditEventDto>>('/api/audit', query)
