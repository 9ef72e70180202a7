import type { EntityManager } from '@mikro-orm/better-sqlite'
import type { AuditAction } from '@shared/domain/audit-actions'
import { AuditEvent } from './audit-event.entity'

export interface AuditEntry {
  action: AuditAction
  targetType: string
  targetId: string | number
  details?: Record<string, unknown>
  /** When it happened, from the caller's clock; the write time when not given. */
  at?: Date
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
    ...(entry.at ? { time: entry.at } : {}),
  })
}

/**
 * Autosaves of one editing session count as one edit: a save by the same person within this long
 * of their previous save continues the session and adds no row.
 */
export const EDIT_SESSION_WINDOW_MS = 30 * 60_000

export function continuesEditSession(
  previous: { by: number | null | undefined; at: Date } | null,
  actorId: number | null | undefined,
  now: Date,
): boolean {
  if (!previous || previous.by == null || previous.by !== actorId) return false
  const gap = now.getTime() - previous.at.getTime()
  return gap >= 0 && gap <= EDIT_SESSION_WINDOW_MS
}
