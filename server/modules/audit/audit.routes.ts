import { Router, type Request } from 'express'
import { auditFilterSchema, auditQuerySchema } from '@shared/schemas/audit.schema'
import { ForbiddenError } from '../../errors/http-error'
import { requireUser } from '../../http/authenticate'
import { requestEm as em } from '../../http/request-context'
import { parseQuery } from '../../http/validate'
import { exportAuditCsv, listAuditEvents } from './audit-log.service'

function assertMayRead(req: Request) {
  if (!req.ability.can('read', 'AuditEvent'))
    throw new ForbiddenError('Only stewards and admins can read the audit log.')
}

/**
 * The audit log for stewards and admins: read only. There is deliberately no route that changes
 * or removes an event (the table refuses it too); other methods on these paths find nothing.
 */
export function auditRouter(): Router {
  const router = Router()
  router.get('/', requireUser, async (req, res) => {
    assertMayRead(req)
    res.json(await listAuditEvents(em(), parseQuery(auditQuerySchema, req)))
  })
  router.get('/export.csv', requireUser, async (req, res) => {
    assertMayRead(req)
    const csv = await exportAuditCsv(em(), parseQuery(auditFilterSchema, req))
    res
      .type('text/csv; charset=utf-8')
      .attachment('stipple-audit-log.csv')
      .set('Cache-Control', 'no-store')
      .send(csv)
  })
  return router
}
