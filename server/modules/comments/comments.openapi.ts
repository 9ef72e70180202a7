import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { commentSchema, createCommentSchema } from '@shared/schemas/comment.schema'
import { listOf, registerJsonRoute } from '../../openapi/registry'

export function registerCommentPaths(registry: OpenAPIRegistry) {
  const tags = ['Discussion']
  const params = z.object({ idOrAccession: z.string() })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/comments',
    summary: 'The discussion on a dataset (needs the preview right)',
    tags,
    params,
    response: listOf(commentSchema),
    errors: [403, 404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/datasets/{idOrAccession}/comments',
    summary:
      'Comment, optionally on a region of interest given in sample nanometres (needs the annotate right)',
    tags,
    params,
    body: createCommentSchema,
    response: commentSchema,
    status: 201,
    errors: [400, 401, 403, 404],
  })
}
