import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { auditEventSchema, auditFilterSchema, auditQuerySchema } from '@shared/schemas/audit.schema'
import { pageOf, registerJsonRoute } from '../../openapi/registry'

export function registerAuditPaths(registry: OpenAPIRegistry) {
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/audit',
    summary:
      'The audit log, newest first (stewards and admins), filtered by dataset, actor, action and time',
    tags: ['Audit'],
    query: auditQuerySchema,
    response: pageOf(auditEventSchema),
    errors: [401, 403],
  })
  registry.registerPath({
    method: 'get',
    path: '/api/audit/export.csv',
    summary: 'The filtered audit log as CSV (at most 50 000 rows, newest first)',
    tags: ['Audit'],
    request: { query: auditFilterSchema },
    responses: {
      200: { description: 'CSV', content: { 'text/csv': { schema: { type: 'string' } } } },
      401: { description: 'Not signed in' },
      403: { description: 'Not a steward or admin' },
    },
  })
}
