import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { metadataObjectSchema } from '@shared/metadata/metadata.schema'
import { registerJsonRoute } from '../../openapi/registry'
import { instrumentProfileInputSchema } from '@shared/schemas/instrument-profile.schema'

const completenessSchema = z
  .object({
    score: z.number(),
    required: z.object({ filled: z.number(), total: z.number() }),
    recommended: z.object({ filled: z.number(), total: z.number() }),
    readyToSubmit: z.boolean(),
    sections: z.array(
      z.object({
        section: z.string(),
        score: z.number(),
        missing: z.array(z.object({ path: z.string(), label: z.string(), tier: z.string() })),
      }),
    ),
  })
  .meta({ id: 'Completeness' })
const withCompleteness = z.object({
  metadata: metadataObjectSchema,
  completeness: completenessSchema,
})

export function registerMetadataPaths(registry: OpenAPIRegistry) {
  const tags = ['Metadata']
  const params = z.object({ idOrAccession: z.string() })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/vocabulary',
    summary: 'The metadata schema as JSON Schema (x-tier, x-unit, x-term keywords)',
    tags,
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/metadata',
    summary: "A dataset's description and its completeness",
    tags,
    params,
    response: withCompleteness,
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'put',
    path: '/api/datasets/{idOrAccession}/metadata',
    summary: 'Replace the description (drafts may be partial; present values must be valid)',
    tags,
    params,
    body: metadataObjectSchema,
    response: withCompleteness,
    errors: [400, 401, 403, 404],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/completeness',
    summary: 'Score and missing fields per section',
    tags,
    params,
    response: completenessSchema,
    errors: [404],
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/export/{format}',
    summary:
      'The description as OME-XML (2016-06), DataCite JSON, schema.org JSON-LD or a methods paragraph',
    tags,
    request: {
      params: params.extend({ format: z.enum(['ome-xml', 'datacite', 'jsonld', 'methods']) }),
    },
    responses: {
      200: {
        description: 'The export',
        content: {
          'application/xml': { schema: z.string() },
          'application/ld+json': { schema: z.object({}) },
          'text/plain': { schema: z.string() },
        },
      },
    },
  })
  registry.registerPath({
    method: 'post',
    path: '/api/metadata/import',
    summary:
      'Read an OME-XML document (body, application/xml, at most 2 MB) into a metadata prefill; reports what was mapped and ignored',
    tags,
    request: { body: { content: { 'application/xml': { schema: z.string() } } } },
    responses: {
      200: {
        description: 'The prefill',
        content: {
          'application/json': {
            schema: z.object({
              metadata: metadataObjectSchema,
              mapped: z.array(z.object({ path: z.string(), from: z.string() })),
              ignored: z.array(z.object({ from: z.string(), reason: z.string() })),
            }),
          },
        },
      },
    },
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/projects/{id}/suggestions',
    summary: 'Values already used in the project, per field path',
    tags,
    params: z.object({ id: z.number().int() }),
    errors: [401, 404],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/instrument-profiles',
    summary: "My lab's saved instruments",
    tags,
    errors: [401],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/instrument-profiles',
    summary: 'Save an instrument description for reuse by the lab',
    tags,
    body: instrumentProfileInputSchema,
    status: 201,
    errors: [400, 401, 403, 409],
  })
}
