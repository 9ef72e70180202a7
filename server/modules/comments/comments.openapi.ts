import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import {
  commentSchema,
  createCommentSchema,
  editCommentSchema,
  listCommentsQuerySchema,
  mentionSchema,
} from '@shared/schemas/comment.schema'
import { listOf, registerJsonRoute } from '../../openapi/registry'

export function registerCommentPaths(registry: OpenAPIRegistry) {
  const tags = ['Discussion']
  const params = z.object({ idOrAccession: z.string() })
  const commentParams = z.object({ id: z.number().int() })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/comments',
    summary: 'The threads on a dataset and its regions, oldest first (needs the preview right)',
    tags,
    params,
    query: listCommentsQuerySchema,
    response: listOf(commentSchema),
    errors: [403, 404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/datasets/{idOrAccession}/comments',
    summary:
      'Comment in Markdown: a new thread on the dataset or a region, or a reply (needs the annotate right). @address@lab.org mentions mail people with access.',
    tags,
    params,
    body: createCommentSchema,
    response: commentSchema,
    status: 201,
    errors: [400, 401, 403, 404, 429],
  })
  registerJsonRoute(registry, {
    method: 'patch',
    path: '/api/comments/{id}',
    summary: 'Edit your comment within the edit window; it is then marked as edited',
    tags,
    params: commentParams,
    body: editCommentSchema,
    response: commentSchema,
    errors: [400, 401, 403, 404, 409],
  })
  for (const action of ['resolve', 'reopen'] as const)
    registerJsonRoute(registry, {
      method: 'post',
      path: `/api/comments/{id}/${action}`,
      summary: `${action === 'resolve' ? 'Resolve' : 'Reopen'} a thread (through its first comment)`,
      tags,
      params: commentParams,
      response: commentSchema,
      errors: [400, 401, 403, 404],
    })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/me/mentions',
    summary: 'Comments that mention you, newest first, on datasets you may still see',
    tags,
    response: listOf(mentionSchema),
    errors: [401],
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/events',
    summary:
      'Server-sent events of new and changed comments and regions (comment.created, comment.updated, region.created, region.updated, region.deleted); needs the preview right',
    tags,
    request: { params },
    responses: {
      200: {
        description: 'An event stream',
        content: { 'text/event-stream': { schema: z.string() } },
      },
      403: { description: 'Not allowed' },
      404: { description: 'Not found, or not visible to you' },
    },
  })
}
