import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import {
  MEASUREMENT_KINDS,
  measurementResultSchema,
} from '@shared/schemas/region-measurement.schema'
import { createRegionSchema, patchRegionSchema, regionSchema } from '@shared/schemas/region.schema'
import { listOf, registerJsonRoute } from '../../openapi/registry'

export function registerRegionPaths(registry: OpenAPIRegistry) {
  const tags = ['Regions of interest']
  const fileParams = z.object({ idOrAccession: z.string(), fileId: z.number().int() })
  const regionParams = z.object({ id: z.number().int() })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/regions',
    summary: 'The regions drawn on a localization table (needs the preview right)',
    tags,
    params: fileParams,
    response: listOf(regionSchema),
    errors: [403, 404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/regions',
    summary:
      'Draw a region: GeoJSON in the table’s sample nm (Polygon, Point, LineString with width) or an Ellipse (needs the annotate right)',
    tags,
    params: fileParams,
    body: createRegionSchema,
    response: regionSchema,
    status: 201,
    errors: [400, 401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/regions',
    summary: 'Every region on a dataset’s tables (needs the preview right)',
    tags,
    params: z.object({ idOrAccession: z.string() }),
    response: listOf(regionSchema),
    errors: [403, 404],
  })
  registerJsonRoute(registry, {
    method: 'patch',
    path: '/api/regions/{id}',
    summary: 'Change a region (its author or an owner of the dataset)',
    tags,
    params: regionParams,
    body: patchRegionSchema,
    response: regionSchema,
    errors: [400, 401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'delete',
    path: '/api/regions/{id}',
    summary: 'Delete a region and its threads (its author or an owner of the dataset)',
    tags,
    params: regionParams,
    errors: [401, 403, 404],
  })
  registerMeasurementPaths(registry, tags, fileParams, regionParams)
}

/**
 * The measurement query is one flat list of query values (each kind reads its own; all have
 * defaults), so it is documented flat here rather than as the schema's union by kind.
 */
const measurementQueryDoc = z.object({
  kind: z.enum(MEASUREMENT_KINDS),
  pointRadius: z.number().optional().describe('Radius taken in around a Point region, nm (250)'),
  eps: z.number().optional().describe('dbscan: neighbourhood radius, nm (20)'),
  minPts: z
    .number()
    .int()
    .optional()
    .describe('dbscan: neighbours a core point needs, itself counted (5)'),
  rMax: z.number().optional().describe('ripley: largest distance, nm (200)'),
  steps: z.number().int().optional().describe('ripley: distances evaluated (40)'),
  simulations: z
    .number()
    .int()
    .optional()
    .describe('ripley: CSR simulations for the envelope (99)'),
  seed: z.number().int().optional().describe('ripley: seed of the simulations (1)'),
  correction: z.enum(['translation', 'none']).optional().describe('ripley: edge correction'),
  bins: z.number().int().optional().describe('nn: histogram bins (60)'),
  binNm: z.number().optional().describe('profile: bin along the line, nm (5)'),
  width: z.number().optional().describe("profile: band width, nm (the line's own width)"),
})

function registerMeasurementPaths(
  registry: OpenAPIRegistry,
  tags: string[],
  fileParams: z.ZodObject,
  regionParams: z.ZodObject,
) {
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/regions/{id}/measurements',
    summary:
      'Measure the localizations inside a region: summary, DBSCAN clusters, Ripley K/L/H with a CSR envelope, nearest-neighbour distances or a line profile with Gaussian fits (needs the preview right; cached per parameters)',
    tags,
    params: regionParams,
    query: measurementQueryDoc,
    response: measurementResultSchema,
    errors: [400, 404, 409, 422],
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/regions/export',
    summary: "Export a table's regions as GeoJSON (nm) or OME-XML ROIs (needs the preview right)",
    tags,
    security: [{ session: [] }, { bearer: [] }],
    request: {
      params: fileParams,
      query: z.object({ format: z.enum(['geojson', 'ome-xml']).optional() }),
    },
    responses: {
      200: {
        description: 'The regions as a download',
        content: {
          'application/geo+json': { schema: z.object({ type: z.literal('FeatureCollection') }) },
          'application/xml': { schema: z.string() },
        },
      },
    },
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/datasets/{idOrAccession}/files/{fileId}/regions/import',
    summary:
      'Import regions from GeoJSON (nm) or OME-XML ROIs; what cannot be taken is listed with the reason (needs the annotate right)',
    tags,
    params: fileParams,
    body: z.object({ format: z.enum(['geojson', 'ome-xml']), content: z.string() }),
    response: z.object({
      created: z.array(regionSchema),
      skipped: z.array(z.object({ item: z.string(), reason: z.string() })),
      coordinates: z.string(),
    }),
    status: 201,
    errors: [400, 401, 403, 404, 409],
  })
}
