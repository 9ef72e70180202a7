import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import {
  publicSearchPageSchema,
  publicSearchQuerySchema,
} from '@shared/schemas/public-search.schema'
import { registerJsonRoute } from '../../openapi/registry'

export function registerSearchPaths(registry: OpenAPIRegistry) {
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/search',
    summary:
      'Public search of approved datasets: full text over titles, descriptions and metadata, with facets and counts',
    tags: ['Search'],
    query: publicSearchQuerySchema,
    response: publicSearchPageSchema,
    errors: [400],
  })
}
