import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { qualityReportSchema } from '@shared/schemas/quality.schema'
import { registerJsonRoute } from '../../openapi/registry'

export function registerQualityPaths(registry: OpenAPIRegistry) {
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/quality',
    summary:
      'Quality report of a localization table: counts, distributions, precision, NeNA, FRC, drift, density, with each method and its parameters',
    description:
      'Follows the preview right. `status` says whether the report is queued, running (with `progress`), done or failed; a metric that could not be computed has a null value and a `reason`.',
    tags: ['Quality'],
    params: z.object({ idOrAccession: z.string(), fileId: z.number().int() }),
    response: qualityReportSchema,
    errors: [403, 404, 409],
  })
}
