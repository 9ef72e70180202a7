import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import {
  previewInfoSchema,
  tileParamsSchema,
  tileQuerySchema,
} from '@shared/schemas/preview.schema'
import { datasetQualitySchema, qualityReportSchema } from '@shared/schemas/quality.schema'
import { PROBLEM_CONTENT_TYPE } from '@shared/api/problem'
import { problemSchema, registerJsonRoute } from '../../openapi/registry'

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
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/quality',
    summary:
      'The quality of every localization table of a dataset: report state, headline numbers and verdicts',
    description:
      'Follows the preview right. One item per localization table; numbers are null until a report was computed, `verdicts` names each judged aspect with its worst tone.',
    tags: ['Quality'],
    params: z.object({ idOrAccession: z.string() }),
    response: datasetQualitySchema,
    errors: [403, 404],
  })
  const problem = (description: string) => ({
    description,
    content: { [PROBLEM_CONTENT_TYPE]: { schema: problemSchema } },
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/quality/report.html',
    summary:
      'The quality report as one standalone HTML file (opens offline, prints): metrics, verdicts, plots as SVG and the whole field as a picture',
    description:
      'Follows the preview right. Sent as an attachment named after the accession and the table. A report that is not done answers 404.',
    tags: ['Quality'],
    request: { params: z.object({ idOrAccession: z.string(), fileId: z.number().int() }) },
    responses: {
      200: { description: 'HTML', content: { 'text/html': { schema: z.string() } } },
      403: problem('Not allowed'),
      404: problem('No such dataset or file, not visible to you, or the report is not done'),
      409: problem('Not a localization table'),
    },
  })
}

export function registerPreviewPaths(registry: OpenAPIRegistry) {
  const params = z.object({ idOrAccession: z.string(), fileId: z.number().int() })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/preview',
    summary: 'The tile pyramid of a localization table’s preview (geometry in sample nm)',
    description: 'Follows the preview right.',
    tags: ['Quality'],
    params,
    response: previewInfoSchema,
    errors: [403, 404, 409],
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/tiles/{z}/{x}/{y}.png',
    summary:
      'One 256 × 256 preview tile, rendered from the localization store with the options given',
    description:
      'Follows the preview right. Unknown options answer 400, a tile outside the pyramid 404 (problem+json).',
    tags: ['Quality'],
    request: { params: params.extend(tileParamsSchema.shape), query: tileQuerySchema },
    responses: {
      200: { description: 'PNG', content: { 'image/png': { schema: z.string() } } },
      400: { description: 'Unknown or invalid options' },
      404: { description: 'No such dataset, file or tile' },
    },
  })
}
