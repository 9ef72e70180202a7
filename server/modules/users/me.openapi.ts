import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { createdTokenSchema, createTokenSchema, tokenSchema } from '@shared/schemas/token.schema'
import { meSchema } from '@shared/schemas/user.schema'
import { listOf, registerJsonRoute } from '../../openapi/registry'

export function registerMePaths(registry: OpenAPIRegistry) {
  const tags = ['Me']
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/me',
    summary: 'Who is signed in, and what the abilities are built from',
    tags,
    response: meSchema,
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/me/tokens',
    summary: 'My personal access tokens',
    tags,
    response: listOf(tokenSchema),
    errors: [401],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/me/tokens',
    summary: 'Create a personal access token (the secret is shown only in this response)',
    tags,
    body: createTokenSchema,
    response: createdTokenSchema,
    status: 201,
    errors: [400, 401],
  })
  registerJsonRoute(registry, {
    method: 'delete',
    path: '/api/me/tokens/{id}',
    summary: 'Revoke a token',
    tags,
    params: z.object({ id: z.number().int() }),
    status: 204,
    errors: [401, 404],
  })
}
