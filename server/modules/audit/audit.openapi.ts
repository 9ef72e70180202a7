import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { auditEventSchema, auditQuerySchema } from '@shared/schemas/audit.schema'
import { pageOf, registerJsonRoute } from '../../openapi/registry'

export function registerAuditPaths(registry: OpenAPIRegistry) {
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/audit',
    summary: 'The audit log, newest first (stewards and admins)',
    tags: ['Audit'],
    query: auditQuerySchema,
    response: pageOf(auditEventSchema),
    errors: [401, 403],
  })
}
