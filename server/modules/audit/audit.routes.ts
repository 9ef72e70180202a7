import { Router } from 'express'
import { auditQuerySchema, type AuditEventDto } from '@shared/schemas/audit.schema'
import { ForbiddenError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseQuery } from '../../http/validate'
import { AuditEvent } from './audit-event.entity'

/** The audit log, newest first, for stewards and admins. */
export function auditRouter(): Router {
  const router = Router()
  router.get('/', requireUser, async (req, res) => {
    if (!req.ability.can('read', 'AuditEvent'))
      throw new ForbiddenError('Only stewards and admins can read the audit log.')
    const q = parseQuery(auditQuerySchema, req)
    const where = {
      ...(q.targetType ? { targetType: q.targetType } : {}),
      ...(q.targetId ? { targetId: q.targetId } : {}),
      ...(q.action ? { action: q.action } : {}),
    }
    const [rows, total] = await em().findAndCount(AuditEvent, where, {
      orderBy: { id: 'desc' },
      limit: q.limit,
      offset: q.offset,
    })
    res.json({
      items: rows.map((e): AuditEventDto => ({
        id: e.id,
        actor: e.actor ?? null,
        action: e.action,
        targetType: e.targetType,
        targetId: e.targetId,
        time: e.time.toISOString(),
        address: e.address ?? null,
        details: e.details ?? null,
      })),
      total,
    })
  })
  return router
}
