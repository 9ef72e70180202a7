import { OpenAPIRegistry, type RouteConfig } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { PROBLEM_CONTENT_TYPE } from '@shared/api/problem'

export const problemSchema = z
  .object({
    type: z.string(),
    title: z.string(),
    status: z.number().int(),
    detail: z.string().optional(),
    instance: z.string().optional(),
    errors: z.array(z.object({ pointer: z.string(), detail: z.string() })).optional(),
  })
  .meta({
    id: 'Problem',
    description: 'An error (RFC 9457). Validation errors list each failing field.',
  })

const PROBLEMS: Record<number, string> = {
  400: 'Invalid input (field errors in `errors`)',
  401: 'Not signed in',
  403: 'Not allowed',
  404: 'Not found, or not visible to you',
  409: 'Conflicts with the current state',
  413: 'Too large',
  422: 'Understood but refused (the limit is stated)',
  429: 'Too many requests; wait a minute',
}

interface JsonRoute {
  method: RouteConfig['method']
  path: string
  summary: string
  tags: string[]
  body?: z.ZodType
  query?: z.ZodObject
  params?: z.ZodObject
  response?: z.ZodType
  status?: number
  errors?: number[]
  description?: string
}

/** Registers a JSON route with its problem responses, keeping each module's list short. */
export function registerJsonRoute(registry: OpenAPIRegistry, route: JsonRoute) {
  const status = route.status ?? 200
  const responses: RouteConfig['responses'] = {
    [status]: route.response
      ? { description: 'OK', content: { 'application/json': { schema: route.response } } }
      : { description: 'Done, no content' },
  }
  for (const code of route.errors ?? []) {
    responses[code] = {
      description: PROBLEMS[code] ?? 'Error',
      content: { [PROBLEM_CONTENT_TYPE]: { schema: problemSchema } },
    }
  }
  registry.registerPath({
    method: route.method,
    path: route.path,
    summary: route.summary,
    description: route.description,
    tags: route.tags,
    security: [{ session: [] }, { bearer: [] }],
    request: {
      ...(route.params ? { params: route.params } : {}),
      ...(route.query ? { query: route.query } : {}),
      ...(route.body ? { body: { content: { 'application/json': { schema: route.body } } } } : {}),
    },
    responses,
  })
}

export const pageOf = (item: z.ZodType) =>
  z.object({ items: z.array(item), total: z.number().int() })
export const listOf = (item: z.ZodType) => z.object({ items: z.array(item) })
