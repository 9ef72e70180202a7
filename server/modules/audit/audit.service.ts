import type { EntityManager } from '@mikro-orm/better-sqlite'
import { AuditEvent } from './audit-event.entity'

export interface AuditEntry {
  action: string
  targetType: string
  targetId: string | number
  details?: Record<string, unknown>
}

/** Adds an audit event to the unit of work; it is written with the change it describes. */
export function audit(
  em: EntityManager,
  req: { user?: { id: number } | null; ip?: string } | null,
  entry: AuditEntry,
) {
  em.create(AuditEvent, {
    actor: req?.user?.id ?? null,
    action: entry.action,
    targetType: entry.targetType,
    targetId: String(entry.targetId),
    address: req?.ip ?? null,
    details: entry.details ?? null,
  })
}
