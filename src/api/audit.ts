import type { AuditEventDto } from '@shared/schemas/audit.schema'
import type { Page } from '@shared/schemas/common.schema'
import { api } from './client'

export type { AuditEventDto }

export const listAuditEvents = (query: { limit: number; offset: number }) =>
  api.get<Page<AuditEventDto>>('/api/audit', query)
