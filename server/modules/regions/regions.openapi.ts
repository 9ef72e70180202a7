import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
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
}
