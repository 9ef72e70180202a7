import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import {
  adminUserQuerySchema,
  adminUserSchema,
  setSiteRoleSchema,
  setUserActiveSchema,
} from '@shared/schemas/admin-user.schema'
import { idSchema } from '@shared/schemas/common.schema'
import { pageOf, registerJsonRoute } from '../../openapi/registry'

export function registerAdminUserPaths(registry: OpenAPIRegistry) {
  const params = z.object({ id: idSchema })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/users',
    summary: 'Everyone with an account or an invitation, searched by name or e-mail (admins)',
    tags: ['Users'],
    query: adminUserQuerySchema,
    response: pageOf(adminUserSchema),
    errors: [401, 403],
  })
  registerJsonRoute(registry, {
    method: 'put',
    path: '/api/users/{id}/site-role',
    summary: 'Set or clear a site role (admins; audited)',
    tags: ['Users'],
    params,
    body: setSiteRoleSchema,
    response: adminUserSchema,
    errors: [400, 401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'put',
    path: '/api/users/{id}/active',
    summary: 'Deactivate or reactivate an account (admins; audited)',
    tags: ['Users'],
    params,
    body: setUserActiveSchema,
    response: adminUserSchema,
    errors: [400, 401, 403, 404, 409],
  })
}
