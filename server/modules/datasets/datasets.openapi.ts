import type { OpenAPIRegistry } from '@asteasolutions/zod-to-openapi'
import { z } from 'zod'
import {
  createDatasetSchema,
  datasetPageSchema,
  datasetSchema,
  datasetShareSchema,
  listDatasetsQuerySchema,
  reviewDatasetSchema,
  setEmbargoSchema,
  shareDatasetSchema,
  updateDatasetSchema,
} from '@shared/schemas/dataset.schema'
import { listOf, registerJsonRoute } from '../../openapi/registry'

export function registerDatasetPaths(registry: OpenAPIRegistry) {
  const tags = ['Datasets']
  const params = z.object({
    idOrAccession: z.string().describe('Numeric id or accession, e.g. STPL-000042'),
  })
  const path = (suffix = '') => `/api/datasets/{idOrAccession}${suffix}`
  registerJsonRoute(registry, {
    method: 'get',
    path: '/api/datasets',
    summary: 'Datasets I can see, paged and sorted on the server',
    tags,
    query: listDatasetsQuerySchema,
    response: datasetPageSchema,
    errors: [400],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: '/api/datasets',
    summary: 'Create a draft dataset in a project (assigns the accession)',
    tags,
    body: createDatasetSchema,
    response: datasetSchema,
    status: 201,
    errors: [400, 401, 403],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: path(),
    summary: 'One dataset',
    tags,
    params,
    response: datasetSchema,
    errors: [404],
  })
  registerJsonRoute(registry, {
    method: 'patch',
    path: path(),
    summary: 'Edit a draft (or a dataset sent back for changes)',
    tags,
    params,
    body: updateDatasetSchema,
    response: datasetSchema,
    errors: [400, 401, 403, 404],
  })
  registerJsonRoute(registry, {
    method: 'delete',
    path: path(),
    summary: 'Delete a draft',
    tags,
    params,
    status: 204,
    errors: [401, 403, 404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: path('/submit'),
    summary: 'Submit for curation',
    tags,
    params,
    response: datasetSchema,
    errors: [401, 403, 404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: path('/review'),
    summary: 'Steward: approve (optionally with an embargo), request changes, or withdraw',
    tags,
    params,
    body: reviewDatasetSchema,
    response: datasetSchema,
    errors: [400, 401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'put',
    path: path('/embargo'),
    summary: 'Steward: set, extend or lift (until = null) the embargo, with a reason',
    tags,
    params,
    body: setEmbargoSchema,
    response: datasetSchema,
    errors: [400, 401, 403, 404],
  })
  registerJsonRoute(registry, {
    method: 'get',
    path: path('/shares'),
    summary: 'Who the dataset is shared with',
    tags,
    params,
    response: listOf(datasetShareSchema),
    errors: [401, 403, 404],
  })
  registerJsonRoute(registry, {
    method: 'post',
    path: path('/shares'),
    summary: 'Share with a collaborator by e-mail (they are told by mail)',
    tags,
    params,
    body: shareDatasetSchema,
    response: datasetShareSchema,
    status: 201,
    errors: [400, 401, 403, 404, 409],
  })
  registerJsonRoute(registry, {
    method: 'delete',
    path: path('/shares/{shareId}'),
    summary: 'Stop sharing',
    tags,
    params: params.extend({ shareId: z.number().int() }),
    status: 204,
    errors: [401, 403, 404],
  })
}
