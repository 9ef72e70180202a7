import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import { curationThreadSchema, workQueueSchema } from '@shared/schemas/curation.schema'
import { datasetSchema } from '@shared/schemas/dataset.schema'
import {
  datasetVersionListSchema,
  datasetVersionSchema,
} from '@shared/schemas/dataset-version.schema'
import { registerJsonRoute } from '../../openapi/registry'

const dataset = z.object({ idOrAccession: z.string() })
const version = dataset.extend({ n: z.number().int().positive() })

/** Versions, their DOIs, the curation thread and the steward's work queue. */
export function registerVersionPaths(registry: OpenAPIRegistry) {
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/versions',
    summary: 'The approved, frozen versions of a dataset, newest first',
    description:
      'Readable by whoever may read the dataset; while a new version is in draft, the approved ones keep the access they had. `files` (name, size, SHA-256 as frozen) is null when the files are not open to the reader, e.g. under embargo.',
    tags: ['Versions'],
    params: dataset,
    response: datasetVersionListSchema,
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/versions/{n}',
    summary: 'One frozen version (label `<accession>.v<n>`): metadata snapshot, files, DOI',
    tags: ['Versions'],
    params: version,
    response: datasetVersionSchema,
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/datasets/{idOrAccession}/versions',
    summary: 'Start the next version of an approved dataset as a draft (depositors)',
    description:
      'The dataset becomes an editable draft numbered one above its last approved version; the approved versions stay frozen. Submitting and approval then freeze the new version.',
    tags: ['Versions'],
    params: dataset,
    status: 201,
    response: datasetSchema,
    errors: [401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/datasets/{idOrAccession}/versions/{n}/doi',
    summary: 'Retry the DOI registration of a version (stewards)',
    description:
      'Puts a failed (or waiting) registration back in line with fresh attempts; 409 when the DOI is registered already.',
    tags: ['Versions'],
    params: version,
    status: 202,
    response: datasetVersionSchema,
    errors: [401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets/{idOrAccession}/curation',
    summary: 'The curation thread: submissions, decisions with their checklist and comments',
    description:
      'For the dataset’s depositors and the stewards; anyone else gets 404. `checks` is the checklist as it stands now.',
    tags: ['Curation'],
    params: dataset,
    response: curationThreadSchema,
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/curation/queue',
    summary:
      'The steward’s work queue: submissions awaiting review, changes requested, embargoes ending in 30 days, failed DOI registrations',
    tags: ['Curation'],
    response: workQueueSchema,
    errors: [401, 403],
  })
  registry.registerPath({
    method: 'get',
    path: '/api/datasets/{idOrAccession}/versions/{n}/files/{fileId}/content',
    summary:
      'The bytes of a file as frozen in a version (download right, or a reviewer link to it)',
    description:
      'Served from the blob its checksum names, so a version stays downloadable whatever later drafts do. Range requests, strong ETag, Repr-Digest and Content-Digest (RFC 9530) as for the dataset’s own files.',
    tags: ['Versions'],
    security: [{ session: [] }, { bearer: [] }],
    request: { params: version.extend({ fileId: z.number().int() }) },
    responses: {
      200: {
        description: 'The file',
        content: { 'application/octet-stream': { schema: z.string() } },
      },
      206: { description: 'The requested range' },
      403: { description: 'Not allowed to download' },
      404: { description: 'Not found, or not visible to you' },
    },
  })
}
