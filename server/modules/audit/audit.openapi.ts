import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { pageOf, registerJsonRoute } from '../../openapi/registry'

const auditEventSchema = z
  .object({
    id: z.number(),
    actor: z.number().nullable(),
    action: z.string(),
    targetType: z.string(),
    targetId: z.string(),
    time: z.string(),
    address: z.string().nullable(),
    details: z.record(z.string(), z.unknown()).nullable(),
  })
  .meta({ id: 'AuditEvent' })

export function registerAuditPaths(registry: OpenAPIRegistry) {
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/audit',
    summary: 'The audit log, newest first (stewards and admins)',
    tags: ['Audit'],
    query: z.object({
      limit: z.number().int().optional(),
      offset: z.number().int().optional(),
      targetType: z.string().optional(),
      targetId: z.string().optional(),
      action: z.string().optional(),
    }),
    response: pageOf(auditEventSchema),
    errors: [401, 403],
  })
}
